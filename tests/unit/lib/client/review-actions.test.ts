// Which review steps a screen offers (src/lib/client/review/actions.ts), written out from issue 11's rules: analysts
// submit their own sessions from draft or returned; leads return, sign off and sign "reviewed" a session in review
// that is not theirs; reviewers take no step; nobody signs their own session. Refusals never show permission codes.
import { describe, expect, it } from 'vitest';
import { allowedSteps, plainRefusal, whyNoSteps } from '../../../../src/lib/client/review/actions';
import type { Role } from '../../../../src/lib/permissions';

const at = (role: Role, isOwner: boolean, status: 'draft' | 'in review' | 'returned' | 'signed off', currentVersion: number | null = 1) =>
  allowedSteps({ role, isOwner, status, currentVersion, hasSummary: true });

describe('review steps offered', () => {
  it('follows roles, ownership and the order of statuses', () => {
    expect(at('analyst', true, 'draft')).toEqual(['submit']);
    expect(at('analyst', true, 'returned')).toEqual(['submit']);
    expect(at('analyst', true, 'in review')).toEqual([]);
    expect(at('analyst', false, 'draft')).toEqual([]);
    expect(at('analyst', false, 'in review')).toEqual([]);
    expect(at('lead', false, 'in review')).toEqual(['signOff', 'return', 'reviewed']);
    expect(at('lead', true, 'in review')).toEqual([]);
    expect(at('lead', false, 'draft')).toEqual([]);
    expect(at('lead', false, 'signed off')).toEqual([]);
    expect(at('reviewer', false, 'in review')).toEqual([]);
    expect(at('analyst', true, 'draft', null)).toEqual([]);
  });

  it('says why nothing is offered', () => {
    expect(whyNoSteps({ role: 'lead', isOwner: true, status: 'in review', currentVersion: 1, hasSummary: true })).toMatch(/Nobody signs their own session/);
    expect(whyNoSteps({ role: 'reviewer', isOwner: false, status: 'in review', currentVersion: 1, hasSummary: true })).toMatch(/A lead of the team reviews and signs/);
    expect(whyNoSteps({ role: 'analyst', isOwner: true, status: 'draft', currentVersion: null, hasSummary: false })).toMatch(/no recipe version/);
  });

  it('puts refusals in words, never permission codes', () => {
    expect(plainRefusal(403, 'forbidden', 'Your role (reviewer) may not do this (analysisSession:signOff).')).toBe('Your role in this team does not allow this. Nothing was changed.');
    expect(plainRefusal(403, 'wrong_password', 'x')).toBe('That is not your password. Nothing was signed.');
    expect(plainRefusal(400, 'invalid', 'reason: say why (note:create)')).toBe('reason: say why');
    expect(plainRefusal(409, 'stale_version', 'x')).toMatch(/newer recipe version/);
  });
});
