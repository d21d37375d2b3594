import { describe, expect, it } from 'vitest';
import { actions, can, refusalWords, roles } from '../../../src/lib/permissions';

// A permission code as the matrix spells it (`analysisSession:create`): a person never reads one.
const CODE = /\b[a-z]+[A-Za-z]*:[a-z][A-Za-z]*\b/;

describe('refusalWords', () => {
  it('says what a reviewer may not do, and who may, in words', () => {
    expect(refusalWords('reviewer', 'analysisSession:create')).toBe('Your role in this team (reviewer) may not create analysis sessions. Analysts may.');
    expect(refusalWords('analyst', 'study:create')).toBe('Your role in this team (analyst) may not create studies. Leads may.');
    expect(refusalWords('reviewer', 'summary:import')).toBe('Your role in this team (reviewer) may not bring in summaries. Leads and analysts may.');
  });

  it('never shows an action code, for every role that may not take every action', () => {
    for (const role of roles) {
      for (const action of actions) {
        if (can(role, action)) continue;
        const words = refusalWords(role, action);
        expect(words, `${role} × ${action}`).not.toMatch(CODE);
        expect(words).not.toContain(action);
      }
    }
  });

  it('speaks to a non-member without a role', () => {
    expect(refusalWords(null, 'note:create')).toBe('Only members of this team may write notes.');
  });
});
