// The cluster-based permutation test over group maps (Maris & Oostenveld, 2007, J Neurosci Methods 164:177–190),
// as the statistics contract defines it: per-point one-sample t of the subjects' x_i, clusters of |t| above the
// two-sided threshold joined by 4-connectivity (positive and negative apart), mass = Σt, null distribution = the
// largest |mass| of each sign-flip permutation; all 2^n flips when n ≤ 12, else seeded random flips.
//
// Speed: under a sign flip, Q = Σx² at a point does not change and S = Σ s_i·x_i does, so
// t² = S²(n − 1)/(nQ − S²) and |t| > c ⇔ S²·(n − 1 + c²) > c²·n·Q: a point is tested with one compare against a
// per-point bound, and t is computed only where it passes. S is read from per-group tables of every sign pattern
// of a few subjects (summed in subject order), so one flip costs one add per group and point, and every flip's S
// is computed the same way: the identity reproduces the observed map bit for bit and the complementary flip gives
// exactly −S. Only +, −, ×, ÷ and √ touch the map, so the masses are the same bits in every engine.
import { MapTestCancelledError, StatisticsInputError } from './errors';
import { studentTQuantile } from './distributions';
import { mulberry32 } from '../analysis/random';

/** Above this many subjects the null distribution comes from random flips (statistics contract). */
export const EXACT_MAX_SUBJECTS = 12;
/** Random flips when n > 12, the identity included as the first (contract: 10,000). */
export const RANDOM_FLIPS = 10_000;
/** Bytes the per-group sign tables may take. */
const TABLE_BYTES = 96 * 1024 * 1024;

export interface MapTestInput {
  /** x_i per subject and point, `[s·F·T + f·T + t]`: values minus neutral (one-sample) or first − second (paired). */
  values: Float64Array;
  nSubjects: number;
  nFrequencies: number;
  nTimes: number;
  /** Cluster-forming threshold: two-sided p of the point t. Default 0.05. */
  alpha?: number;
  /** Seed of the random flips (n > 12). Default 1. Ignored when the enumeration is exact. */
  seed?: number;
  /** Number of random flips (n > 12), the identity included. Default 10,000. */
  randomFlips?: number;
}

export interface MapTestOptions {
  /** Fraction of flips done, 0 … 1; called after each of `progressSteps` equal parts of the run. */
  onProgress?: (fraction: number) => void;
  /** Aborting ends the run with MapTestCancelledError at the next block of permutations. */
  signal?: AbortSignal;
  /**
   * Parts the run is cut into (default 20): progress is reported, the AbortSignal checked and, in the async run, the
   * event loop given a turn after each. Counted in flips, not time, so the core reads no clock.
   */
  progressSteps?: number;
}

export interface MapCluster {
  /** 1 for positive t, −1 for negative. */
  sign: 1 | -1;
  /** Σt over the cluster. */
  mass: number;
  /** Points in the cluster. */
  size: number;
  /** Share of permutations whose largest |mass| is ≥ |mass| (the identity counts, so p ≥ 1/permutations). */
  p: number;
  /** The value in `labels` that marks this cluster's points. */
  label: number;
  /** First and last frequency index the cluster touches. */
  frequencyRange: [number, number];
  /** First and last time index the cluster touches. */
  timeRange: [number, number];
}

export interface MapTestResult {
  n: number;
  df: number;
  alpha: number;
  /** t(1 − alpha/2, n − 1). */
  threshold: number;
  /** The observed t map, `[f·T + t]`. */
  t: Float64Array;
  /** Cluster label per point (0: none), `[f·T + t]`. */
  labels: Int32Array;
  /** Observed clusters, by ascending p, then descending |mass|. */
  clusters: MapCluster[];
  /** Number of permutations in the null distribution (2^n when exact). */
  permutations: number;
  exact: boolean;
  /** The seed of the random flips, null when exact. */
  seed: number | null;
  /** Largest |mass| of each permutation (0 when it has no cluster), in enumeration order; [0] is the identity. */
  nullDistribution: Float64Array;
}

