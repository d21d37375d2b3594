import { describe, expect, it } from 'vitest';
import { actions, can, invitableRoles, roles, type Action, type Role } from '../../../src/lib/permissions';

// The expected matrix, written out from the role descriptions of the Foundation issue: admin = site
// administration; lead = manages the team and its studies, invites, signs off; analyst = creates and edits own
// analysis sessions; reviewer = reads and leaves notes. Every cell is listed, so a change to the matrix must
// change this table too.
const Y = true;
const N = false;
const expected: Record<Action, Record<Role, boolean>> = {
  'team:view':               { admin: Y, lead: Y, analyst: Y, reviewer: Y },
  'study:view':              { admin: Y, lead: Y, analyst: Y, reviewer: Y },
  'study:create':            { admin: Y, lead: Y, analyst: N, reviewer: N },
  'study:edit':              { admin: Y, lead: Y, analyst: N, reviewer: N },
  'member:view':             { admin: Y, lead: Y, analyst: Y, reviewer: Y },
  'member:invite':           { admin: Y, lead: Y, analyst: N, reviewer: N },
  'member:manage':           { admin: Y, lead: N, analyst: N, reviewer: N },
  'analysisSession:create':  { admin: N, lead: N, analyst: Y, reviewer: N },
  'analysisSession:editOwn': { admin: N, lead: N, analyst: Y, reviewer: N },
  'analysisSession:submit':  { admin: N, lead: N, analyst: Y, reviewer: N },
  'analysisSession:signOff': { admin: N, lead: Y, analyst: N, reviewer: N },
  'analysisSession:return':  { admin: N, lead: Y, analyst: N, reviewer: N },
  'note:create':             { admin: N, lead: Y, analyst: Y, reviewer: Y },
  'audit:view':              { admin: Y, lead: Y, analyst: N, reviewer: N },
  'site:administer':         { admin: Y, lead: N, analyst: N, reviewer: N },
};

describe('permission matrix', () => {
  it('lists every action in the expected table', () => {
    expect(Object.keys(expected).sort()).toEqual([...actions].sort());
  });

  for (const action of actions) {
    for (const role of roles) {
      it(`${role} ${expected[action][role] ? 'may' : 'may not'} ${action}`, () => {
        expect(can(role, action)).toBe(expected[action][role]);
      });
    }
  }

  it('refuses everything to someone without a role in the team', () => {
    for (const action of actions) {
      expect(can(null, action)).toBe(false);
      expect(can(undefined, action)).toBe(false);
    }
  });

  it('lets a lead invite leads, analysts and reviewers but not administrators', () => {
    expect(invitableRoles('lead')).toEqual(['lead', 'analyst', 'reviewer']);
    expect(invitableRoles('admin')).toEqual(['admin', 'lead', 'analyst', 'reviewer']);
    expect(invitableRoles('analyst')).toEqual([]);
    expect(invitableRoles('reviewer')).toEqual([]);
  });
});
