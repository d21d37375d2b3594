/**
 * Bad input to the statistics core. `field` names where (`tests[2].conditions[1]`, `subjects.S03.cue/left`, `x`);
 * `problem` completes the sentence after it.
 */
export class StatisticsInputError extends Error {
  readonly field: string;
  readonly problem: string;

  constructor(field: string, problem: string) {
    super(`${field} ${problem}`);
    this.name = 'StatisticsInputError';
    this.field = field;
    this.problem = problem;
  }
}

/** Raised by the map test between blocks of permutations once its AbortSignal is aborted. */
export class MapTestCancelledError extends Error {
  constructor() {
    super('map test cancelled');
    this.name = 'MapTestCancelledError';
  }
}