/** The seeded generator of the random flips (it lives with the core's other seeded code). */
export { mulberry32 };

/**
 * Stacks per-subject maps into MapTestInput.values: `first[s][p] − neutral` (one-sample), or `first[s][p] −
 * second[s][p]` (paired). Every map must have F·T finite values.
 */
export function stackSubjectMaps(
  first: readonly ArrayLike<number>[],
  second: readonly ArrayLike<number>[] | null,
  points: number,
  neutral = 0,
): Float64Array {
  if (second !== null && second.length !== first.length) {
    throw new StatisticsInputError('second', `has ${second.length} subjects but first has ${first.length}`);
  }
  const out = new Float64Array(first.length * points);
  for (let s = 0; s < first.length; s++) {
    const a = first[s];
    const b = second === null ? null : second[s];
    if (a.length !== points || (b !== null && b.length !== points)) {
      throw new StatisticsInputError(`subject ${s}`, `has a map of ${b !== null && b.length !== points ? b.length : a.length} points, expected ${points}`);
    }
    for (let p = 0; p < points; p++) out[s * points + p] = b === null ? a[p] - neutral : a[p] - b[p];
  }
  return out;
}

interface Plan {
  n: number;
  nF: number;
  nT: number;
  points: number;
  alpha: number;
  threshold: number;
  exact: boolean;
  permutations: number;
  /**
   * Flips actually evaluated. Exact: 2^(n − 1), the flips that keep the last subject's sign; each one's complement
   * negates S exactly (every table row is summed in the same order), so it has the same largest |mass|.
   */
  evaluations: number;
  seed: number | null;
  /** Per group: first subject, subject count and the 2^count tables of S (`[code·P + p]`). */
  groups: { first: number; count: number; table: Float64Array }[];
  q: Float64Array;
  /** c²·n·Q per point. */
  bound: Float64Array;
}

/** Throws StatisticsInputError for input the map test cannot run on (callers may check before posting to a worker). */
export function checkMapTestInput(input: MapTestInput): void {
  const { nSubjects: n, nFrequencies: nF, nTimes: nT, values } = input;
  if (!(Number.isInteger(n) && n >= 2)) throw new StatisticsInputError('subjects', `needs at least 2 subjects for the map test, got ${n}`);
  if (!(Number.isInteger(nF) && nF >= 1 && Number.isInteger(nT) && nT >= 1)) {
    throw new StatisticsInputError('map', `needs at least one frequency and one time, got ${nF} × ${nT}`);
  }
  if (values.length !== n * nF * nT) {
    throw new StatisticsInputError('values', `has ${values.length} entries; ${n} subjects × ${nF} × ${nT} need ${n * nF * nT}`);
  }
  const alpha = input.alpha ?? 0.05;
  if (!(alpha > 0 && alpha < 1)) throw new StatisticsInputError('alpha', `must lie between 0 and 1, got ${alpha}`);
  const flips = input.randomFlips ?? RANDOM_FLIPS;
  if (!(Number.isInteger(flips) && flips >= 1)) throw new StatisticsInputError('randomFlips', `must be a positive integer, got ${flips}`);
  const seed = input.seed ?? 1;
  if (!Number.isInteger(seed)) throw new StatisticsInputError('seed', `must be an integer, got ${seed}`);
  const points = nF * nT;
  for (let i = 0; i < values.length; i++) {
    if (!Number.isFinite(values[i])) {
      const s = Math.floor(i / points);
      const p = i - s * points;
      throw new StatisticsInputError(`subject ${s}`, `has a non-finite value at frequency ${Math.floor(p / nT)}, time ${p % nT}`);
    }
  }
}

