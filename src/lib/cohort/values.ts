/**
 * The pooled band values of a cohort: one row per subject × condition × band × window × channel, in the study's
 * normalized unit and in raw power, with where each row came from (recipe hash, sign-off state). The same rows
 * become the statistics contract's values table (`toTidyValues`, run by `runDesign`), the tidy CSV export
 * (`tidyCsv`) and the group cells on screen (`groupCells`).
 */
import Papa from 'papaparse';
import { studentTQuantile } from '../statistics/distributions';
import { ANNOTATION_COLUMNS, KEY_COLUMNS, type KeyColumn, type TidyValues } from '../statistics/tidy-values';

export type SignOffState = 'signed-off' | 'draft' | 'in-review' | 'returned';

export interface PooledRow {
  subject: string;
  condition: string;
  band: string;
  window: string;
  channel: string;
  raw: number | null;
  normalized: number | null;
}

export interface PooledSession {
  analysisSessionId: string;
  subject: string;
  recipeVersion: number;
  recipeHash: string;
  signOff: SignOffState;
  rows: PooledRow[];
}

/** Covariate name → subject code → value. */
export type Covariates = Map<string, Map<string, number>>;

export { ANNOTATION_COLUMNS };

/** The contract's values table of the normalized values (rows with a null value are left out), for runDesign. */
export function toTidyValues(sessions: PooledSession[], covariates: Covariates): TidyValues {
  const levels = Object.fromEntries(KEY_COLUMNS.map((k) => [k, [] as string[]])) as unknown as Record<KeyColumn, string[]>;
  const sets = Object.fromEntries(KEY_COLUMNS.map((k) => [k, new Set<string>()])) as unknown as Record<KeyColumn, Set<string>>;
  const rows: TidyValues['rows'] = [];
  let line = 1;
  for (const s of sessions) {
    for (const r of s.rows) {
      line++;
      if (r.normalized === null) continue;
      for (const k of KEY_COLUMNS) {
        if (!sets[k].has(r[k])) {
          sets[k].add(r[k]);
          levels[k].push(r[k]);
        }
      }
      rows.push({ subject: r.subject, condition: r.condition, band: r.band, window: r.window, channel: r.channel, value: r.normalized, line });
    }
  }
  const present = new Set(sessions.map((s) => s.subject));
  const cov = new Map<string, Map<string, number>>();
  for (const [name, bySubject] of covariates) {
    // Only covariates every pooled subject has enter the table: the contract needs one value per subject.
    if ([...present].every((s) => bySubject.has(s))) cov.set(name, new Map([...bySubject].filter(([s]) => present.has(s))));
  }
  return { rows, covariates: cov, levels };
}

/**
 * The tidy CSV (RFC 4180, by papaparse): the statistics contract's `subject,condition,band,window,channel,value`,
 * then `recipe_hash` and `sign_off` per row, then one column per covariate that every subject has. Rows whose
 * normalized value is undefined (null) are left out, as the contract's values are finite numbers.
 */
export function tidyCsv(sessions: PooledSession[], covariates: Covariates): string {
  const present = new Set(sessions.map((s) => s.subject));
  const names = [...covariates.keys()].filter((n) => [...present].every((s) => covariates.get(n)!.has(s)));
  const fields = [...KEY_COLUMNS, 'value', ...ANNOTATION_COLUMNS, ...names];
  const data: (string | number)[][] = [];
  for (const s of sessions) {
    for (const r of s.rows) {
      if (r.normalized === null) continue;
      data.push([r.subject, r.condition, r.band, r.window, r.channel, r.normalized, s.recipeHash, s.signOff, ...names.map((n) => covariates.get(n)!.get(s.subject)!)]);
    }
  }
  return Papa.unparse({ fields, data }, { newline: '\n' }) + '\n';
}

export interface GroupCell {
  condition: string;
  band: string;
  window: string;
  channel: string;
  n: number;
  mean: number;
  /** Sample SD (n − 1); null for n < 2. */
  sd: number | null;
  se: number | null;
  /** mean ± t(0.975, n − 1)·se; null for n < 2. */
  ci95: [number, number] | null;
  /** Each subject's value, in session order. */
  values: { subject: string; value: number }[];
}

/**
 * Descriptive group values per condition × band × window × channel over the subjects that have a value there:
 * mean m = Σx/n, sample SD s = √(Σ(x − m)²/(n − 1)), SE s/√n, 95 % CI m ± t(0.975, n − 1)·SE (Student's t from
 * jstat). Cells are in order of first appearance. `which` picks normalized values or raw power.
 */
export function groupCells(sessions: PooledSession[], which: 'normalized' | 'raw' = 'normalized'): GroupCell[] {
  const cells = new Map<string, GroupCell>();
  for (const s of sessions) {
    for (const r of s.rows) {
      const v = r[which];
      if (v === null || !Number.isFinite(v)) continue;
      const key = JSON.stringify([r.condition, r.band, r.window, r.channel]);
      let cell = cells.get(key);
      if (cell === undefined) {
        cell = { condition: r.condition, band: r.band, window: r.window, channel: r.channel, n: 0, mean: NaN, sd: null, se: null, ci95: null, values: [] };
        cells.set(key, cell);
      }
      cell.values.push({ subject: r.subject, value: v });
    }
  }
  for (const cell of cells.values()) {
    const n = cell.values.length;
    let sum = 0;
    for (const { value } of cell.values) sum += value;
    const mean = sum / n;
    cell.n = n;
    cell.mean = mean;
    if (n >= 2) {
      let ss = 0;
      for (const { value } of cell.values) ss += (value - mean) * (value - mean);
      const sd = Math.sqrt(ss / (n - 1));
      const se = sd / Math.sqrt(n);
      const half = studentTQuantile(0.975, n - 1) * se;
      cell.sd = sd;
      cell.se = se;
      cell.ci95 = [mean - half, mean + half];
    }
  }
  return [...cells.values()];
}

/**
 * Rows of one channel set averaged per subject: a new channel `label` whose value is the mean over `channels`
 * of the subject's values (a channel the subject lacks, or a null value, is left out of that subject's mean).
 */
export function averageChannels(session: PooledSession, channels: string[], label: string): PooledRow[] {
  const wanted = new Set(channels);
  const acc = new Map<string, { row: PooledRow; raw: number[]; normalized: number[] }>();
  for (const r of session.rows) {
    if (!wanted.has(r.channel)) continue;
    const key = JSON.stringify([r.condition, r.band, r.window]);
    let a = acc.get(key);
    if (a === undefined) acc.set(key, (a = { row: { ...r, channel: label }, raw: [], normalized: [] }));
    if (r.raw !== null) a.raw.push(r.raw);
    if (r.normalized !== null) a.normalized.push(r.normalized);
  }
  const mean = (xs: number[]) => (xs.length === 0 ? null : xs.reduce((x, y) => x + y, 0) / xs.length);
  return [...acc.values()].map((a) => ({ ...a.row, raw: mean(a.raw), normalized: mean(a.normalized) }));
}
