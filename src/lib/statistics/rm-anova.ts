import { StatisticsInputError } from './errors';
import { fUpperP } from './distributions';

export interface WithinFactor {
  name: string;
  levels: number;
}

export interface RmAnovaInput {
  factors: WithinFactor[];
  /** Complete subjects only. */
  nSubjects: number;
  /**
   * `[s·C + c]`: subject s's value in cell c, where cells run row-major over the factors (the last factor fastest)
   * and C = Π levels.
   */
  values: ArrayLike<number>;
}

export interface RmEffect {
  /** Factor names joined by ':' in the order given, e.g. `condition:band`. */
  effect: string;
  F: number;
  df1: number;
  df2: number;
  p: number;
  /** Partial eta squared SS_effect/(SS_effect + SS_error). */
  eta2p: number;
  /** Greenhouse–Geisser ε; exactly 1 for an effect with one degree of freedom. */
  epsilon: number;
  /** p with df1·ε and df2·ε. */
  pGG: number;
  ss: number;
  ssError: number;
}

export interface RmAnovaResult {
  n: number;
  effects: RmEffect[];
}

/** Orthonormal Helmert contrasts: L − 1 columns of length L, each orthogonal to the constant (column-major). */
function helmert(levels: number): Float64Array[] {
  const columns: Float64Array[] = [];
  for (let j = 1; j < levels; j++) {
    const c = new Float64Array(levels);
    const norm = Math.sqrt(j * (j + 1));
    for (let i = 0; i < j; i++) c[i] = 1 / norm;
    c[j] = -j / norm;
    columns.push(c);
  }
  return columns;
}

/** Kronecker product of per-factor vectors, the first factor slowest (matches the cell order). */
function kron(vectors: Float64Array[]): Float64Array {
  let out = new Float64Array([1]);
  for (const v of vectors) {
    const next = new Float64Array(out.length * v.length);
    for (let i = 0; i < out.length; i++) for (let j = 0; j < v.length; j++) next[i * v.length + j] = out[i] * v[j];
    out = next;
  }
  return out;
}

/**
 * Repeated-measures ANOVA with within-subject factors only, every main effect and interaction, by orthonormal
 * contrasts (the univariate approach; e.g. Maxwell & Delaney, 2004, Designing Experiments and Analyzing Data,
 * 2nd ed., ch. 11–12): for an effect over factors E, the contrast matrix is ⊗_k (Helmert_k for k ∈ E, 1/√L_k
 * otherwise), of d = Π_{k∈E}(L_k − 1) columns. With z_s = Cᵀy_s and z̄ their mean: SS_effect = n·|z̄|²,
 * SS_error = Σ_s |z_s − z̄|² (the effect × subject interaction), F = (SS_effect/d)/(SS_error/(d(n − 1))),
 * df1 = d, df2 = d(n − 1), partial η² = SS_effect/(SS_effect + SS_error). Greenhouse–Geisser (1959,
 * Psychometrika 24:95–112; Box, 1954): with S the d × d sample covariance of z, ε = (tr S)²/(d·tr(S²)),
 * and pGG from F with (ε·df1, ε·df2). Effects are listed by size, then in factor order (A, B, A:B).
 */
export function repeatedMeasuresAnova(input: RmAnovaInput): RmAnovaResult {
  const { factors, nSubjects: n, values } = input;
  if (factors.length === 0) throw new StatisticsInputError('factors', 'needs at least one within-subject factor');
  factors.forEach((f, i) => {
    if (!(Number.isInteger(f.levels) && f.levels >= 2)) {
      throw new StatisticsInputError(`factors[${i}]`, `("${f.name}") needs at least 2 levels, has ${f.levels}`);
    }
  });
  const cells = factors.reduce((a, f) => a * f.levels, 1);
  if (n < 2) throw new StatisticsInputError('subjects', `needs at least 2 complete subjects, got ${n}`);
  if (values.length !== n * cells) throw new StatisticsInputError('values', `has ${values.length} entries; ${n} subjects × ${cells} cells need ${n * cells}`);

  const contrasts = factors.map((f) => helmert(f.levels));
  const averages = factors.map((f) => new Float64Array(f.levels).fill(1 / Math.sqrt(f.levels)));
  const subsets: number[][] = [];
  for (let mask = 1; mask < 1 << factors.length; mask++) {
    subsets.push(factors.map((_, k) => k).filter((k) => mask & (1 << k)));
  }
  subsets.sort((a, b) => {
    if (a.length !== b.length) return a.length - b.length;
    const i = a.findIndex((v, k) => v !== b[k]);
    return i < 0 ? 0 : a[i] - b[i];
  });

  const effects: RmEffect[] = [];
  for (const subset of subsets) {
    // Enumerate the effect's contrast columns: one Helmert column per factor in the subset.
    let columns: Float64Array[][] = [[]];
    factors.forEach((_, k) => {
      if (subset.includes(k)) columns = columns.flatMap((prefix) => contrasts[k].map((c) => [...prefix, c]));
      else columns = columns.map((prefix) => [...prefix, averages[k]]);
    });
    const matrix = columns.map(kron);
    const d = matrix.length;
    const z = new Float64Array(n * d);
    for (let s = 0; s < n; s++) {
      for (let j = 0; j < d; j++) {
        let acc = 0;
        const col = matrix[j];
        for (let c = 0; c < cells; c++) acc += col[c] * values[s * cells + c];
        z[s * d + j] = acc;
      }
    }
    const mean = new Float64Array(d);
    for (let s = 0; s < n; s++) for (let j = 0; j < d; j++) mean[j] += z[s * d + j];
    for (let j = 0; j < d; j++) mean[j] /= n;
    let ss = 0;
    for (let j = 0; j < d; j++) ss += mean[j] * mean[j];
    ss *= n;
    const cov = new Float64Array(d * d);
    for (let s = 0; s < n; s++) {
      for (let i = 0; i < d; i++) {
        const di = z[s * d + i] - mean[i];
        for (let j = 0; j < d; j++) cov[i * d + j] += di * (z[s * d + j] - mean[j]);
      }
    }
    let ssError = 0;
    for (let j = 0; j < d; j++) ssError += cov[j * d + j];
    let trace = 0;
    let traceSq = 0;
    for (let i = 0; i < d; i++) {
      trace += cov[i * d + i] / (n - 1);
      for (let j = 0; j < d; j++) traceSq += (cov[i * d + j] / (n - 1)) ** 2;
    }
    const df1 = d;
    const df2 = d * (n - 1);
    const F = ss / df1 / (ssError / df2);
    const epsilon = d === 1 ? 1 : (trace * trace) / (d * traceSq);
    effects.push({
      effect: subset.map((k) => factors[k].name).join(':'),
      F,
      df1,
      df2,
      p: fUpperP(F, df1, df2),
      eta2p: ss / (ss + ssError),
      epsilon,
      pGG: fUpperP(F, df1 * epsilon, df2 * epsilon),
      ss,
      ssError,
    });
  }
  return { n, effects };
}
