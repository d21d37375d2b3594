import { levenbergMarquardt } from 'ml-levenberg-marquardt';
import { AnalysisInputError } from './errors';
import { log, log10, pow } from './portable-math';

export type AperiodicModel = 'power-law' | 'power-law-knee';

export interface AperiodicFit {
  /** log10 power at 1 Hz for `power-law`; the additive constant b for `power-law-knee` (log10 µV²/Hz). */
  offset: number;
  exponent: number;
  /** Knee constant k (Hz^exponent) for `power-law-knee`, null for `power-law`. */
  knee: number | null;
  /** Knee frequency `knee^(1/exponent)` Hz for `power-law-knee` (analysis contract); null otherwise or when undefined. */
  kneeHz: number | null;
  /** Coefficient of determination of the final fit over all bins in the range (log10 units). */
  r2: number;
  /** Root-mean-square residual of the final fit over all bins in the range (log10 units). */
  rmse: number;
  /** The same two over the bins the robust fit kept (peaks left out). */
  r2Kept: number;
  rmseKept: number;
  /** Spectrum bins inside the range. */
  points: number;
  /** Bins left out as lying well above the aperiodic line. */
  excluded: number;
  /** Peaks above the aperiodic line (`peaksAboveLine`), lowest frequency first. */
  peaks: AperiodicPeak[];
}

/**
 * A peak above the aperiodic line: a run of neighbouring bins the robust fit left out. `centreHz` by parabolic
 * interpolation of the residual around its largest bin; `heightLog10` the residual there (log10 power above the
 * line); `bandwidthHz` its full width at half that height, interpolated linearly between bins.
 */
export interface AperiodicPeak {
  centreHz: number;
  heightLog10: number;
  bandwidthHz: number;
}

export interface AperiodicOptions {
  /** Exclude peaks above the line (default true); false gives the naive single fit, for comparison. */
  robust?: boolean;
}

// A point is a peak point when its residual exceeds the median residual by more than EXCLUDE_SCALES robust
// standard deviations (1.4826 × median absolute deviation, the normal-consistent MAD).
const EXCLUDE_SCALES = 2.5;
const MAX_ROUNDS = 20;
const LN10 = Math.LN10;

/**
 * Aperiodic (1/f) fit of a power spectrum over `range` Hz, in log10 power against frequency:
 * `power-law` `log10 P = offset − exponent·log10 f` by ordinary least squares; `power-law-knee`
 * `log10 P = offset − log10(knee + f^exponent)` by Levenberg–Marquardt (ml-levenberg-marquardt).
 *
 * Robust to narrow oscillatory peaks after the spectral parameterization approach of Donoghue et al. (2020,
 * Nature Neuroscience 23:1655–1665), whose aperiodic estimate is made on points not raised by peaks. Here:
 * fit all points, then repeatedly refit on the points whose residual is not more than 2.5 robust SDs above the
 * median residual (re-admitting points that fall back under the line), until the kept set stops changing.
 * Only points above the line are excluded, and at least half the points (and 3) are always kept.
 */
export function fitAperiodic(
  frequencies: ArrayLike<number>,
  psd: ArrayLike<number>,
  range: readonly [number, number],
  model: AperiodicModel,
  options: AperiodicOptions = {},
): AperiodicFit {
  const [lo, hi] = range;
  const fs: number[] = [];
  const ys: number[] = [];
  for (let i = 0; i < frequencies.length; i++) {
    const f = frequencies[i];
    const p = psd[i];
    if (f > 0 && f >= lo - 1e-9 && f <= hi + 1e-9 && p > 0 && Number.isFinite(p)) {
      fs.push(f);
      ys.push(log10(p));
    }
  }
  const minPoints = model === 'power-law' ? 3 : 4;
  if (fs.length < minPoints) {
    throw new AnalysisInputError('aperiodic.range', `holds ${fs.length} usable spectrum bins between ${lo} and ${hi} Hz; the ${model} fit needs at least ${minPoints}`);
  }
  const f = Float64Array.from(fs);
  const y = Float64Array.from(ys);
  const n = f.length;
  const keep = new Uint8Array(n).fill(1);
  let params = fitModel(model, f, y, keep, null);
  if (options.robust !== false) {
    const residuals = new Float64Array(n);
    const minKeep = Math.max(minPoints, Math.ceil(n / 2));
    for (let round = 0; round < MAX_ROUNDS; round++) {
      for (let i = 0; i < n; i++) residuals[i] = y[i] - predict(model, params, f[i]);
      const next = peakFreeSet(residuals, keep, minKeep);
      let changed = false;
      for (let i = 0; i < n; i++) if (next[i] !== keep[i]) changed = true;
      if (!changed) break;
      keep.set(next);
      params = fitModel(model, f, y, keep, params);
    }
  }
  const residuals = new Float64Array(n);
  for (let i = 0; i < n; i++) residuals[i] = y[i] - predict(model, params, f[i]);
  const all = goodness(y, residuals, null);
  const kept = goodness(y, residuals, keep);
  let used = 0;
  for (let i = 0; i < n; i++) used += keep[i];
  const knee = model === 'power-law-knee' ? params[2] : null;
  return {
    offset: params[0],
    exponent: params[1],
    knee,
    kneeHz: knee !== null && knee > 0 && params[1] > 0 ? pow(knee, 1 / params[1]) : null,
    r2: all.r2,
    rmse: all.rmse,
    r2Kept: kept.r2,
    rmseKept: kept.rmse,
    points: n,
    excluded: n - used,
    peaks: peaksAboveLine(f, residuals, keep),
  };
}

