/**
 * The statistics contract's design.json and the tests it names, run on a values table (tidy-values.ts). Cells are
 * band × window × channel; a cell missing for some subjects is tested on the subjects that have it.
 */
import { z } from '../analysis/zod';
import { benjaminiHochberg } from './fdr';
import { StatisticsInputError } from './errors';
import { linearRegression } from './regression';
import { repeatedMeasuresAnova } from './rm-anova';
import { oneSampleTest } from './t-tests';
import { KEY_COLUMNS, type KeyColumn, type TidyRow, type TidyValues } from './tidy-values';

const name = z.string().min(1, 'must not be empty');
const finite = z.number().refine(Number.isFinite, 'must be a finite number');

const OneSample = z.object({ name, kind: z.literal('one-sample'), condition: name }).strict();
const Paired = z
  .object({ name, kind: z.literal('paired'), conditions: z.tuple([name, name]) })
  .strict()
  .refine((t) => t.conditions[0] !== t.conditions[1], { message: 'must name two different conditions', path: ['conditions'] });
const Regression = z.object({ name, kind: z.literal('regression'), condition: name, covariate: name }).strict();
const RepeatedAnova = z
  .object({
    name,
    kind: z.literal('repeated-anova'),
    factors: z.array(z.enum(KEY_COLUMNS.filter((k) => k !== 'subject') as ['condition', 'band', 'window', 'channel'])).min(1, 'must name at least one factor'),
    condition: name.optional(),
    band: name.optional(),
    window: name.optional(),
    channel: name.optional(),
  })
  .strict()
  .superRefine((t, ctx) => {
    const seen = new Set<string>();
    t.factors.forEach((f, i) => {
      if (seen.has(f)) ctx.addIssue({ code: 'custom', message: `names "${f}" twice`, path: ['factors', i] });
      seen.add(f);
      if (t[f] !== undefined) ctx.addIssue({ code: 'custom', message: `is a factor of this test, so it cannot also be fixed to "${t[f]}"`, path: [f] });
    });
  });

const TestSchema = z.discriminatedUnion('kind', [OneSample, Paired, Regression, RepeatedAnova]);

export const DesignSchema = z
  .object({
    neutral: finite,
    fdr: z.number().gt(0, 'must lie between 0 and 1').lt(1, 'must lie between 0 and 1'),
    /** Extension: the seed of the map test's random flips (more than 12 subjects). */
    seed: z.number().int('must be an integer').min(0, 'must be ≥ 0').max(0xffffffff, 'must fit in 32 bits').optional(),
    tests: z.array(TestSchema),
  })
  .strict()
  .superRefine((d, ctx) => {
    const names = new Map<string, number>();
    d.tests.forEach((t, i) => {
      const before = names.get(t.name);
      if (before !== undefined) ctx.addIssue({ code: 'custom', message: `"${t.name}" is already the name of tests[${before}]`, path: ['tests', i, 'name'] });
      names.set(t.name, i);
    });
  });

export type Design = z.output<typeof DesignSchema>;
export type DesignTest = Design['tests'][number];

/** `["tests", 1, "conditions", 0]` → `tests[1].conditions[0]`; keys that are not identifiers are quoted. */
export function fieldPath(path: readonly PropertyKey[], root: string): string {
  let out = '';
  for (const key of path) {
    if (typeof key === 'number') out += `[${key}]`;
    else if (!/^[A-Za-z_$][\w$]*$/.test(String(key))) out += `[${JSON.stringify(String(key))}]`;
    else out += out === '' ? String(key) : `.${String(key)}`;
  }
  return out === '' ? root : out;
}

/** Checks `input` against `schema`; throws StatisticsInputError naming the first bad field (and counting the rest). */
export function parseWith<S extends z.ZodType>(schema: S, input: unknown, source: 'design' | 'maps'): z.output<S> {
  const parsed = schema.safeParse(input);
  if (parsed.success) return parsed.data;
  const [first, ...rest] = parsed.error.issues;
  const more = rest.length > 0 ? ` (and ${rest.length} more problem${rest.length > 1 ? 's' : ''})` : '';
  throw new StatisticsInputError(fieldPath(first.path, source), `${first.message}${more}`, source);
}