function planMapTest(input: MapTestInput): Plan {
  checkMapTestInput(input);
  const { nSubjects: n, nFrequencies: nF, nTimes: nT, values } = input;
  const points = nF * nT;
  const alpha = input.alpha ?? 0.05;
  const exact = n <= EXACT_MAX_SUBJECTS;
  const threshold = studentTQuantile(1 - alpha / 2, n - 1);

  // Fewest groups whose tables fit the budget, then the subjects spread evenly over them.
  let groupCount = Math.max(2, Math.ceil(n / 8));
  while (groupCount < n) {
    const size = Math.ceil(n / groupCount);
    if (groupCount * 2 ** size * points * 8 <= TABLE_BYTES) break;
    groupCount++;
  }
  const size = Math.ceil(n / groupCount);
  const groups: Plan['groups'] = [];
  for (let first = 0; first < n; first += size) {
    const count = Math.min(size, n - first);
    // Row c holds Σ_j ±x_(first+j) with bit j of c set meaning "flipped", summed in subject order: each subject
    // doubles the rows, the flipped copy first so the unflipped rows it reads are still untouched.
    const table = new Float64Array((1 << count) * points);
    const x0 = first * points;
    for (let p = 0; p < points; p++) {
      table[p] = values[x0 + p];
      table[points + p] = -values[x0 + p];
    }
    for (let j = 1; j < count; j++) {
      const from = (first + j) * points;
      const half = 1 << j;
      for (let c = 0; c < half; c++) {
        const lo = c * points;
        const hi = (c + half) * points;
        for (let p = 0; p < points; p++) {
          const v = values[from + p];
          table[hi + p] = table[lo + p] - v;
          table[lo + p] += v;
        }
      }
    }
    groups.push({ first, count, table });
  }

  const q = new Float64Array(points);
  for (let s = 0; s < n; s++) {
    for (let p = 0; p < points; p++) {
      const v = values[s * points + p];
      q[p] += v * v;
    }
  }
  const c2 = threshold * threshold;
  const bound = new Float64Array(points);
  for (let p = 0; p < points; p++) bound[p] = (c2 * n * q[p]) / (n - 1 + c2);
  const permutations = exact ? 2 ** n : (input.randomFlips ?? RANDOM_FLIPS);
  const evaluations = exact ? 2 ** (n - 1) : permutations;
  return { n, nF, nT, points, alpha, threshold, exact, permutations, evaluations, seed: exact ? null : (input.seed ?? 1), groups, q, bound };
}

/** Reusable buffers of one permutation's evaluation. */
class Evaluator {
  readonly s: Float64Array;
  readonly t: Float64Array;
  readonly mark: Int8Array;
  readonly supra: Int32Array;
  readonly stack: Int32Array;

  constructor(private readonly plan: Plan) {
    this.s = new Float64Array(plan.points);
    this.t = new Float64Array(plan.points);
    this.mark = new Int8Array(plan.points);
    this.supra = new Int32Array(plan.points);
    this.stack = new Int32Array(plan.points);
  }

