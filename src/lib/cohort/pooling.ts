/**
 * Which analysis sessions may be pooled: their recipes must agree on everything that changes the numbers of a
 * summary (baseline window, method, spread and scope; the frequency grid; wavelet cycles; reference; filters;
 * channel types) and their summaries on the bands and windows the values are averaged over. Epochs, rejection,
 * channels and the recording's fingerprint differ from subject to subject and are not compared.
 */

export interface PoolingCandidate {
  /** How the session is named in a message, e.g. `TM-S03 (version 2)`. */
  label: string;
  recipe: Record<string, unknown>;
  /** The summary's band and window definitions and its normalized unit; null without a summary. */
  summary: { normalizedUnit: string; bands: { label: string; lowHz: number; highHz: number }[]; windows: { label: string; startS: number; endS: number }[] } | null;
}

export interface PoolingDifference {
  /** The field that differs, as a recipe or summary path: `baseline.start`, `filters`, `summary.bands`. */
  field: string;
  /** The first session's value and a session with another one. */
  first: { label: string; value: unknown };
  other: { label: string; value: unknown };
}

type Json = unknown;
const get = (o: Record<string, unknown> | undefined, key: string): Json => (o === undefined ? undefined : o[key]);
const obj = (v: unknown) => (v !== null && typeof v === 'object' ? (v as Record<string, unknown>) : undefined);

/**
 * The compared fields, each read with the recipe schema's defaults applied (an absent `scope` is "average", an
 * absent `spread` of a z-score is "time", an absent reference is as recorded), so an explicit default and an
 * omitted one pool together.
 */
export const POOLED_FIELDS: { field: string; read: (r: Record<string, unknown>) => Json }[] = [
  { field: 'baseline.method', read: (r) => get(obj(r.baseline), 'method') },
  { field: 'baseline.start', read: (r) => get(obj(r.baseline), 'start') },
  { field: 'baseline.end', read: (r) => get(obj(r.baseline), 'end') },
  { field: 'baseline.scope', read: (r) => get(obj(r.baseline), 'scope') ?? 'average' },
  { field: 'baseline.spread', read: (r) => (get(obj(r.baseline), 'method') === 'z-score' ? (get(obj(r.baseline), 'spread') ?? 'time') : null) },
  { field: 'frequencies.min', read: (r) => get(obj(r.frequencies), 'min') },
  { field: 'frequencies.max', read: (r) => get(obj(r.frequencies), 'max') },
  { field: 'frequencies.count', read: (r) => get(obj(r.frequencies), 'count') },
  { field: 'frequencies.spacing', read: (r) => get(obj(r.frequencies), 'spacing') ?? 'log' },
  { field: 'cycles', read: (r) => r.cycles },
  { field: 'reference', read: (r) => r.reference ?? { kind: 'as-recorded' } },
  { field: 'filters.highPass', read: (r) => get(obj(r.filters), 'highPass') ?? null },
  { field: 'filters.notch', read: (r) => get(obj(r.filters), 'notch') ?? null },
  { field: 'signals.types', read: (r) => get(obj(r.signals), 'types') ?? {} },
];

/** A key-order-independent text of a JSON value, for comparing. */
export function canonicalText(value: unknown): string {
  if (value === undefined) return 'null';
  if (value === null || typeof value !== 'object') return JSON.stringify(value);
  if (Array.isArray(value)) return `[${value.map(canonicalText).join(',')}]`;
  const o = value as Record<string, unknown>;
  return `{${Object.keys(o).filter((k) => o[k] !== undefined).sort().map((k) => `${JSON.stringify(k)}:${canonicalText(o[k])}`).join(',')}}`;
}

const SUMMARY_FIELDS: { field: string; read: (s: NonNullable<PoolingCandidate['summary']>) => Json }[] = [
  { field: 'summary.normalizedUnit', read: (s) => s.normalizedUnit },
  { field: 'summary.bands', read: (s) => s.bands.map(({ label, lowHz, highHz }) => ({ label, lowHz, highHz })) },
  { field: 'summary.windows', read: (s) => s.windows.map(({ label, startS, endS }) => ({ label, startS, endS })) },
];

/**
 * The first field on which a candidate differs from the first candidate, or null when all may be pooled. Fields
 * are checked in the order of POOLED_FIELDS, then the summaries' unit, bands and windows.
 */
export function findPoolingDifference(candidates: PoolingCandidate[]): PoolingDifference | null {
  if (candidates.length < 2) return null;
  const [first, ...rest] = candidates;
  for (const { field, read } of POOLED_FIELDS) {
    const a = read(first.recipe);
    const text = canonicalText(a);
    const other = rest.find((c) => canonicalText(read(c.recipe)) !== text);
    if (other) return { field, first: { label: first.label, value: a ?? null }, other: { label: other.label, value: read(other.recipe) ?? null } };
  }
  const withSummary = candidates.filter((c) => c.summary !== null);
  if (withSummary.length >= 2) {
    const [s0, ...srest] = withSummary;
    for (const { field, read } of SUMMARY_FIELDS) {
      const a = read(s0.summary!);
      const text = canonicalText(a);
      const other = srest.find((c) => canonicalText(read(c.summary!)) !== text);
      if (other) return { field, first: { label: s0.label, value: a }, other: { label: other.label, value: read(other.summary!) } };
    }
  }
  return null;
}

const shown = (v: unknown) => {
  const t = canonicalText(v);
  return t.length > 80 ? `${t.slice(0, 77)}…` : t;
};

/** One sentence for the screen and the report: what differs, and where. */
export function describePoolingDifference(d: PoolingDifference): string {
  return `Cannot pool: ${d.field} differs — ${shown(d.first.value)} in ${d.first.label}, ${shown(d.other.value)} in ${d.other.label}. Untick one of them, or save both with the same recipe.`;
}