// r² = 1 − Σr²/Σ(y − ȳ)² and RMSE = √(Σr²/m) over the m bins in `mask` (all bins when null).
function goodness(y: Float64Array, residuals: Float64Array, mask: Uint8Array | null): { r2: number; rmse: number } {
  let m = 0;
  let mean = 0;
  for (let i = 0; i < y.length; i++) {
    if (mask !== null && !mask[i]) continue;
    m++;
    mean += y[i];
  }
  mean /= m;
  let ssRes = 0;
  let ssTot = 0;
  for (let i = 0; i < y.length; i++) {
    if (mask !== null && !mask[i]) continue;
    ssRes += residuals[i] * residuals[i];
    ssTot += (y[i] - mean) * (y[i] - mean);
  }
  return { r2: ssTot > 0 ? 1 - ssRes / ssTot : 1, rmse: Math.sqrt(ssRes / m) };
}

/**
 * Peaks above the aperiodic line: each run of neighbouring bins the robust fit left out (their residual lies more
 * than 2.5 robust SDs above the median residual) is one peak. Centre: the vertex of the parabola through the largest
 * residual and its two neighbours (common practice for a spectral peak between bins); height: that vertex value;
 * bandwidth: full width at half the height, each side interpolated linearly between the bins where the residual
 * crosses it. This stands in for the Gaussian peak fits of Donoghue et al. (2020, Nat Neurosci 23:1655–1665).
 */
export function peaksAboveLine(f: Float64Array, residuals: Float64Array, keep: Uint8Array): AperiodicPeak[] {
  const n = f.length;
  const peaks: AperiodicPeak[] = [];
  let i = 0;
  while (i < n) {
    if (keep[i] || residuals[i] <= 0) {
      i++;
      continue;
    }
    let j = i;
    while (j + 1 < n && !keep[j + 1]) j++;
    let top = i;
    for (let k = i; k <= j; k++) if (residuals[k] > residuals[top]) top = k;
    let centre = f[top];
    let height = residuals[top];
    if (top > 0 && top < n - 1) {
      const a = residuals[top - 1];
      const b = residuals[top];
      const c = residuals[top + 1];
      const denom = a - 2 * b + c;
      if (denom < 0) {
        const delta = (0.5 * (a - c)) / denom;
        const step = delta >= 0 ? f[top + 1] - f[top] : f[top] - f[top - 1];
        centre = f[top] + delta * step;
        height = b - 0.25 * (a - c) * delta;
      }
    }
    const half = height / 2;
    let lo = top;
    while (lo > 0 && residuals[lo] > half) lo--;
    let hi = top;
    while (hi < n - 1 && residuals[hi] > half) hi++;
    const cross = (p: number, q: number) => (residuals[p] === residuals[q] ? f[p] : f[p] + ((half - residuals[p]) * (f[q] - f[p])) / (residuals[q] - residuals[p]));
    const left = residuals[lo] <= half ? cross(lo, lo + 1) : f[lo];
    const right = residuals[hi] <= half ? cross(hi, hi - 1) : f[hi];
    peaks.push({ centreHz: centre, heightLog10: height, bandwidthHz: right - left });
    i = j + 1;
  }
  return peaks;
}

/** params = [offset, exponent, knee?] */
/**
 * A fit's aperiodic line at frequency f, in log10 power: `offset − exponent·log10 f`, or with a knee
 * `offset − log10(knee + f^exponent)` (the models of Donoghue et al., 2020, Nat Neurosci 23:1655–1665), in the
 * engine's portable maths, so the line drawn is the line fitted.
 */
export function aperiodicLine(fit: Pick<AperiodicFit, 'offset' | 'exponent' | 'knee'>, f: number): number {
  return fit.knee === null ? predict('power-law', [fit.offset, fit.exponent], f) : predict('power-law-knee', [fit.offset, fit.exponent, fit.knee], f);
}

function predict(model: AperiodicModel, params: readonly number[], f: number): number {
  return model === 'power-law' ? params[0] - params[1] * log10(f) : params[0] - log10(params[2] + pow(f, params[1]));
}

