import { getFft } from './fft';
import { allocate, heap, namedBlock, spectralKernels, twiddleTable } from './kernels/runtime';
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
//   - The same holds for larger groups (`TrialGroups`): the product of g = 2h trials' ỹ has its spectrum in bins
//     0 … g·(M−1), so h·S samples fix it. Each pair's product (fixed by its S samples) is spread onto a grid of
//     h·S points: its S-grid is every h-th point of that grid, and the other h−1 residues take one transform of
//     size S each after one forward transform. A group's row then takes N/(h·S) transforms of size h·S, or none
//     when h·S = N (the grid is every point). `groupHalf` picks h per frequency from a count of the work.
// All these identities are exact; the results differ from a row-per-trial computation by rounding only.

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

const residueTables = new Map<string, number>();

/**
 * exp(−2πi·q·r/N)/S for r < N/S, q < S, interleaved as `[r][q]` (1/S is a power of two, so exact), in the spectral
 * kernels' memory (a pointer): one table per (N, S), built once per thread (a run meets a handful of pairs).
 */
function residueTwiddles(n: number, s: number): number {
  const key = `${n}|${s}`;
  const cached = residueTables.get(key);
  if (cached !== undefined) return cached;
  const residues = n / s;
  const table = allocate(16 * n);
  const t = heap();
  const at = table / 8;
  for (let r = 0; r < residues; r++) {
    for (let q = 0; q < s; q++) {
      const angle = (-2 * Math.PI * ((q * r) % n)) / n;
      t[at + 2 * (r * s + q)] = cos(angle) / s;
      t[at + 2 * (r * s + q) + 1] = sin(angle) / s;
    }
  }
  residueTables.set(key, table);
  return table;
}

// log2 of a power of two, exactly (Math.log2 may differ between engines, and the choice must not).
function bitsOf(size: number): number {
  let bits = 0;
  while (1 << bits < size) bits++;
  return bits;
}

// A transform of size n counted as n·log2 n, and 1.25 times that above 1024 points, whose arrays and table no
// longer fit a first-level cache (measured with fft.js: size 2048 takes 2.4× the time of 1024, not 2.2×).
function transformCost(size: number): number {
  return size * bitsOf(size) * (size > 1024 ? 1.25 : 1);
}

/**
 * h (a group is 2h trials) for a frequency with period N and coarse grid S, from a count of the work per trial
 * (`transformCost`, a complex multiply as 1): for h > 1, h transforms of size S per pair of trials for the finer
 * grid, and per group N/(h·S) + 1 transforms of size h·S plus about 2N multiplies (none when h·S = N). On the
 * bench case's shapes this picks what measures fastest per trial (trial-groups.test.ts lists them).
 */
export function groupHalf(n: number, s: number): number {
  let best = 1;
  let bestCost = Infinity;
  for (let h = 1; h <= 4 && h * s <= n; h *= 2) {
    const fine = h * s;
    const group = fine === n ? n : (n / fine + 1) * transformCost(fine) + 2 * n;
    const cost = (h > 1 ? (h / 2) * (transformCost(s) + s) : 0) + group / (2 * h);
    if (cost < bestCost - 1e-9) {
      best = h;
      bestCost = cost;
    }
  }
  return best;
}

const MIN_NORMAL = 2.2250738585072014e-308;
const FLOAT_WORDS = new Uint32Array(new Float64Array(1).buffer);
const FLOAT_VIEW = new Float64Array(FLOAT_WORDS.buffer);

/** ⌊log2 x⌋ for a normal positive x (the IEEE 754 exponent field, little-endian words), 0 for zero/subnormal/∞/NaN. */
function exponentOf(x: number): number {
  FLOAT_VIEW[0] = x;
  const field = (FLOAT_WORDS[1] >>> 20) & 0x7ff;
  return field === 0 || field === 0x7ff ? 0 : field - 1023;
}

