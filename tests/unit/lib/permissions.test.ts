import { describe, expect, it } from 'vitest';
import { actions, can, canSite, invitableRoles, roles, siteActions, type Action, type Role } from '../../../src/lib/permissions';

// The expected matrix, written out from the role descriptions of the Foundation and deployment issues: lead =
// manages the team, its members and studies, invites, signs off; analyst = creates and edits own analysis
// sessions; reviewer = reads and leaves notes. Site administration is the operator flag, not a team role. Every cell is listed, so a change to the matrix must
// change this table too.
const Y = true;
const N = false;
const expected: Record<Action, Record<Role, boolean>> = {
  'team:view':               { lead: Y, analyst: Y, reviewer: Y },
  'study:view':              { lead: Y, analyst: Y, reviewer: Y },
  'study:create':            { lead: Y, analyst: N, reviewer: N },
  'study:edit':              { lead: Y, analyst: N, reviewer: N },
  'member:view':             { lead: Y, analyst: Y, reviewer: Y },
  'member:invite':           { lead: Y, analyst: N, reviewer: N },
  'member:manage':           { lead: Y, analyst: N, reviewer: N },
  'analysisSession:create':  { lead: N, analyst: Y, reviewer: N },
  'analysisSession:editOwn': { lead: N, analyst: Y, reviewer: N },
  'analysisSession:submit':  { lead: N, analyst: Y, reviewer: N },
  'analysisSession:signOff': { lead: Y, analyst: N, reviewer: N },
  'analysisSession:return':  { lead: Y, analyst: N, reviewer: N },
  // Team review (issue 11): leads sign ("reviewed"), return and sign off; everyone reads, writes and resolves notes.
  'analysisSession:sign':    { lead: Y, analyst: N, reviewer: N },
  'note:view':               { lead: Y, analyst: Y, reviewer: Y },
  'note:create':             { lead: Y, analyst: Y, reviewer: Y },
  'note:resolve':            { lead: Y, analyst: Y, reviewer: Y },
  // Batch import of command-line summaries (issue 11 item 10): the methods person, lead or analyst; each imported
  // session is owned by whoever imported it.
  'summary:import':          { lead: Y, analyst: Y, reviewer: N },
  'audit:view':              { lead: Y, analyst: N, reviewer: N },
  'cohort:covariates':       { lead: Y, analyst: Y, reviewer: N },
  'cohort:design':           { lead: Y, analyst: N, reviewer: N },
  'cohort:includeUnsigned':  { lead: Y, analyst: N, reviewer: N },
  'slopeReport:view':        { lead: Y, analyst: Y, reviewer: Y },
  'slopeReport:save':        { lead: Y, analyst: Y, reviewer: N },
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

  it('lets a lead hand out the three team roles and nothing else', () => {
    expect(invitableRoles('lead')).toEqual(['lead', 'analyst', 'reviewer']);
    expect(roles).toEqual(['lead', 'analyst', 'reviewer']);
    expect(invitableRoles('analyst')).toEqual([]);
    expect(invitableRoles('reviewer')).toEqual([]);
  });

  it('grants site actions to the operator flag only, whatever the team role', () => {
    for (const action of siteActions) {
      expect(canSite({ isOperator: true }, action)).toBe(true);
      expect(canSite({ isOperator: false }, action)).toBe(false);
      expect(canSite(null, action)).toBe(false);
    }
  });
});
