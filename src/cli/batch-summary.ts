// The review summary each recording of a batch gets (null: none written).
import type { SummaryBuilder } from './batch-run';

export const summarize: SummaryBuilder | null = null;