export interface TTestCell {
  band: string;
  window: string;
  channel: string;
  n: number;
  mean: number | null;
  sd: number | null;
  se: number | null;
  t: number | null;
  df: number | null;
  p: number | null;
  ci95: [number, number] | null;
  dz: number | null;
  q: number | null;
  discovery: boolean;
}

export interface RegressionCell {
  band: string;
  window: string;
  channel: string;
  n: number;
  slope: number | null;
  intercept: number | null;
  r: number | null;
  t: number | null;
  df: number | null;
  p: number | null;
  q: number | null;
  discovery: boolean;
}

export interface AnovaEffectOut {
  effect: string;
  F: number;
  df1: number;
  df2: number;
  p: number;
  eta2p: number;
  epsilon: number;
  pGG: number;
}

export type TestResult =
  | { name: string; kind: 'one-sample' | 'paired'; cells: TTestCell[] }
  | { name: string; kind: 'regression'; cells: RegressionCell[] }
  | { name: string; kind: 'repeated-anova'; n: number; effects: AnovaEffectOut[] };

export interface DesignResult {
  tests: TestResult[];
  warnings: string[];
}

const nullable = (x: number) => (Number.isFinite(x) ? x : null);

/** Rows grouped by cell (band × window × channel) in the order the table lists bands, windows and channels. */
function cellsOf(table: TidyValues, condition: string): { band: string; window: string; channel: string; bySubject: Map<string, number> }[] {
  const cells = new Map<string, { band: string; window: string; channel: string; bySubject: Map<string, number> }>();
  for (const row of table.rows) {
    if (row.condition !== condition) continue;
    const key = cellKey(row);
    let cell = cells.get(key);
    if (cell === undefined) {
      cell = { band: row.band, window: row.window, channel: row.channel, bySubject: new Map() };
      cells.set(key, cell);
    }
    cell.bySubject.set(row.subject, row.value);
  }
  const rank = (k: KeyColumn, v: string) => table.levels[k].indexOf(v);
  return [...cells.values()].sort(
    (a, b) => rank('band', a.band) - rank('band', b.band) || rank('window', a.window) - rank('window', b.window) || rank('channel', a.channel) - rank('channel', b.channel),
  );
}

function requireLevel(table: TidyValues, column: KeyColumn, value: string, field: string): void {
  if (!table.levels[column].includes(value)) {
    const known = table.levels[column];
    const list = known.length > 8 ? `${known.slice(0, 8).join(', ')}, …` : known.join(', ');
    throw new StatisticsInputError(field, `${column} "${value}" is not in the values (they have: ${list})`, 'design');
  }
}

const cellName = (c: { band: string; window: string; channel: string }) => `${c.band}/${c.window}/${c.channel}`;
/** A collision-free key of a cell (names may hold '/'). */
const cellKey = (c: { band: string; window: string; channel: string }) => JSON.stringify([c.band, c.window, c.channel]);

function applyFdr<T extends { p: number | null; q: number | null; discovery: boolean }>(cells: T[], fdr: number): void {
  const q = benjaminiHochberg(cells.map((c) => (c.p === null ? NaN : c.p)));
  cells.forEach((c, i) => {
    c.q = Number.isNaN(q[i]) ? null : q[i];
    c.discovery = c.q !== null && c.q <= fdr;
  });
}

