import { assembleResult, type AnalysisResult } from '../analysis/run-recipe';
import type { PoolResult } from './decompose-pool';

/**
 * The contract's Result JSON of a pool run, the shape the command line writes. Built only where a Result is
 * exported (the browser/CLI parity hook); the workspace keeps the workers' typed arrays (`decompositionOf`).
 */
export function resultOfRun(run: Pick<PoolResult, 'plan' | 'channels'>): AnalysisResult {
  return assembleResult(run.plan, run.channels);
}