  /**
   * Evaluates the flip given by one sign code per group; returns the largest |cluster mass| (0 without clusters).
   * With `labels`, also fills `t` everywhere, labels the clusters and reports them through `found`.
   */
  evaluate(codes: Int32Array, labels?: Int32Array, found?: (c: Omit<MapCluster, 'p'>) => void): number {
    const { points, groups, bound, q, n, nT, nF } = this.plan;
    const { s, t, mark, supra, stack } = this;
    // S = g0 + g1 (+ the other groups, summed first into s): the same order for every flip.
    const more = groups.length > 2;
    if (more) {
      s.fill(0);
      for (let g = 2; g < groups.length; g++) {
        const table = groups[g].table;
        const o = codes[g] * points;
        for (let p = 0; p < points; p++) s[p] += table[o + p];
      }
    }
    const g0 = groups[0].table;
    const g1 = groups[1].table;
    const o0 = codes[0] * points;
    const o1 = codes[1] * points;
    const nm1 = n - 1;
    let m = 0;
    // One pass: marks are only set here and every set mark is cleared by the cluster walk below, so the array
    // is all zero between flips and needs no reset.
    for (let p = 0; p < points; p++) {
      const sp = more ? g0[o0 + p] + g1[o1 + p] + s[p] : g0[o0 + p] + g1[o1 + p];
      const s2 = sp * sp;
      if (s2 > bound[p]) {
        const rest = n * q[p] - s2;
        t[p] = rest > 0 ? sp * Math.sqrt(nm1 / rest) : sp > 0 ? Infinity : -Infinity;
        mark[p] = sp > 0 ? 1 : -1;
        supra[m++] = p;
      }
    }
    if (labels !== undefined) {
      labels.fill(0);
      for (let p = 0; p < points; p++) {
        if (mark[p] === 0) {
          const sp = more ? g0[o0 + p] + g1[o1 + p] + s[p] : g0[o0 + p] + g1[o1 + p];
          const rest = n * q[p] - sp * sp;
          t[p] = rest > 0 ? sp * Math.sqrt(nm1 / rest) : sp === 0 ? 0 : sp > 0 ? Infinity : -Infinity;
        }
      }
    }
    let largest = 0;
    let label = 0;
    for (let i = 0; i < m; i++) {
      const start = supra[i];
      const sign = mark[start];
      if (sign === 0) continue;
      label++;
      mark[start] = 0;
      let top = 0;
      stack[top++] = start;
      let mass = 0;
      let size = 0;
      let f0 = nF;
      let f1 = -1;
      let t0 = nT;
      let t1 = -1;
      while (top > 0) {
        const p = stack[--top];
        mass += t[p];
        size++;
        const f = (p / nT) | 0;
        const tt = p - f * nT;
        if (labels !== undefined) {
          labels[p] = label;
          if (f < f0) f0 = f;
          if (f > f1) f1 = f;
          if (tt < t0) t0 = tt;
          if (tt > t1) t1 = tt;
        }
        if (tt > 0 && mark[p - 1] === sign) {
          mark[p - 1] = 0;
          stack[top++] = p - 1;
        }
        if (tt < nT - 1 && mark[p + 1] === sign) {
          mark[p + 1] = 0;
          stack[top++] = p + 1;
        }
        if (f > 0 && mark[p - nT] === sign) {
          mark[p - nT] = 0;
          stack[top++] = p - nT;
        }
        if (f < nF - 1 && mark[p + nT] === sign) {
          mark[p + nT] = 0;
          stack[top++] = p + nT;
        }
      }
      const abs = mass < 0 ? -mass : mass;
      if (abs > largest) largest = abs;
      found?.({ sign: sign as 1 | -1, mass, size, label, frequencyRange: [f0, f1], timeRange: [t0, t1] });
    }
    return largest;
  }
}

/** The sign codes of permutation `k` into `codes`: bits of k when exact, random bits (identity first) otherwise. */
function codesOf(plan: Plan, k: number, codes: Int32Array, random: (() => number) | null): void {
  const { groups } = plan;
  for (let g = 0; g < groups.length; g++) {
    const { first, count } = groups[g];
    if (random === null) codes[g] = Math.floor(k / 2 ** first) % (1 << count);
    else codes[g] = k === 0 ? 0 : Math.floor(random() * (1 << count));
  }
}

/**
 * A map test in progress: `observe()` once, then `step()` through the permutations, then `finish()`. The sync and
 * async runners below drive it; a caller may drive it itself (e.g. to interleave with other work).
 */
export class MapTestRun {
  private readonly plan: Plan;
  private readonly evaluator: Evaluator;
  private readonly codes: Int32Array;
  private readonly random: (() => number) | null;
  private readonly nullMax: Float64Array;
  private next = 0;
  private observed: { t: Float64Array; labels: Int32Array; clusters: Omit<MapCluster, 'p'>[] } | null = null;

  constructor(input: MapTestInput) {
    this.plan = planMapTest(input);
    this.evaluator = new Evaluator(this.plan);
    this.codes = new Int32Array(this.plan.groups.length);
    this.random = this.plan.exact ? null : mulberry32(this.plan.seed!);
    this.nullMax = new Float64Array(this.plan.permutations);
  }