function tTestCells(table: TidyValues, test: Extract<DesignTest, { kind: 'one-sample' | 'paired' }>, design: Design, warnings: string[]): TTestCell[] {
  const first = test.kind === 'one-sample' ? test.condition : test.conditions[0];
  const second = test.kind === 'paired' ? cellsOf(table, test.conditions[1]) : null;
  const secondByKey = new Map((second ?? []).map((c) => [cellKey(c), c]));
  const out: TTestCell[] = [];
  const cells = cellsOf(table, first);
  const keys = new Set(cells.map(cellKey));
  if (test.kind === 'paired') {
    for (const c of second ?? []) {
      if (!keys.has(cellKey(c))) warnings.push(`test "${test.name}": cell ${cellName(c)} has values for "${test.conditions[1]}" only; not tested`);
    }
  }
  for (const cell of cells) {
    const x: number[] = [];
    if (second === null) {
      for (const v of cell.bySubject.values()) x.push(v - design.neutral);
    } else {
      const other = secondByKey.get(cellKey(cell));
      for (const [subject, v] of cell.bySubject) {
        const w = other?.bySubject.get(subject);
        if (w !== undefined) x.push(v - w);
      }
    }
    const base = { band: cell.band, window: cell.window, channel: cell.channel, n: x.length };
    const fdr = { q: null, discovery: false };
    if (x.length < 2) {
      warnings.push(`test "${test.name}": cell ${cellName(cell)} has ${x.length} subject${x.length === 1 ? '' : 's'}${second === null ? '' : ' with both conditions'}; a t-test needs 2`);
      out.push({ ...base, mean: x.length === 1 ? x[0] : null, sd: null, se: null, t: null, df: null, p: null, ci95: null, dz: null, ...fdr });
      continue;
    }
    const r = oneSampleTest(x);
    if (!(r.sd > 0)) warnings.push(`test "${test.name}": cell ${cellName(cell)} has the same value for every subject; t is undefined`);
    out.push({
      ...base,
      mean: r.mean,
      sd: r.sd,
      se: r.se,
      t: nullable(r.t),
      df: r.df,
      p: r.sd > 0 ? r.p : null,
      ci95: r.ci95,
      dz: nullable(r.dz),
      ...fdr,
    });
  }
  applyFdr(out, design.fdr);
  return out;
}

function regressionCells(table: TidyValues, test: Extract<DesignTest, { kind: 'regression' }>, design: Design, warnings: string[]): RegressionCell[] {
  const covariate = table.covariates.get(test.covariate)!;
  const out: RegressionCell[] = [];
  for (const cell of cellsOf(table, test.condition)) {
    const x: number[] = [];
    const y: number[] = [];
    for (const [subject, v] of cell.bySubject) {
      x.push(covariate.get(subject)!);
      y.push(v);
    }
    const base = { band: cell.band, window: cell.window, channel: cell.channel, n: x.length };
    const fdr = { q: null, discovery: false };
    const empty = { slope: null, intercept: null, r: null, t: null, df: null, p: null };
    if (x.length < 3) {
      warnings.push(`test "${test.name}": cell ${cellName(cell)} has ${x.length} subject${x.length === 1 ? '' : 's'}; a regression needs 3`);
      out.push({ ...base, ...empty, ...fdr });
      continue;
    }
    if (x.every((v) => v === x[0])) {
      warnings.push(`test "${test.name}": covariate "${test.covariate}" is the same for every subject of cell ${cellName(cell)}; no slope`);
      out.push({ ...base, ...empty, ...fdr });
      continue;
    }
    const r = linearRegression(x, y);
    out.push({ ...base, slope: r.slope, intercept: r.intercept, r: nullable(r.r), t: nullable(r.t), df: r.df, p: nullable(r.p), ...fdr });
  }
  applyFdr(out, design.fdr);
  return out;
}

