// What the Cohort screen receives from the server (src/db/queries/cohort.ts builds it): plain data, so the screens
// can name its types without importing database code.
import type { CohortDesignT } from '../schemas/cohort';

export interface CohortSessionRow {
  analysisSessionId: string;
  subject: string;
  subjectId: string;
  ownerName: string;
  status: 'draft' | 'in review' | 'returned' | 'signed off';
  fingerprint: string | null;
  recipeVersion: number | null;
  recipeHash: string | null;
  recipe: Record<string, unknown> | null;
  summaryHash: string | null;
  /** The summary's outline (no values): unit, bands, windows, conditions, channels, channel groups. */
  outline: {
    normalizedUnit: string;
    bands: { label: string; lowHz: number; highHz: number }[];
    windows: { label: string; startS: number; endS: number }[];
    conditions: string[];
    channels: string[];
    channelGroups: { label: string; channels: string[] }[];
  } | null;
  /** Band → window → condition → mean over channels of the normalized value (null: no value). */
  digest: Record<string, Record<string, Record<string, number | null>>>;
  signatures: { printedName: string; meaning: 'reviewed' | 'approved' | 'returned'; signedAt: string; recipeVersionNumber: number; contentHash: string; reason: string | null }[];
}

export interface CohortOverview {
  sessions: CohortSessionRow[];
  covariates: { names: string[]; bySubject: Record<string, Record<string, number>> };
  subjects: string[];
  design: { revision: number; cohort: CohortDesignT; updatedAt: string } | null;
}

