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
//   - For decibels every trial's own row is needed (Σ_k log10 P_k(t) per point), but only as a product over
//     trials: P_a·P_b = |ỹ_a·ỹ_b|², and ỹ_a·ỹ_b has its spectrum in bins 0 … 2M−2, so its S samples (products of
//     the trials' samples) fix it exactly; one full-resolution row per group of trials replaces one per trial.
//   - The same holds for larger groups (`TrialGroups`). Only the bins at or above the wavelet bank's floor matter,
//     `width` of the M (see wavelet.ts); moved down to start at bin 0, a product of g trials' ỹ has its spectrum in
//     bins 0 … g·(width−1), so a grid of F points fixes it once g·(width−1) < F. Blocks of k trials are multiplied
//     on the S grid itself (as many as fit), each block is spread onto a fine grid of h·S points (its S-grid is
//     every h-th point there, and the other h−1 residues take one transform of size S each after one forward
//     transform), and the blocks of a group are multiplied there. A group's row then takes N/(h·S) transforms of
//     size h·S, or none when h·S = N (the grid is every point). `groupPlan` picks k, h and the group from a count
//     of the work.
// These identities are exact for the bank's band; the results differ from a row-per-trial computation by rounding
// and by what lies below the bank's floor (about 1e-13 relative).

const weightCache = new Map<string, Float64Array>();
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
  const at = namedBlock('coarse-baseline.samples', 16 * a.length);
  heap().set(u.subarray(0, 2 * a.length), at / 8);
  return baselineAt(at, a);
}

// The weights `baselineAt` last copied into the kernels' memory, and where: a frequency's trials share one array
// (`baselineWeights` caches them, and nothing writes into them), so it is copied once per frequency, not per trial.
let heldWeights: Float64Array | null = null;
let heldAt = -1;