function anova(table: TidyValues, test: Extract<DesignTest, { kind: 'repeated-anova' }>, index: number, warnings: string[]): TestResult {
  const fixed = (['condition', 'band', 'window', 'channel'] as const).filter((k) => test[k] !== undefined);
  for (const k of fixed) requireLevel(table, k, test[k]!, `tests[${index}].${k}`);
  const rows = table.rows.filter((r) => fixed.every((k) => r[k] === test[k]));
  const averaged = (['condition', 'band', 'window', 'channel'] as const).filter((k) => !test.factors.includes(k) && test[k] === undefined);
  const levelsOf = (k: KeyColumn) => table.levels[k].filter((v) => rows.some((r) => r[k] === v));
  const factorLevels = test.factors.map(levelsOf);
  test.factors.forEach((f, i) => {
    if (factorLevels[i].length < 2) {
      throw new StatisticsInputError(`tests[${index}].factors[${i}]`, `("${f}") has ${factorLevels[i].length} level${factorLevels[i].length === 1 ? '' : 's'} in the values it selects; a factor needs 2`, 'design');
    }
  });
  const averagedLevels = averaged.map(levelsOf);
  const cells = factorLevels.reduce((a, l) => a * l.length, 1);
  const inner = averagedLevels.reduce((a, l) => a * l.length, 1);
  // Subject → per cell: sum and count over the averaged dimensions; complete = every cell × averaged level present.
  const bySubject = new Map<string, { sum: Float64Array; count: Int32Array }>();
  const position = (levels: string[][], keys: KeyColumn[], row: TidyRow) =>
    keys.reduce((acc, k, i) => acc * levels[i].length + levels[i].indexOf(row[k]), 0);
  for (const row of rows) {
    let s = bySubject.get(row.subject);
    if (s === undefined) {
      s = { sum: new Float64Array(cells), count: new Int32Array(cells) };
      bySubject.set(row.subject, s);
    }
    const c = position(factorLevels, test.factors, row);
    s.sum[c] += row.value;
    s.count[c]++;
  }
  const complete: string[] = [];
  const dropped: string[] = [];
  for (const [subject, s] of bySubject) (s.count.every((k) => k === inner) ? complete : dropped).push(subject);
  if (dropped.length > 0) {
    warnings.push(`test "${test.name}": ${dropped.length} subject${dropped.length > 1 ? 's' : ''} left out for missing cells (${dropped.join(', ')})`);
  }
  if (complete.length < 2) {
    throw new StatisticsInputError(`tests[${index}]`, `has ${complete.length} complete subject${complete.length === 1 ? '' : 's'}; the ANOVA needs 2`, 'design');
  }
  const values = new Float64Array(complete.length * cells);
  complete.forEach((subject, i) => {
    const s = bySubject.get(subject)!;
    for (let c = 0; c < cells; c++) values[i * cells + c] = s.sum[c] / inner;
  });
  const r = repeatedMeasuresAnova({
    factors: test.factors.map((f, i) => ({ name: f, levels: factorLevels[i].length })),
    nSubjects: complete.length,
    values,
  });
  return {
    name: test.name,
    kind: 'repeated-anova',
    n: r.n,
    effects: r.effects.map(({ effect, F, df1, df2, p, eta2p, epsilon, pGG }) => ({ effect, F, df1, df2, p, eta2p, epsilon, pGG })),
  };
}

/** Checks that every condition, covariate and fixed level the design names is in the table. */
export function checkDesignAgainst(table: TidyValues, design: Design): void {
  design.tests.forEach((test, i) => {
    if (test.kind === 'one-sample' || test.kind === 'regression') requireLevel(table, 'condition', test.condition, `tests[${i}].condition`);
    if (test.kind === 'paired') test.conditions.forEach((c, j) => requireLevel(table, 'condition', c, `tests[${i}].conditions[${j}]`));
    if (test.kind === 'regression' && !table.covariates.has(test.covariate)) {
      const known = [...table.covariates.keys()];
      throw new StatisticsInputError(
        `tests[${i}].covariate`,
        `"${test.covariate}" is not a column of the values (${known.length === 0 ? 'they have no covariate columns' : `covariates: ${known.join(', ')}`})`,
        'design',
      );
    }
  });
}

/** Runs every test of a checked design on the table; bad references throw StatisticsInputError (source `design`). */
export function runDesign(table: TidyValues, design: Design): DesignResult {
  checkDesignAgainst(table, design);
  const warnings: string[] = [];
  const tests = design.tests.map((test, i): TestResult => {
    switch (test.kind) {
      case 'one-sample':
      case 'paired':
        return { name: test.name, kind: test.kind, cells: tTestCells(table, test, design, warnings) };
      case 'regression':
        return { name: test.name, kind: 'regression', cells: regressionCells(table, test, design, warnings) };
      case 'repeated-anova':
        return anova(table, test, i, warnings);
    }
  });
  return { tests, warnings };
}
