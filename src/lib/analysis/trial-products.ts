import type FFT from 'fft.js';
import { getFft } from './fft';
import { cos, sin } from './portable-math';

// Scope `trial` from each trial's coarse samples (decompose.ts; analysis contract, "Baseline normalization").
//
// On the trial-average path a trial's power at one frequency is known from S = 2M samples
// u[s] = conj(ỹ(s·N/S)), where ỹ(j) = y(j)·exp(−2πi·k0·j/N) is the wavelet output shifted down so that its
// spectrum sits in bins 0 … M−1 (see `averagePower`). Two facts make trial scope cheap from there:
//   - B_k, a trial's mean power over the baseline points, is a fixed linear function of its S samples of |y|²
//     (the exact band-limited interpolation, averaged over the baseline points): B_k = Σ_s a_s·|u[s]|².
//     Linear methods then need no per-trial row at all: Σ_k P_k/B_k is the interpolation of Σ_k |u_k|²/B_k.
//   - For decibels every trial's own row is needed (Σ_k log10 P_k(t) per point), but two trials' rows are
//     needed only as their product: P_a·P_b = |ỹ_a·ỹ_b|², and ỹ_a·ỹ_b has its spectrum in bins 0 … 2M−2, so
//     its S samples (products of the trials' samples) fix it exactly. One full-resolution row per pair of
//     trials replaces one per trial, and it comes from N/S transforms of size S.
// Both identities are exact; the results differ from a row-per-trial computation by rounding only.

const weightCache = new Map<string, Float64Array>();
const twiddleCache = new Map<string, Float64Array>();
const CACHE_LIMIT = 64;

function remember<T>(cache: Map<string, T>, key: string, value: T): T {
  if (cache.size >= CACHE_LIMIT) cache.delete(cache.keys().next().value as string);
  cache.set(key, value);
  return value;
}

/**
 * a_s, s < S, with Σ_s a_s·p(s·N/S) = (1/n_b)·Σ_{t=first}^{last} p(t) for every real power row p of lags below S/2
 * sampled at S points per period N (the interpolation `interpolatePower` does, Nyquist term split between ±S/2).
 * By shift invariance a_s = (1/n_b)·Σ_t D(t − s·N/S), D the interpolation of a unit sample at 0.
 */
export function baselineWeights(n: number, s: number, first: number, last: number): Float64Array {
  const key = `${n}|${s}|${first}|${last}`;
  const cached = weightCache.get(key);
  if (cached !== undefined) return cached;
  const m = s / 2;
  // D(t) = Re Σ_d c_d·exp(2πi·d·t/N) with c_d = 1/S for |d| < S/2 and 1/(2S) at ±S/2 (the FFT of a unit sample
  // is 1 in every bin).
  const spectrum = new Float64Array(2 * n);
  for (let d = 0; d < m; d++) spectrum[2 * d] = 1 / s;
  for (let d = 1; d < m; d++) spectrum[2 * (n - d)] = 1 / s;
  spectrum[2 * m] += 1 / (2 * s);
  spectrum[2 * (n - m)] += 1 / (2 * s);
  const kernel = new Float64Array(2 * n);
  getFft(n).transform(kernel, spectrum);
  const step = n / s;
  const count = last - first + 1;
  const a = new Float64Array(s);
  for (let q = 0; q < s; q++) {
    let total = 0;
    for (let t = first; t <= last; t++) total += kernel[2 * ((((t - q * step) % n) + n) % n)];
    a[q] = total / count;
  }
  return remember(weightCache, key, a);
}

/** B = Σ_s a_s·|u[s]|² (see `baselineWeights`), u interleaved complex. */
export function coarseBaseline(u: Float64Array, a: Float64Array): number {
  let total = 0;
  for (let q = 0; q < a.length; q++) total += a[q] * (u[2 * q] * u[2 * q] + u[2 * q + 1] * u[2 * q + 1]);
  return total;
}

/** ratio[s] += |u[s]|²/B: the coarse samples of Σ_k P_k/B_k, interpolated once per condition. */
export function addRatio(ratio: Float64Array, u: Float64Array, baselineMean: number): void {
  for (let q = 0; q < ratio.length; q++) ratio[q] += (u[2 * q] * u[2 * q] + u[2 * q + 1] * u[2 * q + 1]) / baselineMean;
}

/** exp(−2πi·q·r/N)/S for r < N/S, q < S, interleaved as `[r][q]` (1/S is a power of two, so exact). */
function residueTwiddles(n: number, s: number): Float64Array {
  const key = `${n}|${s}`;
  const cached = twiddleCache.get(key);
  if (cached !== undefined) return cached;
  const residues = n / s;
  const t = new Float64Array(2 * n);
  for (let r = 0; r < residues; r++) {
    for (let q = 0; q < s; q++) {
      const angle = (-2 * Math.PI * ((q * r) % n)) / n;
      t[2 * (r * s + q)] = cos(angle) / s;
      t[2 * (r * s + q) + 1] = sin(angle) / s;
    }
  }
  return remember(twiddleCache, key, t);
}

/**
 * row[t] = P_a(t)·P_b(t) for t < length (P_a(t) alone when `b` is null), from two trials' S samples `a` and `b`
 * (u = conj(ỹ) at t = s·N/S, see above). v[s] = ỹ_a·ỹ_b at the samples; G = FFT_S(v)/S are its bins 0 … S−1, and
 * for t = τ·R + r (R = N/S) conj(ỹ_a·ỹ_b)(t) = FFT_S(conj(G)·exp(−2πi·q·r/N))[τ], whose |·|² is the product.
 * `v`, `spectrum`, `work` and `out` are caller-owned scratch of 2S values.
 */
export function productRow(
  row: Float64Array,
  length: number,
  a: Float64Array,
  b: Float64Array | null,
  s: number,
  n: number,
  v: Float64Array,
  spectrum: Float64Array,
  work: Float64Array,
  out: Float64Array,
): void {
  if (b === null) {
    for (let q = 0; q < s; q++) {
      v[2 * q] = a[2 * q];
      v[2 * q + 1] = -a[2 * q + 1];
    }
  } else {
    // conj(a·b)
    for (let q = 0; q < s; q++) {
      const ar = a[2 * q];
      const ai = a[2 * q + 1];
      const br = b[2 * q];
      const bi = b[2 * q + 1];
      v[2 * q] = ar * br - ai * bi;
      v[2 * q + 1] = -(ar * bi + ai * br);
    }
  }
  const fft: FFT = getFft(s);
  fft.transform(spectrum, v);
  const twiddles = residueTwiddles(n, s);
  const residues = n / s;
  for (let r = 0; r < residues; r++) {
    const base = 2 * r * s;
    for (let q = 0; q < s; q++) {
      const gr = spectrum[2 * q];
      const gi = -spectrum[2 * q + 1];
      const tr = twiddles[base + 2 * q];
      const ti = twiddles[base + 2 * q + 1];
      work[2 * q] = gr * tr - gi * ti;
      work[2 * q + 1] = gr * ti + gi * tr;
    }
    fft.transform(out, work);
    const count = Math.min(s, Math.ceil((length - r) / residues));
    for (let q = 0, j = r; q < count; q++, j += residues) {
      const re = out[2 * q];
      const im = out[2 * q + 1];
      row[j] = re * re + im * im;
    }
  }
}