// Points kept for the next round: residual − median ≤ 2.5 robust SDs, computed over the points kept now; if that
// would keep fewer than minKeep, the minKeep lowest residuals.
function peakFreeSet(residuals: Float64Array, keep: Uint8Array, minKeep: number): Uint8Array {
  const kept: number[] = [];
  for (let i = 0; i < residuals.length; i++) if (keep[i]) kept.push(residuals[i]);
  const med = median(kept);
  const deviations = kept.map((r) => Math.abs(r - med));
  const scale = 1.4826 * median(deviations);
  const next = new Uint8Array(residuals.length);
  let count = 0;
  for (let i = 0; i < residuals.length; i++) {
    if (residuals[i] - med <= EXCLUDE_SCALES * scale) {
      next[i] = 1;
      count++;
    }
  }
  if (count >= minKeep) return next;
  const order = Array.from(residuals.keys()).sort((a, b) => residuals[a] - residuals[b]);
  next.fill(0);
  for (let i = 0; i < minKeep; i++) next[order[i]] = 1;
  return next;
}

function median(values: number[]): number {
  const s = values.slice().sort((a, b) => a - b);
  const mid = s.length >> 1;
  return s.length % 2 === 1 ? s[mid] : 0.5 * (s[mid - 1] + s[mid]);
}

function fitModel(model: AperiodicModel, f: Float64Array, y: Float64Array, keep: Uint8Array, start: number[] | null): number[] {
  const line = fitLine(f, y, keep);
  if (model === 'power-law') return line;
  const xs: number[] = [];
  const ys: number[] = [];
  for (let i = 0; i < f.length; i++) {
    if (keep[i]) {
      xs.push(f[i]);
      ys.push(y[i]);
    }
  }
  // Several starting knees (none, at the lowest and at the middle frequency), best residual wins: the knee
  // model's error surface has a long flat valley in k when the knee lies below the range.
  const starts: number[][] = start !== null ? [start] : [];
  const fLo = xs[0];
  const fMid = xs[xs.length >> 1];
  for (const k of [0, pow(fLo, line[1]), pow(fMid, line[1])]) {
    starts.push([line[0] + log10(k + pow(fMid, line[1])) - line[1] * log10(fMid), line[1], k]);
  }
  let best: number[] = starts[0];
  let bestError = Infinity;
  for (const initial of starts) {
    const result = levenbergMarquardt(
      { x: xs, y: ys },
      ([b, chi, k]) => (x: number) => b - log10(k + pow(x, chi)),
      {
        initialValues: [initial[0], initial[1], Math.max(0, initial[2])],
        minValues: [-Infinity, 0, 0],
        maxValues: [Infinity, 10, Infinity],
        damping: 1e-2,
        maxIterations: 300,
        errorTolerance: 1e-12,
        jacobianFunction: ([, chi, k]) => (x: number) => {
          const fx = pow(x, chi);
          const d = (k + fx) * LN10;
          return [1, (-fx * log(x)) / d, -1 / d];
        },
      },
    );
    if (result.parameterError < bestError) {
      bestError = result.parameterError;
      best = result.parameterValues;
    }
  }
  return [best[0], best[1], best[2]];
}

// Ordinary least squares of y on log10 f over the kept points: returns [offset, exponent] of y = offset − exponent·log10 f.
function fitLine(f: Float64Array, y: Float64Array, keep: Uint8Array): number[] {
  let n = 0;
  let sx = 0;
  let sy = 0;
  for (let i = 0; i < f.length; i++) {
    if (!keep[i]) continue;
    n++;
    sx += log10(f[i]);
    sy += y[i];
  }
  const mx = sx / n;
  const my = sy / n;
  let sxx = 0;
  let sxy = 0;
  for (let i = 0; i < f.length; i++) {
    if (!keep[i]) continue;
    const dx = log10(f[i]) - mx;
    sxx += dx * dx;
    sxy += dx * (y[i] - my);
  }
  const slope = sxx > 0 ? sxy / sxx : 0;
  return [my - slope * mx, -slope];
}

/** One spectrum's fit, or the reason it could not be made (the message of the error `fitAperiodic` threw). */
export type AperiodicOutcome = { fit: AperiodicFit; error: null } | { fit: null; error: string };

/** `fitAperiodic` of each spectrum over one range and model (the Spectrum screen's refit of every channel). */
export function fitAperiodicEach(spectra: readonly { frequencies: Float64Array; psd: Float64Array }[], rangeHz: readonly [number, number], model: AperiodicModel): AperiodicOutcome[] {
  return spectra.map((s) => {
    try {
      return { fit: fitAperiodic(s.frequencies, s.psd, rangeHz, model), error: null };
    } catch (error) {
      return { fit: null, error: error instanceof Error ? error.message : String(error) };
    }
  });
}