/** 2^k for −1022 ≤ k ≤ 1023, exact (built from the exponent field). */
function twoToThe(k: number): number {
  FLOAT_WORDS[0] = 0;
  FLOAT_WORDS[1] = (k + 1023) << 20;
  return FLOAT_VIEW[0];
}

/**
 * Full-resolution rows of the product of a group's power, Π_k P_k(t), for trial-scope decibels (see the identities
 * at the top of this file). Per frequency: `begin`, then `add` each trial's coarse samples in trial order; when
 * `full()` (or at the end of an epoch block) `row` writes the group's row and starts the next group.
 *
 * Range: a product of up to 8 powers can leave the range of a double (power in µV² may be 1e−40 in a flat channel,
 * 1e−320 for eight of them), so each trial's samples are scaled by 2^−e_k, e_k chosen so its baseline mean B_k
 * lies in [1, 4) (its largest |u|² when B_k is not a positive normal number). A row then holds Π_k P_k/B_k up to
 * powers of two, in range unless eight trials average beyond ±370 dB against their own baselines. A power of two
 * scales exactly, so the row is Π_k P_k·2^−(2·Σe_k) with the same significand bits, and `row` returns 2·Σe_k for the
 * caller to add back to the exponent (LogProduct.addExponent).
 */
export class TrialGroups {
  private n = 0;
  private s = 0;
  private h = 1;
  private fine = 0;
  private count = 0;
  private shift = 0;
  /** Pairs already spread into `product` in this group. */
  private pairs = 0;
  // Buffers in the spectral kernels' memory (pointers; see kernels/runtime.ts), complex unless said otherwise:
  /** The trial being added (its S samples, copied in). */
  private readonly incoming: number;
  /** The scaled samples of the pair being formed (or of its first trial), S points. */
  private readonly pair: number;
  /** Π_k (scaled u_k) on the fine grid of h·S points: conj of the group's Π ỹ_k. */
  private readonly product: number;
  private readonly spectrum: number;
  private readonly work: number;
  private readonly scratch: number;
  /** The row, f64. */
  private readonly rowBuffer: number;

  /** `maxFine`: the largest h·S any frequency may use (≤ the largest N). */
  constructor(maxFine: number) {
    // One set per thread, reused by every decomposition (decomposeChannel runs one at a time).
    this.incoming = namedBlock('trial-groups.incoming', 16 * maxFine);
    this.pair = namedBlock('trial-groups.pair', 16 * maxFine);
    this.product = namedBlock('trial-groups.product', 16 * maxFine);
    this.spectrum = namedBlock('trial-groups.spectrum', 16 * maxFine);
    this.work = namedBlock('trial-groups.work', 16 * maxFine);
    this.scratch = namedBlock('trial-groups.scratch', 16 * maxFine);
    this.rowBuffer = namedBlock('trial-groups.row', 8 * maxFine);
  }

  /** Start a frequency: period `n`, coarse grid `s` = 2M, groups of 2h trials (h·s ≤ n); an unfinished group is dropped. */
  begin(n: number, s: number, h: number = groupHalf(n, s)): void {
    this.n = n;
    this.s = s;
    this.h = h;
    this.fine = this.h * s;
    this.count = 0;
    this.shift = 0;
    this.pairs = 0;
  }

  /** Trials per group at the current frequency. */
  get size(): number {
    return 2 * this.h;
  }

  full(): boolean {
    return this.count === 2 * this.h;
  }

