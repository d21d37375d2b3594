/**
 * Reads a covariate table from CSV: a header `subject,<name>,<name>…`, then one row per subject code with a number
 * (or nothing: not known) per name. Errors name the row (1-based line of the file) and the column.
 */
import Papa from 'papaparse';

export class CovariateCsvError extends Error {
  constructor(readonly row: number, readonly column: string | null, problem: string) {
    super(`row ${row}${column === null ? '' : `, column "${column}"`}: ${problem}`);
    this.name = 'CovariateCsvError';
  }
}

const NUMBER = /^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/;
const NAME = /^[A-Za-z][A-Za-z0-9_]*$/;
const RESERVED = new Set(['subject', 'condition', 'band', 'window', 'channel', 'value', 'recipe_hash', 'sign_off']);

export interface CovariateTable {
  names: string[];
  rows: { subject: string; values: (number | null)[] }[];
}

export function parseCovariatesCsv(text: string, knownSubjects: readonly string[]): CovariateTable {
  const body = text.charCodeAt(0) === 0xfeff ? text.slice(1) : text;
  if (body.trim() === '') throw new CovariateCsvError(1, null, 'the file is empty; it needs a header such as subject,age,group');
  const parsed = Papa.parse<string[]>(body, { skipEmptyLines: 'greedy' });
  if (parsed.errors.length > 0) {
    const e = parsed.errors[0];
    throw new CovariateCsvError((e.row ?? 0) + 1, null, `cannot be read as CSV (${e.message})`);
  }
  const [header, ...lines] = parsed.data;
  if (!header) throw new CovariateCsvError(1, null, 'the file is empty; it needs a header such as subject,age,group');
  const cols = header.map((h) => h.trim());
  const subjectAt = cols.findIndex((c) => c.toLowerCase() === 'subject');
  if (subjectAt < 0) throw new CovariateCsvError(1, null, 'has no column "subject" (the header needs subject and one column per covariate)');
  const names: string[] = [];
  const seen = new Set<string>();
  cols.forEach((c, i) => {
    if (i === subjectAt) return;
    if (!NAME.test(c) || c.length > 32) throw new CovariateCsvError(1, c, 'is not a covariate name: start with a letter, then letters, digits or _ (at most 32)');
    if (RESERVED.has(c.toLowerCase())) throw new CovariateCsvError(1, c, 'is a column the export already has; choose another name');
    if (seen.has(c.toLowerCase())) throw new CovariateCsvError(1, c, 'is named twice');
    seen.add(c.toLowerCase());
    names.push(c);
  });
  if (names.length > 16) throw new CovariateCsvError(1, names[16], 'is one covariate too many (at most 16)');
  const known = new Set(knownSubjects);
  const subjects = new Map<string, number>();
  const rows = lines.map((cells, k) => {
    const row = k + 2;
    if (cells.length !== cols.length) throw new CovariateCsvError(row, null, `has ${cells.length} cells but the header has ${cols.length} columns`);
    const subject = cells[subjectAt].trim();
    if (subject === '') throw new CovariateCsvError(row, 'subject', 'is empty');
    if (!known.has(subject)) throw new CovariateCsvError(row, 'subject', `"${subject}" is not a subject of this study`);
    const before = subjects.get(subject);
    if (before !== undefined) throw new CovariateCsvError(row, 'subject', `"${subject}" was already given on row ${before}`);
    subjects.set(subject, row);
    const values = cols.flatMap((c, i) => {
      if (i === subjectAt) return [];
      const t = cells[i].trim();
      if (t === '' || t.toLowerCase() === 'n/a' || t.toLowerCase() === 'na') return [null];
      if (!NUMBER.test(t) || !Number.isFinite(Number(t))) throw new CovariateCsvError(row, c, `${JSON.stringify(t)} is not a number (code a group as numbers, e.g. 0 and 1)`);
      return [Number(t)];
    });
    return { subject, values };
  });
  return { names, rows };
}
