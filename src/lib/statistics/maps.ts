/**
 * The statistics contract's maps.json (group maps for the cluster-based permutation test) and the `clusters` part
 * of the result: `{ times, frequencies, subjects: { <code>: { <condition>: [[f][t]] } }, test }`.
 */
import { z } from '../analysis/zod';
import { StatisticsInputError } from './errors';
import { EXACT_MAX_SUBJECTS, type MapTestInput, type MapTestResult } from './map-test';

const finite = z.number().refine(Number.isFinite, 'must be a finite number');
const name = z.string().min(1, 'must not be empty');

export const MapsSchema = z
  .object({
    times: z.array(finite).min(1, 'must list at least one time'),
    frequencies: z.array(finite).min(1, 'must list at least one frequency'),
    subjects: z.record(z.string().min(1), z.record(z.string().min(1), z.array(z.array(finite)))),
    test: z.discriminatedUnion('kind', [
      z
        .object({
          kind: z.literal('one-sample'),
          condition: name,
          neutral: finite.optional(),
          alpha: z.number().gt(0, 'must lie between 0 and 1').lt(1, 'must lie between 0 and 1').optional(),
          seed: z.number().int('must be an integer').min(0).max(0xffffffff).optional(),
        })
        .strict(),
      z
        .object({
          kind: z.literal('paired'),
          conditions: z.tuple([name, name]),
          neutral: finite.optional(),
          alpha: z.number().gt(0, 'must lie between 0 and 1').lt(1, 'must lie between 0 and 1').optional(),
          seed: z.number().int('must be an integer').min(0).max(0xffffffff).optional(),
        })
        .strict(),
    ]),
  })
  .strict();

export type Maps = z.output<typeof MapsSchema>;

export interface PreparedMapTest {
  input: MapTestInput;
  /** Subject codes in the order of `input.values`. */
  subjects: string[];
  warnings: string[];
}

const key = (s: string) => (/^[A-Za-z_$][\w$]*$/.test(s) ? `.${s}` : `[${JSON.stringify(s)}]`);

/**
 * Builds the map test's input: the subjects that have the test's condition (both, when paired), x = map − neutral
 * or first − second, each map checked for F rows of T values. `neutral` and `seed` fall back to the design's.
 * Throws StatisticsInputError (source `maps`, or `design` for a seed conflict) naming the field.
 */
export function prepareMapTest(maps: Maps, design: { neutral: number; seed?: number }): PreparedMapTest {
  const nF = maps.frequencies.length;
  const nT = maps.times.length;
  const points = nF * nT;
  const { test } = maps;
  const wanted = test.kind === 'one-sample' ? [test.condition] : test.conditions;
  const codes = Object.keys(maps.subjects);
  wanted.forEach((c, j) => {
    if (!codes.some((s) => c in maps.subjects[s])) {
      const field = test.kind === 'one-sample' ? 'test.condition' : `test.conditions[${j}]`;
      const known = [...new Set(codes.flatMap((s) => Object.keys(maps.subjects[s])))];
      throw new StatisticsInputError(field, `"${c}" is not a condition of any subject's maps (they have: ${known.join(', ') || 'none'})`, 'maps');
    }
  });
  if (test.seed !== undefined && design.seed !== undefined && test.seed !== design.seed) {
    throw new StatisticsInputError('seed', `is ${design.seed} but the maps' test.seed is ${test.seed}; give one seed`, 'design');
  }
  const warnings: string[] = [];
  const included: string[] = [];
  const missing: string[] = [];
  const neutral = test.neutral ?? design.neutral;
  const rows: Float64Array[] = [];
  for (const code of codes) {
    const byCondition = maps.subjects[code];
    if (!wanted.every((c) => c in byCondition)) {
      missing.push(code);
      continue;
    }
    const flat = wanted.map((c) => {
      const map = byCondition[c];
      const field = `subjects${key(code)}${key(c)}`;
      if (map.length !== nF) throw new StatisticsInputError(field, `has ${map.length} rows; frequencies has ${nF}`, 'maps');
      const out = new Float64Array(points);
      map.forEach((row, f) => {
        if (row.length !== nT) throw new StatisticsInputError(`${field}[${f}]`, `has ${row.length} values; times has ${nT}`, 'maps');
        out.set(row, f * nT);
      });
      return out;
    });
    const x = new Float64Array(points);
    for (let p = 0; p < points; p++) x[p] = flat.length === 2 ? flat[0][p] - flat[1][p] : flat[0][p] - neutral;
    rows.push(x);
    included.push(code);
  }
  if (missing.length > 0) {
    warnings.push(`map test: ${missing.length} subject${missing.length > 1 ? 's' : ''} left out without ${wanted.map((c) => `"${c}"`).join(' and ')} (${missing.join(', ')})`);
  }
  if (included.length < 2) {
    throw new StatisticsInputError('subjects', `has ${included.length} subject${included.length === 1 ? '' : 's'} with ${wanted.map((c) => `"${c}"`).join(' and ')}; the map test needs 2`, 'maps');
  }
  const seed = test.seed ?? design.seed;
  if (included.length > EXACT_MAX_SUBJECTS && seed === undefined) {
    warnings.push(`map test: ${included.length} subjects need random sign flips and no seed was given; seed 1 was used`);
  }
  const values = new Float64Array(included.length * points);
  rows.forEach((r, s) => values.set(r, s * points));
  return {
    input: { values, nSubjects: included.length, nFrequencies: nF, nTimes: nT, alpha: test.alpha ?? 0.05, seed: seed ?? 1 },
    subjects: included,
    warnings,
  };
}

/** A cluster as the result JSON carries it: extents in the maps' own time and frequency units. */
export interface ClusterOut {
  sign: 1 | -1;
  mass: number;
  size: number;
  p: number;
  times: [number, number];
  frequencies: [number, number];
}

/** Extension of the result: how the map test ran (documented in DEVELOPERS.md). */
export interface MapTestSummary {
  n: number;
  subjects: string[];
  df: number;
  alpha: number;
  threshold: number;
  permutations: number;
  exact: boolean;
  seed: number | null;
}

export function clustersOut(result: MapTestResult, maps: Pick<Maps, 'times' | 'frequencies'>): ClusterOut[] {
  const span = (axis: number[], [a, b]: [number, number]): [number, number] => {
    const x = axis[a];
    const y = axis[b];
    return x <= y ? [x, y] : [y, x];
  };
  return result.clusters.map((c) => ({
    sign: c.sign,
    mass: c.mass,
    size: c.size,
    p: c.p,
    times: span(maps.times, c.timeRange),
    frequencies: span(maps.frequencies, c.frequencyRange),
  }));
}

export function mapTestSummary(result: MapTestResult, subjects: string[]): MapTestSummary {
  const { n, df, alpha, threshold, permutations, exact, seed } = result;
  return { n, subjects, df, alpha, threshold, permutations, exact, seed };
}
