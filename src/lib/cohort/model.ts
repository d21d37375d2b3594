/**
 * From the server's rows to what enters the statistics: which sessions enter (signed off, or any with a summary
 * when unsigned ones are included, minus those unticked), whether they may be pooled, and their values and maps.
 * Shared by the Cohort screen and its printable report, so both pool exactly the same sessions.
 */
import { describePoolingDifference, findPoolingDifference, type PoolingDifference } from './pooling';
import type { PooledSession, SignOffState } from './values';
import type { SubjectMaps } from './group-map';

export interface SessionOutline {
  normalizedUnit: string;
  bands: { label: string; lowHz: number; highHz: number }[];
  windows: { label: string; startS: number; endS: number }[];
  conditions: string[];
  channels: string[];
  channelGroups: { label: string; channels: string[] }[];
}

export interface CohortSessionLike {
  analysisSessionId: string;
  subject: string;
  status: 'draft' | 'in review' | 'returned' | 'signed off';
  recipeVersion: number | null;
  recipeHash: string | null;
  recipe: Record<string, unknown> | null;
  summaryHash: string | null;
  outline: SessionOutline | null;
}

export interface StoredSummary extends SessionOutline {
  bandValues: { band: string; window: string; channel: string; condition: string; raw: number | null; normalized: number | null }[];
  maps: { condition: string; channelGroup: string; frequenciesHz: number[]; timesS: number[]; values: (number | null)[][] }[];
}

export const signOffOf = (status: CohortSessionLike['status']): SignOffState =>
  status === 'signed off' ? 'signed-off' : status === 'in review' ? 'in-review' : status;

/** May this session enter at all (it has a summary; it is signed off, or unsigned ones are included)? */
export function mayEnter(s: CohortSessionLike, includeUnsigned: boolean): boolean {
  return s.summaryHash !== null && s.recipe !== null && (s.status === 'signed off' || includeUnsigned);
}

export function enteringSessions<T extends CohortSessionLike>(sessions: T[], includeUnsigned: boolean, excluded: ReadonlySet<string>): T[] {
  return sessions.filter((s) => mayEnter(s, includeUnsigned) && !excluded.has(s.analysisSessionId));
}

export type PoolingVerdict = { ok: true } | { ok: false; field: string; message: string; difference: PoolingDifference | null };

/** Refuses a subject that enters twice, then sessions whose recipes or summaries differ in what changes the numbers. */
export function checkPooling(entering: CohortSessionLike[]): PoolingVerdict {
  const seen = new Map<string, CohortSessionLike>();
  for (const s of entering) {
    const before = seen.get(s.subject);
    if (before) {
      return { ok: false, field: 'subject', difference: null, message: `Cannot pool: subject ${s.subject} enters twice (versions ${before.recipeVersion} and ${s.recipeVersion} of two sessions). Untick one of them.` };
    }
    seen.set(s.subject, s);
  }
  const difference = findPoolingDifference(entering.map((s) => ({ label: `${s.subject} (version ${s.recipeVersion})`, recipe: s.recipe ?? {}, summary: s.outline })));
  return difference === null ? { ok: true } : { ok: false, field: difference.field, message: describePoolingDifference(difference), difference };
}

export function pooledSessions(entering: CohortSessionLike[], summaries: Record<string, StoredSummary>): PooledSession[] {
  return entering.flatMap((s) => {
    const summary = summaries[s.analysisSessionId];
    if (!summary) return [];
    return [{
      analysisSessionId: s.analysisSessionId,
      subject: s.subject,
      recipeVersion: s.recipeVersion ?? 0,
      recipeHash: s.recipeHash ?? '',
      signOff: signOffOf(s.status),
      rows: summary.bandValues.map((v) => ({ subject: s.subject, condition: v.condition, band: v.band, window: v.window, channel: v.channel, raw: v.raw, normalized: v.normalized })),
    }];
  });
}

export function subjectMapsOf(entering: CohortSessionLike[], summaries: Record<string, StoredSummary>): SubjectMaps[] {
  return entering.flatMap((s) => (summaries[s.analysisSessionId] ? [{ subject: s.subject, maps: summaries[s.analysisSessionId].maps }] : []));
}

/** The neutral value of a normalized unit: 1 for a power ratio, 0 otherwise (common practice). */
export const neutralOf = (unit: string) => (unit === 'power-ratio' ? 1 : 0);
export const unitWord = (unit: string) => (unit === 'decibel' ? 'dB' : unit === 'percent-change' ? '%' : unit === 'z-score' ? 'z' : unit === 'power-ratio' ? '×' : unit);