/** `coarseBaseline` of samples already in the kernels' memory (a pointer), in the kernel `weightedPower`. */
function baselineAt(samples: number, a: Float64Array): number {
  const at = namedBlock('coarse-baseline.weights', 8 * a.length);
  if (heldWeights !== a || heldAt !== at) {
    heap().set(a, at / 8);
    heldWeights = a;
    heldAt = at;
  }
  return spectralKernels().weightedPower(samples, at, a.length);
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
// longer fit a first-level cache (measured with fft.js: size 2048 took 2.4× the time of 1024, not 2.2×; the
// kernels' transform shows the same step, 8.9 µs against 3.9 µs, from memory of one run of this machine).
function transformCost(size: number): number {
  return size * bitsOf(size) * (size > 1024 ? 1.25 : 1);
}

/** How a frequency's trials are grouped (see `groupPlan`). */
export interface GroupPlan {
  /** Trials multiplied on the coarse grid of S points before a block is spread (k0). */
  block: number;
  /** The fine grid is h·S points (h a power of two, h·S ≤ N). */
  half: number;
  /** Blocks per group: a group's product, block·blocks trials, lives on the fine grid. */
  blocks: number;
}

/** How far below its mean a group's row may dip and still be trusted (see `TrialGroups.rows`). */
const TRUSTED_DIP = 1e-13;

/** Trials per group at most, whatever the band: keeps a group's product of scaled powers inside a double. */
export const MAX_GROUP = 16;

/**
 * The grouping for a frequency with period N, coarse grid S and a band of `width` bins (the bins at or above the
 * wavelet bank's floor): a product of g trials has its spectrum in g·(width−1)+1 bins, so k0 trials fit on the S
 * grid and a group on a fine grid of F points when g·(width−1)+1 ≤ F. Among fine grids F = h·S ≤ N, the one with
 * the least work per trial (`transformCost`, a complex multiply as 1): per block h transforms of size S for the
 * spread (none when h = 1), per group N/F + 1 transforms of size F for the row (none when F = N) and the row's
 * L multiplies.
 */
export function groupPlan(n: number, s: number, width: number, length: number = n): GroupPlan {
  const span = Math.max(1, width - 1);
  const block = Math.max(1, Math.min(MAX_GROUP, Math.floor((s - 1) / span)));
  let best: GroupPlan = { block, half: 1, blocks: 1 };
  let bestCost = Infinity;
  for (let h = 1; h * s <= n; h *= 2) {
    const fine = h * s;
    const blocks = Math.max(1, Math.min(Math.floor(MAX_GROUP / block), Math.floor((fine - 1) / (block * span))));
    const spread = h > 1 ? h * (transformCost(s) + 2 * s) : s;
    const row = (fine === n ? 0 : (n / fine + 1) * (transformCost(fine) + 2 * fine)) + length;
    const cost = spread / block + row / (block * blocks);
    if (cost < bestCost - 1e-9) {
      best = { block, half: h, blocks };
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

const phaseTables = new Map<string, number>();

/** exp(+2πi·offset·q/S) for q < S, interleaved, in the kernels' memory: moves a band starting at `offset` to bin 0. */
function phaseTable(s: number, offset: number): number {
  const key = `${s}|${offset}`;
  const cached = phaseTables.get(key);
  if (cached !== undefined) return cached;
  const table = allocate(16 * s);
  const t = heap();
  const at = table / 8;
  for (let q = 0; q < s; q++) {
    const angle = (2 * Math.PI * ((offset * q) % s)) / s;
    t[at + 2 * q] = cos(angle);
    t[at + 2 * q + 1] = sin(angle);
  }
  phaseTables.set(key, table);
  return table;
}

/**
 * Full-resolution rows of the product of a group's power, Π_k P_k(t), for trial-scope decibels (see the identities
 * at the top of this file). One instance per frequency, kept across epoch blocks: `begin`, then `add` each trial's
 * coarse samples in trial order; when `full()` (or after the condition's last trial) `rows` hands over the group's
 * row (or its trials' own rows) and starts the next group.
 *
 * Band: ỹ's bins that matter are `offset` … `offset + width − 1` of the M-bin window (the wavelet bank's floor,
 * 1e-13 of the wavelet's peak, as everywhere in the bank); each trial's samples are first moved down by `offset`
 * bins (|·| unchanged), so a product of g trials sits in bins 0 … g·(width−1). What lies in the window outside the
 * band is below the floor; where it folds onto the grid it changes a product by about that floor, relatively.
 *
 * Range: a product of up to MAX_GROUP powers can leave the range of a double (power in µV² may be 1e−40 in a flat
 * channel), so each trial's samples are scaled by 2^−e_k, e_k chosen so its baseline mean B_k lies in [1, 4) (its
 * largest |u|² when B_k is not a positive normal number). A row then holds Π_k P_k/B_k up to powers of two, in
 * range unless a group's trials average beyond about ±190 dB against their own baselines. A power of two scales
 * exactly, so the row is Π_k P_k·2^−(2·Σe_k) with the same significand bits, and `rows` hands 2·Σe_k to the caller
 * with it (decompose.ts adds it back to LogProduct's exponent, `multiplyScaledRow`).
 */
export class TrialGroups {
  private n = 0;
  private s = 0;
  private plan: GroupPlan = { block: 1, half: 1, blocks: 1 };
  private fine = 0;
  private phase = 0;
  /** Trials in the block being formed, and in the group. */
  private inBlock = 0;
  private count = 0;
  private shift = 0;
  /** Blocks already spread into `product` in this group. */
  private spread = 0;
  // Buffers in the spectral kernels' memory (pointers; see kernels/runtime.ts), complex unless said otherwise. The
  // block and the product are this frequency's own; the rest is shared by every instance on the thread.
  private readonly block: number;
  private readonly product: number;
  /** The group's trials' own samples, S points each, kept until the row is checked (see `rows`). */
  private readonly members: number;
  /** The baseline weights a_s (`baselineWeights`), when set by `useBaseline`. */
  private baseline: Float64Array | null = null;
  /** Each member's scale exponent e_k. */
  private readonly exponents = new Int32Array(MAX_GROUP);
  private readonly spectrum: number;
  private readonly work: number;
  private readonly scratch: number;
  /** The row, f64. */
  private readonly rowBuffer: number;

  /**
   * `slot`: which frequency's block and product buffers to use (reused by every decomposition on the thread);
   * `maxFine`: the largest fine grid it may use (≤ its N), `maxCoarse` the largest coarse grid S.
   */
  private readonly maxFine: number;
  private readonly maxCoarse: number;

  constructor(slot: number, maxFine: number, maxCoarse: number = maxFine) {
    this.maxFine = maxFine;
    this.maxCoarse = maxCoarse;
    this.block = namedBlock(`trial-groups.block.${slot}`, 16 * maxCoarse);
    this.product = namedBlock(`trial-groups.product.${slot}`, 16 * maxFine);
    this.members = namedBlock(`trial-groups.members.${slot}`, 16 * MAX_GROUP * maxCoarse);
    this.spectrum = namedBlock('trial-groups.spectrum', 16 * maxFine);
    this.work = namedBlock('trial-groups.work', 16 * maxFine);
    this.scratch = namedBlock('trial-groups.scratch', 16 * maxFine);
    this.rowBuffer = namedBlock('trial-groups.row', 8 * maxFine);
  }

  /**
   * Start a frequency: period `n`, coarse grid `s` = 2M, the band's `width` and `offset` in the M-bin window, and
   * optionally the grouping (`groupPlan` by default; its fine grid must fit a group's band). An unfinished group
   * is dropped.
   */
  begin(n: number, s: number, width: number, offset: number, plan: GroupPlan = groupPlan(n, s, width)): void {
    // The buffers were sized in the constructor: a larger grid would write past them.
    if (n > this.maxFine || s > this.maxCoarse || plan.half * s > n || plan.block * plan.blocks > MAX_GROUP) {
      throw new Error(`TrialGroups.begin: N ${n}, S ${s}, fine grid ${plan.half * s}, ${plan.block * plan.blocks} trials do not fit buffers for N ≤ ${this.maxFine}, S ≤ ${this.maxCoarse}`);
    }
    this.n = n;
    this.s = s;
    this.plan = plan;
    this.fine = plan.half * s;
    this.phase = phaseTable(s, offset);
    this.baseline = null;
    this.inBlock = 0;
    this.count = 0;
    this.shift = 0;
    this.spread = 0;
  }

  /** Trials per group at the current frequency. */
  get size(): number {
    return this.plan.block * this.plan.blocks;
  }

  full(): boolean {
    return this.count === this.size;
  }

  /** Trials added since the last row. */
  get pending(): number {
    return this.count;
  }

  /** The baseline weights for this frequency (`baselineWeights` of its N and S), so that `add` finds each B_k. */
  useBaseline(a: Float64Array): void {
    this.baseline = a;
  }

  /**
   * One trial: `u` its S coarse samples (conj ỹ at s·N/S, from `averagePower`) and B its baseline mean (see
   * `coarseBaseline`; found from the weights of `useBaseline` when not given): scaled by 2^−e (see above), moved
   * down by the band's offset and multiplied into the block; a full block is spread onto the fine grid
   * (`spreadBlock`). Returns B.
   */
  add(u: Float64Array, baselineMean?: number): number {
    const { s } = this;
    if (this.count === this.size) throw new Error('TrialGroups.add: the group is full; take its rows first');
    const member = this.members + 16 * s * this.count;
    heap().set(u.length === 2 * s ? u : u.subarray(0, 2 * s), member / 8);
    let mean = baselineMean;
    if (mean === undefined) {
      if (this.baseline === null) throw new Error('TrialGroups.add: no baseline mean and no baseline weights');
      mean = baselineAt(member, this.baseline);
    }
    let level = mean;
    if (!(level >= MIN_NORMAL && level <= Number.MAX_VALUE)) {
      level = 0;
      for (let q = 0; q < s; q++) {
        const p = u[2 * q] * u[2 * q] + u[2 * q + 1] * u[2 * q + 1];
        if (p > level) level = p;
      }
    }
    const e = level > 0 ? exponentOf(level) >> 1 : 0;
    this.shift += 2 * e;
    this.exponents[this.count] = e;
    spectralKernels().multiplyPhased(this.block, member, this.phase, s, twoToThe(-e), this.inBlock === 0);
    this.inBlock++;
    this.count++;
    if (this.inBlock === this.plan.block) this.spreadBlock();
    return mean;
  }

  /**
   * The block's S samples w (its spectrum in bins 0 … S−1) onto the fine grid of h·S points: residue ρ of h is w at
   * s·N/S + ρ·N/(h·S), FFT_S(conj(G)·exp(−2πi·q·r/N)) with G = FFT_S(conj w)/S and r = ρ·N/(h·S) (the identity of
   * `row`, on the fine grid instead of every point), multiplied into the group's product.
   */
  private spreadBlock(): void {
    const { s, n, fine, block, product } = this;
    const h = this.plan.half;
    const k = spectralKernels();
    const first = this.spread === 0;
    k.multiplyStrided(product, 0, h, block, s, first);
    if (h > 1) {
      this.toSpectrum(block, s);
      const step = n / fine;
      for (let rho = 1; rho < h; rho++) k.multiplyStrided(product, rho, h, this.shifted(s, rho * step), s, first);
    }
    this.inBlock = 0;
    this.spread++;
  }

  /**
   * The rows of the trials added since the last call, handed to `take` as (row, shift) with row[t]·2^shift the
   * product of those trials' P_k(t), t < length: one row for the whole group, or, when that row cannot be trusted
   * (see below), one per trial. The next `add` starts a new group.
   *
   * A group's row is interpolated from its fine grid, and a transform's rounding is relative to the whole row
   * (about ε·log2 F times its root mean square): where a row dips far below its mean, as a product of trials with
   * a strong edge or burst does (the dip of each trial raised to the group's size), the interpolated value is
   * rounding, not the product. Each point of the group's row must therefore stay above 1e-13 of its mean;
   * otherwise each trial's own row is taken, from its own S samples by the same identity (a group of one on the S
   * grid). Measured on the bench case's noise and on the same noise with a 50 Hz line 30 and 300 times stronger
   * (epochs cut from it have strong edges): against taking every trial's own row, the averaged decibels differ by
   * 2e-11, 2.4e-10 and 1.1e-10 dB; about 0.5 % of groups fall back on noise, half or more with the line (one run
   * each, this machine). Without the check the line case was 7e-5 dB off and a stronger line gave −∞.
   */
  rows(row: Float64Array, length: number, take: (row: Float64Array, shift: number) => void): void {
    if (this.inBlock > 0) this.spreadBlock();
    const members = this.count;
    const shift = this.shift;
    this.count = 0;
    this.shift = 0;
    this.spread = 0;
    this.writeRow(row, length, this.fine);
    let mean = 0;
    let low = Infinity;
    for (let t = 0; t < length; t++) {
      mean += row[t];
      if (row[t] < low) low = row[t];
    }
    mean /= length;
    if (members === 1 || low >= TRUSTED_DIP * mean) {
      take(row, shift);
      return;
    }
    const k = spectralKernels();
    for (let m = 0; m < members; m++) {
      const e = this.exponents[m];
      // A lone trial's spectrum (bins 0 … M−1 of its window) fits the S grid as it is: no shift, nothing folds.
      k.scaleInto(this.product, this.members + 16 * this.s * m, this.s, twoToThe(-e));
      this.writeRow(row, length, this.s);
      take(row, 2 * e);
    }
  }

  /**
   * row[t] = |conj(product)(t)|² for t < length from the product's F points: v = conj(product) at the grid's points,
   * G = FFT_F(v)/F its bins 0 … F−1, and for t = τ·R + r (R = N/F) conj(v)(t) = FFT_F(conj(G)·exp(−2πi·q·r/N))[τ]
   * (the 1/F sits in the twiddles). When F = N the grid is every point.
   */
  private writeRow(row: Float64Array, length: number, fine: number): void {
    const { n, product, rowBuffer } = this;
    const k = spectralKernels();
    if (fine === n) {
      k.powerStrided(rowBuffer, 0, 1, product, length);
    } else {
      this.toSpectrum(product, fine);
      const residues = n / fine;
      for (let r = 0; r < residues; r++) k.powerStrided(rowBuffer, r, residues, this.shifted(fine, r), Math.min(fine, Math.ceil((length - r) / residues)));
    }
    const at = rowBuffer / 8;
    row.set(heap().subarray(at, at + length));
  }

  /** `spectrum` = FFT_size(conj(w)) for the samples w of a grid of `size` points at `values` (ready for `shifted`). */
  private toSpectrum(values: number, size: number): void {
    const k = spectralKernels();
    k.conjugateInto(this.spectrum, values, size);
    k.fft(size, this.spectrum, this.scratch, twiddleTable(size));
  }

  /**
   * The same band-limited signal r points later (r < N/size): w at q·N/size + r, as FFT_size(conj(G)·exp(−2πi·q·r/N)/size)
   * with G = `spectrum` (the 1/size sits in the twiddles); written to `work`, whose pointer it returns.
   */
  private shifted(size: number, r: number): number {
    const k = spectralKernels();
    k.conjugateTimes(this.work, this.spectrum, residueTwiddles(this.n, size) + 16 * r * size, size);
    k.fft(size, this.work, this.scratch, twiddleTable(size));
    return this.work;
  }
}