  /**
   * One trial: `u` its S coarse samples (conj ỹ at s·N/S, from `averagePower`) and B its baseline mean (see
   * `coarseBaseline`), the samples scaled by 2^−e (see above). With h = 1 they go straight into the pair's product.
   * Otherwise two trials' samples are multiplied first (a pair's product is fixed by S samples) and the pair is
   * spread onto the fine grid (`spreadPair`).
   */
  add(u: Float64Array, baselineMean: number): void {
    const { s, h } = this;
    let level = baselineMean;
    if (!(level >= MIN_NORMAL && level <= Number.MAX_VALUE)) {
      level = 0;
      for (let q = 0; q < s; q++) {
        const p = u[2 * q] * u[2 * q] + u[2 * q + 1] * u[2 * q + 1];
        if (p > level) level = p;
      }
    }
    const e = level > 0 ? exponentOf(level) >> 1 : 0;
    const scale = twoToThe(-e);
    this.shift += 2 * e;
    heap().set(u.length === 2 * s ? u : u.subarray(0, 2 * s), this.incoming / 8);
    const k = spectralKernels();
    if (h === 1) {
      if (this.count === 0) k.scaleInto(this.product, this.incoming, s, scale);
      else k.multiplyScaled(this.product, this.incoming, s, scale);
    } else if ((this.count & 1) === 0) {
      k.scaleInto(this.pair, this.incoming, s, scale);
    } else {
      k.multiplyScaled(this.pair, this.incoming, s, scale);
      this.spreadPair();
    }
    this.count++;
  }

  /**
   * The pair's S samples w = conj(ỹ_a·ỹ_b) at s·N/S onto the fine grid: residue ρ of h is w at s·N/S + ρ·N/(h·S),
   * FFT_S(conj(G)·exp(−2πi·q·r/N)) with G = FFT_S(conj w)/S and r = ρ·N/(h·S) (the identity of `row`, on the fine
   * grid instead of every point). A lone trial (a group's last, odd one) is spread the same way.
   */
  private spreadPair(): void {
    const { s, h, n, fine, pair, work, spectrum, scratch, product } = this;
    const k = spectralKernels();
    const first = this.pairs === 0;
    k.multiplyStrided(product, 0, h, pair, s, first);
    if (h > 1) {
      const table = twiddleTable(s);
      k.conjugateInto(spectrum, pair, s);
      k.fft(s, spectrum, scratch, table);
      const twiddles = residueTwiddles(n, s);
      const step = n / fine;
      for (let rho = 1; rho < h; rho++) {
        k.conjugateTimes(work, spectrum, twiddles + 16 * rho * step * s, s);
        k.fft(s, work, scratch, table);
        k.multiplyStrided(product, rho, h, work, s, first);
      }
    }
    this.pairs++;
  }

  /**
   * row[t] = Π_k P_k(t)·2^−shift for t < length over the trials added since the last row, and returns shift; the
   * next `add` starts a new group. v = Π ỹ_k (scaled) is conj(product) at the fine grid's F = h·S points;
   * G = FFT_F(v)/F are its bins 0 … F−1, and for t = τ·R + r (R = N/F) conj(v)(t) = FFT_F(conj(G)·exp(−2πi·q·r/N))[τ]
   * (the 1/F sits in the twiddles), whose |·|² is the product. When F = N the fine grid is every point.
   */
  row(row: Float64Array, length: number): number {
    if (this.h > 1 && (this.count & 1) === 1) this.spreadPair();
    const { n, fine, product, rowBuffer } = this;
    const shift = this.shift;
    this.count = 0;
    this.shift = 0;
    this.pairs = 0;
    const k = spectralKernels();
    if (fine === n) {
      k.powerStrided(rowBuffer, 0, 1, product, length);
    } else {
      const { work, spectrum, scratch } = this;
      const table = twiddleTable(fine);
      k.conjugateInto(spectrum, product, fine);
      k.fft(fine, spectrum, scratch, table);
      const twiddles = residueTwiddles(n, fine);
      const residues = n / fine;
      for (let r = 0; r < residues; r++) {
        k.conjugateTimes(work, spectrum, twiddles + 16 * r * fine, fine);
        k.fft(fine, work, scratch, table);
        k.powerStrided(rowBuffer, r, residues, work, Math.min(fine, Math.ceil((length - r) / residues)));
      }
    }
    const at = rowBuffer / 8;
    row.set(heap().subarray(at, at + length));
    return shift;
  }
}
