import { AnalysisInputError } from './errors';
import { getFft, nextPowerOfTwo } from './fft';
import { geometricSpread } from './frequency-grid';
import { cos, exp, sin } from './portable-math';

/** How wide each wavelet's Gaussian is: fixed cycles, cycles spread geometrically, or a FWHM in seconds. */
export type CyclesSpec = { fixed: number } | { min: number; max: number } | { fwhm: number };

const FWHM_PER_SIGMA = Math.sqrt(8 * Math.LN2);

/**
 * Gaussian standard deviation σ_i in seconds for each frequency f_i (Hz): `σ = n/(2πf)` for n cycles, with n fixed
 * or `n_i = min·(max/min)^(i/(count−1))`; or `σ = h/√(8 ln 2)` for a time-domain FWHM of h seconds, since
 * `exp(−4 ln2 t²/h²) = exp(−t²/(2σ²))` (Cohen, 2019, NeuroImage 199:81–86).
 */
export function gaussianSigmas(frequencies: Float64Array, cycles: CyclesSpec): Float64Array {
  const count = frequencies.length;
  const out = new Float64Array(count);
  if ('fwhm' in cycles) {
    for (let i = 0; i < count; i++) out[i] = cycles.fwhm / FWHM_PER_SIGMA;
    return out;
  }
  const n = 'fixed' in cycles ? null : geometricSpread(cycles.min, cycles.max, count);
  for (let i = 0; i < count; i++) {
    const c = n === null ? (cycles as { fixed: number }).fixed : n[i];
    out[i] = c / (2 * Math.PI * frequencies[i]);
  }
  return out;
}

/** Cycles n_i = 2π·f_i·σ_i implied by each frequency's Gaussian width (for reporting). */
export function cyclesOf(frequencies: Float64Array, sigmas: Float64Array): Float64Array {
  const out = new Float64Array(frequencies.length);
  for (let i = 0; i < out.length; i++) out[i] = 2 * Math.PI * frequencies[i] * sigmas[i];
  return out;
}

/** Edge zone half-width in seconds, `3σ` per frequency (analysis contract). */
export function edgeSecondsOf(sigmas: Float64Array): Float64Array {
  const out = new Float64Array(sigmas.length);
  for (let i = 0; i < out.length; i++) out[i] = 3 * sigmas[i];
  return out;
}

/**
 * Time-frequency resolution of each wavelet: temporal FWHM `√(8 ln 2)·σ` seconds of the Gaussian envelope and
 * spectral FWHM `√(8 ln 2)/(2πσ)` Hz of its spectrum (the spectral SD is `1/(2πσ)` = f/n; Cohen, 2019, NeuroImage
 * 199:81–86), beside the edge zone `3σ`.
 */
export function resolutionOf(sigmas: Float64Array): { temporalFwhmSeconds: Float64Array; spectralFwhmHz: Float64Array } {
  const temporalFwhmSeconds = new Float64Array(sigmas.length);
  const spectralFwhmHz = new Float64Array(sigmas.length);
  for (let i = 0; i < sigmas.length; i++) {
    temporalFwhmSeconds[i] = FWHM_PER_SIGMA * sigmas[i];
    spectralFwhmHz[i] = FWHM_PER_SIGMA / (2 * Math.PI * sigmas[i]);
  }
  return { temporalFwhmSeconds, spectralFwhmHz };
}

export interface MorletWavelet {
  /** Samples run from −halfWidth to +halfWidth; index k + halfWidth holds t = k/fs. */
  halfWidth: number;
  re: Float64Array;
  im: Float64Array;
}

/**
 * Complex Morlet wavelet `w(t) = c·exp(2πi f t)·exp(−t²/(2σ²))` sampled at `t = k/fs`, `|k| ≤ halfWidth`
 * (default ⌈5σ·fs⌉, the contract's minimum support).
 * `c = 2/Σ_k exp(−t_k²/(2σ²))`: convolving `A·cos(2πft)` gives `|y| = (A/2)·c·Σ g = A`, so a steady sinusoid of
 * amplitude A µV yields power A² µV² (analysis contract, "Complex Morlet wavelet power"); the negative-frequency
 * half contributes `exp(−2n²)` relative, under 2e-8 for n ≥ 3 cycles.
 */
export function morletWavelet(
  frequencyHz: number,
  sigmaSeconds: number,
  sampleRateHz: number,
  halfWidth = Math.ceil(5 * sigmaSeconds * sampleRateHz),
): MorletWavelet {
  const length = 2 * halfWidth + 1;
  const re = new Float64Array(length);
  const im = new Float64Array(length);
  const g = new Float64Array(length);
  let gSum = 0;
  for (let j = 0; j < length; j++) {
    const t = (j - halfWidth) / sampleRateHz;
    g[j] = exp(-(t * t) / (2 * sigmaSeconds * sigmaSeconds));
    gSum += g[j];
  }
  const c = 2 / gSum;
  for (let j = 0; j < length; j++) {
    const angle = 2 * Math.PI * frequencyHz * ((j - halfWidth) / sampleRateHz);
    re[j] = c * g[j] * cos(angle);
    im[j] = c * g[j] * sin(angle);
  }
  return { halfWidth, re, im };
}

