/**
 * Bad input to the statistics core. `field` names where (`tests[2].conditions[1]`, `subjects.S03.cue/left`, `x`);
 * `problem` completes the sentence after it.
 */
export class StatisticsInputError extends Error {
  readonly field: string;
  readonly problem: string;
  /** Which input the field is in, when a caller reads several: the values table, the design or the maps. */
  readonly source: 'values' | 'design' | 'maps' | null;

  constructor(field: string, problem: string, source: 'values' | 'design' | 'maps' | null = null) {
    super(`${field} ${problem}`);
    this.name = 'StatisticsInputError';
    this.field = field;
    this.problem = problem;
    this.source = source;
  }
}

/** Raised by the map test between blocks of permutations once its AbortSignal is aborted. */
export class MapTestCancelledError extends Error {
  constructor() {
    super('map test cancelled');
    this.name = 'MapTestCancelledError';
  }
}
