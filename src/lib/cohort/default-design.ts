import type { CohortDesignT } from '../schemas/cohort';

/** Until a lead saves one: each condition against no change, the first two conditions paired, the map test on the first channel group. */
export function defaultCohortDesign(conditions: string[], channelGroup: string | null, neutral: number): CohortDesignT {
  const tests: CohortDesignT['design']['tests'] = conditions.map((c) => ({ name: `${c} vs no change`, kind: 'one-sample' as const, condition: c }));
  if (conditions.length >= 2) tests.push({ name: `${conditions[0]} − ${conditions[1]}`, kind: 'paired', conditions: [conditions[0], conditions[1]] });
  return {
    design: { neutral, fdr: 0.05, seed: 1, tests },
    mapTest: channelGroup && conditions[0] ? { channelGroup, conditions: [conditions[0]], alpha: 0.05 } : null,
  };
}