/**
 * Per-frequency wavelet spectra for epochs of one length, ready for `decomposeChannel`.
 *
 * Frequency i convolves at FFT size `N_i`, the smallest power of two ≥ L + halfWidth_i: a circular convolution of
 * that size equals the linear one at output samples 0 … L−1 (no wrap reaches them). Every `N_i` divides
 * `fftSize`, and since the zero-padded epoch fits in `N_i`, its `N_i`-point spectrum is the `fftSize`-point one
 * taken every `fftSize/N_i` bins, so one forward FFT per epoch serves all frequencies.
 *
 * The inverse exploits the wavelet's narrow band. Only the `M_i` bins `k0 … k0+M_i−1` around the centre frequency
 * that hold every bin with |W| ≥ 1e-13·max|W| are kept. The wavelet runs to 8σ (the contract asks for at least
 * 5σ), where the Gaussian is exp(−32) ≈ 1e-14, so its spectrum (a Gaussian of SD f/n with the truncation's
 * sidelobes) is band-limited to that floor; should sidelobes stay above it, the whole spectrum is kept (M = N).
 * Dropped bins change power by at most ~1e-13 relative, far below the ~1e-6 the contract's own 5σ cut allows.
 * Writing output j = q·R + r with R = N/M, `|y[j]| = |Σ_m conj(X[k0+m])·V_r[m]·exp(−2πi q m/M)|` with `V_r[m] = conj(W[k0+m])·exp(−2πi r m/N)/N`,
 * i.e. R forward transforms of size M replace one inverse of size N (|IFFT(Z)| = |FFT(conj Z)|/N drops the
 * phase). `weights` holds V as `[r][m]` interleaved complex; `bins` the interleaved index of bin k0+m in the
 * `fftSize` spectrum.
 */
export interface WaveletBank {
  epochSamples: number;
  sampleRateHz: number;
  fftSize: number;
  /** N_i, the circular convolution length. */
  sizes: Int32Array;
  /** M_i, kept spectral bins (a power of two dividing N_i). */
  bandSizes: Int32Array;
  halfWidths: Int32Array;
  bins: Int32Array[];
  weights: Float64Array[];
  /**
   * Trial-average path (see `decomposeChannel`): band of `averageBandSizes[i]` bins (a power of two ≤ N_i/4, 0 when
   * the band is too wide for it to pay), their interleaved spectrum indices and `conj(W)/N` over them.
   */
  averageBandSizes: Int32Array;
  averageBins: (Int32Array | null)[];
  averageWeights: (Float64Array | null)[];
  /** Bins at or above the band floor (the band's width before rounding to a power), per frequency. */
  bandWidths: Int32Array;
  /** Where those bins start inside the trial-average window of `averageBandSizes[i]` bins (0 off that path). */
  averageOffsets: Int32Array;
}

const bankCache = new Map<string, WaveletBank>();
const BANK_CACHE_LIMIT = 8;
const BAND_FLOOR = 1e-13;
const BANK_SUPPORT_SIGMAS = 8;

/** The wavelet bank for (frequencies, widths, rate, epoch length), built once and then reused from a cache. */
export function getWaveletBank(
  frequencies: Float64Array,
  sigmas: Float64Array,
  sampleRateHz: number,
  epochSamples: number,
): WaveletBank {
  const key = `${sampleRateHz}|${epochSamples}|${Array.from(frequencies).join(',')}|${Array.from(sigmas).join(',')}`;
  const cached = bankCache.get(key);
  if (cached !== undefined) return cached;
  const bank = buildWaveletBank(frequencies, sigmas, sampleRateHz, epochSamples);
  if (bankCache.size >= BANK_CACHE_LIMIT) bankCache.delete(bankCache.keys().next().value as string);
  bankCache.set(key, bank);
  return bank;
}

