/**
 * Bad input to the analysis core. `field` is a dotted path into the recipe (`baseline.end`, `channels[2]`) or a
 * name for where the problem is (`recording`, `events`); `problem` completes the sentence after it.
 */
export class AnalysisInputError extends Error {
  readonly field: string;
  readonly problem: string;

  constructor(field: string, problem: string) {
    super(`${field} ${problem}`);
    this.name = 'AnalysisInputError';
    this.field = field;
    this.problem = problem;
  }
}

/** Raised between channels when the caller's `shouldCancel()` answers true. */
export class AnalysisCancelledError extends Error {
  constructor() {
    super('analysis cancelled');
    this.name = 'AnalysisCancelledError';
  }
}
