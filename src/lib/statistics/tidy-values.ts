/**
 * The statistics contract's values.csv: a header row, then one row per subject × condition × band × window ×
 * channel with `subject,condition,band,window,channel,value` and any further columns, each a numeric per-subject
 * covariate. Pure (papaparse on a string), so a page can read the same file the command line reads.
 *
 * Extension (DEVELOPERS.md, "How we read and extend the statistics contract"): the columns `recipe_hash` and
 * `sign_off`, which the Cohort screen's export adds to every row, say where a row came from; they are read as text
 * and never taken as covariates.
 */
import Papa from 'papaparse';
import { StatisticsInputError } from './errors';

export const KEY_COLUMNS = ['subject', 'condition', 'band', 'window', 'channel'] as const;
/** Per-row provenance the tidy export adds: not covariates (see the file's header). */
export const ANNOTATION_COLUMNS = ['recipe_hash', 'sign_off'] as const;
export type KeyColumn = (typeof KEY_COLUMNS)[number];

export interface TidyRow {
  subject: string;
  condition: string;
  band: string;
  window: string;
  channel: string;
  value: number;
  /** 1-based line in the file, for messages. */
  line: number;
}

export interface TidyValues {
  rows: TidyRow[];
  /** Covariate name → subject → value. */
  covariates: Map<string, Map<string, number>>;
  /** Distinct values of each key column, in order of first appearance. */
  levels: Record<KeyColumn, string[]>;
}

const NUMBER = /^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/;

const where = (line: number, column: string) => `line ${line}, column "${column}"`;

/**
 * Parses values.csv text. Throws StatisticsInputError (source `values`) naming the line and column of the first
 * problem: a missing or repeated column, a ragged row, a value or covariate that is not a finite number, a
 * covariate that differs within a subject, an empty key, a row repeated for the same subject and cell.
 */
export function parseTidyValues(text: string): TidyValues {
  const body = text.charCodeAt(0) === 0xfeff ? text.slice(1) : text;
  const fail = (field: string, problem: string): never => {
    throw new StatisticsInputError(field, problem, 'values');
  };
  let header: string[] | null = null;
  let index: Record<string, number> = {};
  let covariateColumns: string[] = [];
  const rows: TidyRow[] = [];
  const covariates = new Map<string, Map<string, number>>();
  const covariateLine = new Map<string, Map<string, number>>();
  const seen = new Map<string, number>();
  const levels = Object.fromEntries(KEY_COLUMNS.map((k) => [k, [] as string[]])) as unknown as Record<KeyColumn, string[]>;
  const levelSets = Object.fromEntries(KEY_COLUMNS.map((k) => [k, new Set<string>()])) as unknown as Record<KeyColumn, Set<string>>;
  let line = 0;
  let newlinesBefore = 0; // in body[0 … cursor), so a quoted cell spanning lines keeps later line numbers right
  let cursor = 0;
  let failure: unknown = null;

  Papa.parse<string[]>(body, {
    delimiter: ',',
    skipEmptyLines: false,
    step(results, parser) {
      line = newlinesBefore + 1;
      const end = results.meta.cursor;
      for (let i = cursor; i < end; i++) if (body.charCodeAt(i) === 10) newlinesBefore++;
      cursor = end;
      try {
        const cells = results.data;
        if (results.errors.length > 0) fail(`line ${line}`, `cannot be read as CSV (${results.errors[0].message})`);
        if (cells.length === 0 || (cells.length === 1 && cells[0].trim() === '')) return; // blank line
        if (header === null) {
          header = cells.map((c) => c.trim());
          header.forEach((name, i) => {
            if (name === '') fail(`line ${line}, column ${i + 1}`, 'has an empty column name');
            if (name in index) fail(where(line, name), `is named twice (columns ${index[name] + 1} and ${i + 1})`);
            index[name] = i;
          });
          for (const k of [...KEY_COLUMNS, 'value']) {
            if (!(k in index)) fail(`line ${line}`, `has no column "${k}" (the header needs subject,condition,band,window,channel,value)`);
          }
          covariateColumns = header.filter((h) => !(KEY_COLUMNS as readonly string[]).includes(h) && h !== 'value' && !(ANNOTATION_COLUMNS as readonly string[]).includes(h));
          for (const c of covariateColumns) {
            covariates.set(c, new Map());
            covariateLine.set(c, new Map());
          }
          return;
        }
        const names: string[] = header;
        if (cells.length !== names.length) {
          fail(`line ${line}`, `has ${cells.length} cells but the header has ${names.length} columns`);
        }
        const key = {} as Record<KeyColumn, string>;
        for (const k of KEY_COLUMNS) {
          const v = cells[index[k]].trim();
          if (v === '') fail(where(line, k), 'is empty');
          key[k] = v;
        }
        const raw = cells[index.value].trim();
        if (!NUMBER.test(raw)) fail(where(line, 'value'), `${JSON.stringify(raw)} is not a finite number`);
        const value = Number(raw);
        if (!Number.isFinite(value)) fail(where(line, 'value'), `${JSON.stringify(raw)} is not a finite number`);
        const id = JSON.stringify(KEY_COLUMNS.map((k) => key[k]));
        const earlier = seen.get(id);
        if (earlier !== undefined) {
          fail(`line ${line}`, `repeats subject "${key.subject}", condition "${key.condition}", band "${key.band}", window "${key.window}", channel "${key.channel}" of line ${earlier}`);
        }
        seen.set(id, line);
        for (const c of covariateColumns) {
          const text = cells[index[c]].trim();
          if (!NUMBER.test(text) || !Number.isFinite(Number(text))) {
            fail(where(line, c), `${JSON.stringify(text)} is not a number (every further column is a numeric per-subject covariate)`);
          }
          const v = Number(text);
          const bySubject = covariates.get(c)!;
          const before = bySubject.get(key.subject);
          if (before === undefined) {
            bySubject.set(key.subject, v);
            covariateLine.get(c)!.set(key.subject, line);
          } else if (before !== v) {
            fail(where(line, c), `gives subject "${key.subject}" ${text}, but line ${covariateLine.get(c)!.get(key.subject)} gave ${before}; a covariate holds one value per subject`);
          }
        }
        for (const k of KEY_COLUMNS) {
          if (!levelSets[k].has(key[k])) {
            levelSets[k].add(key[k]);
            levels[k].push(key[k]);
          }
        }
        rows.push({ ...key, value, line });
      } catch (error) {
        failure = error;
        parser.abort();
      }
    },
  });
  if (failure !== null) throw failure;
  if (header === null) fail('line 1', 'is missing: the file is empty (it needs the header subject,condition,band,window,channel,value)');
  if (rows.length === 0) fail('line 2', 'is missing: the file has a header but no rows');
  return { rows, covariates, levels };
}