function buildWaveletBank(frequencies: Float64Array, sigmas: Float64Array, sampleRateHz: number, epochSamples: number): WaveletBank {
  const count = frequencies.length;
  if (sigmas.length !== count) throw new AnalysisInputError('cycles', `gives ${sigmas.length} widths for ${count} frequencies`);
  const sizes = new Int32Array(count);
  const halfWidths = new Int32Array(count);
  const wavelets: MorletWavelet[] = [];
  let fftSize = 2;
  for (let i = 0; i < count; i++) {
    // 8σ support (the contract asks for at least 5σ): exp(−32) ≈ 1e-14 at the ends makes the spectrum
    // band-limited to the 1e-13 floor, and every path (trial average, single trials) uses this same wavelet.
    const h = Math.ceil(BANK_SUPPORT_SIGMAS * sigmas[i] * sampleRateHz);
    sizes[i] = nextPowerOfTwo(epochSamples + h);
    const w = morletWavelet(frequencies[i], sigmas[i], sampleRateHz, h);
    wavelets.push(w);
    halfWidths[i] = h;
    if (sizes[i] > fftSize) fftSize = sizes[i];
  }
  const bandSizes = new Int32Array(count);
  const averageBandSizes = new Int32Array(count);
  const bandWidths = new Int32Array(count);
  const averageOffsets = new Int32Array(count);
  const averageBins: (Int32Array | null)[] = [];
  const averageWeights: (Float64Array | null)[] = [];
  const bins: Int32Array[] = [];
  const weights: Float64Array[] = [];
  for (let i = 0; i < count; i++) {
    const n = sizes[i];
    const stride = fftSize / n;
    const w = wavelets[i];
    const h = w.halfWidth;
    // wavelet sample k sits at circular index k mod n, so output j = Σ_k x[j−k]·w[k] lands at index j.
    const placed = new Float64Array(2 * n);
    for (let k = -h; k <= h; k++) {
      const idx = k >= 0 ? k : n + k;
      placed[2 * idx] = w.re[k + h];
      placed[2 * idx + 1] = w.im[k + h];
    }
    const spectrum = new Float64Array(2 * n);
    getFft(n).transform(spectrum, placed);
    // Squared magnitudes: exact IEEE arithmetic, where Math.hypot may differ in the last bit between engines.
    let peakSquared = 0;
    let peakBin = 0;
    for (let k = 0; k < n; k++) {
      const a = spectrum[2 * k] * spectrum[2 * k] + spectrum[2 * k + 1] * spectrum[2 * k + 1];
      if (a > peakSquared) {
        peakSquared = a;
        peakBin = k;
      }
    }
    // the band reaches the farthest bin at or above the floor on either side (sidelobes included, not just the
    // first dip below it)
    const floorSquared = BAND_FLOOR * BAND_FLOOR * peakSquared;
    let below = 0;
    let above = 0;
    for (let k = 0; k < n; k++) {
      let d = k - peakBin;
      if (d > n / 2) d -= n;
      if (d <= -n / 2) d += n;
      if (spectrum[2 * k] * spectrum[2 * k] + spectrum[2 * k + 1] * spectrum[2 * k + 1] < floorSquared) continue;
      if (d < 0 && -d > below) below = -d;
      if (d > 0 && d > above) above = d;
    }
    const width = below + above + 1;
    bandWidths[i] = width;
    const m = Math.min(n, nextPowerOfFour(width));
    const k0 = m === n ? 0 : peakBin - below - Math.floor((m - width) / 2);
    const r = n / m;
    bandSizes[i] = m;
    const bandBins = new Int32Array(m);
    const v = new Float64Array(2 * n);
    for (let q = 0; q < m; q++) {
      const k = (((k0 + q) % n) + n) % n;
      bandBins[q] = 2 * k * stride;
      const wr = spectrum[2 * k] / n;
      const wi = -spectrum[2 * k + 1] / n;
      for (let s = 0; s < r; s++) {
        const angle = (-2 * Math.PI * ((s * q) % n)) / n;
        const c = cos(angle);
        const sn = sin(angle);
        v[2 * (s * m + q)] = wr * c - wi * sn;
        v[2 * (s * m + q) + 1] = wr * sn + wi * c;
      }
    }
    bins.push(bandBins);
    weights.push(v);
    const ma = nextPowerOfTwo(width);
    if (4 * ma <= n) {
      const ka = peakBin - below - Math.floor((ma - width) / 2);
      const aBins = new Int32Array(ma);
      const aWeights = new Float64Array(2 * ma);
      for (let q = 0; q < ma; q++) {
        const k = (((ka + q) % n) + n) % n;
        aBins[q] = 2 * k * stride;
        aWeights[2 * q] = spectrum[2 * k] / n;
        aWeights[2 * q + 1] = -spectrum[2 * k + 1] / n;
      }
      averageBandSizes[i] = ma;
      averageOffsets[i] = Math.floor((ma - width) / 2);
      averageBins.push(aBins);
      averageWeights.push(aWeights);
    } else {
      averageBins.push(null);
      averageWeights.push(null);
    }
  }
  return { epochSamples, sampleRateHz, fftSize, sizes, bandSizes, halfWidths, bins, weights, averageBandSizes, averageBins, averageWeights, bandWidths, averageOffsets };
}

// Radix-4 transforms (fft.js then, the spectral kernels now) run pure radix-4 passes at powers of four and add a
// radix-2 pass otherwise; measured on fft.js 4.0.4, a 256-point transform cost less per sample than a 128-point one,
// so bands are padded to a power of four (kept with the kernels: changing it would change every single-trial bit).
function nextPowerOfFour(n: number): number {
  let p = 4;
  while (p < n) p *= 4;
  return p;
}