  /** Flips evaluated so far. */
  get done(): number {
    return this.next;
  }

  /** Flips to evaluate (2^(n − 1) when exact: see Plan.evaluations). */
  get total(): number {
    return this.plan.evaluations;
  }

  /** Evaluates the observed map (the identity flip) with labels. */
  observe(): void {
    const labels = new Int32Array(this.plan.points);
    const clusters: Omit<MapCluster, 'p'>[] = [];
    this.codes.fill(0);
    this.evaluator.evaluate(this.codes, labels, (c) => clusters.push(c));
    this.observed = { t: this.evaluator.t.slice(), labels, clusters };
  }

  /** Evaluates up to `count` more flips; returns how many are left. */
  step(count: number): number {
    const { evaluations, exact, permutations } = this.plan;
    const end = Math.min(evaluations, this.next + count);
    for (let k = this.next; k < end; k++) {
      codesOf(this.plan, k, this.codes, this.random);
      const largest = this.evaluator.evaluate(this.codes);
      this.nullMax[k] = largest;
      if (exact) this.nullMax[k ^ (permutations - 1)] = largest; // the complementary flip
    }
    this.next = end;
    return evaluations - end;
  }

  finish(): MapTestResult {
    if (this.observed === null) this.observe();
    if (this.next < this.plan.evaluations) throw new Error('MapTestRun.finish: permutations are left');
    const { plan, nullMax } = this;
    const observed = this.observed!;
    const clusters: MapCluster[] = observed.clusters.map((c) => {
      const abs = Math.abs(c.mass);
      let atLeast = 0;
      for (let k = 0; k < nullMax.length; k++) if (nullMax[k] >= abs) atLeast++;
      return { ...c, p: atLeast / nullMax.length };
    });
    clusters.sort((a, b) => a.p - b.p || Math.abs(b.mass) - Math.abs(a.mass) || a.label - b.label);
    return {
      n: plan.n,
      df: plan.n - 1,
      alpha: plan.alpha,
      threshold: plan.threshold,
      t: observed.t,
      labels: observed.labels,
      clusters,
      permutations: plan.permutations,
      exact: plan.exact,
      seed: plan.seed,
      nullDistribution: nullMax,
    };
  }
}

/** Flips per part of the run. */
function partSize(run: MapTestRun, options: MapTestOptions): number {
  const steps = options.progressSteps ?? 20;
  if (!(Number.isInteger(steps) && steps >= 1)) throw new StatisticsInputError('progressSteps', `must be a positive integer, got ${steps}`);
  return Math.max(1, Math.ceil(run.total / steps));
}

/** Runs the whole test synchronously (server, CLI, tests); `signal` and `onProgress` work between parts. */
export function runMapTestSync(input: MapTestInput, options: MapTestOptions = {}): MapTestResult {
  const run = new MapTestRun(input);
  const part = partSize(run, options);
  run.observe();
  while (run.step(part) > 0) {
    if (options.signal?.aborted) throw new MapTestCancelledError();
    options.onProgress?.(run.done / run.total);
  }
  options.onProgress?.(1);
  return run.finish();
}

/**
 * Runs the test and yields to the event loop after each part, so a worker can receive a cancel message (and a page
 * stays responsive) while it runs; the numbers are those of runMapTestSync.
 */
export async function runMapTest(input: MapTestInput, options: MapTestOptions = {}): Promise<MapTestResult> {
  const run = new MapTestRun(input);
  const part = partSize(run, options);
  run.observe();
  options.onProgress?.(0);
  while (run.step(part) > 0) {
    options.onProgress?.(run.done / run.total);
    await new Promise<void>((resolve) => setTimeout(resolve, 0));
    if (options.signal?.aborted) throw new MapTestCancelledError();
  }
  options.onProgress?.(1);
  return run.finish();
}
