import { AnalysisInputError } from './errors';
import { allocate, heap, spectralKernels, twiddleTable } from './kernels/runtime';
import { cos, sin } from './portable-math';

/**
 * A power-of-two DFT on the spectral kernels (kernels/spectral.ts, WebAssembly SIMD). Arrays are interleaved complex
 * `[re, im, …]` of at least 2·size entries (longer ones are read and written over their first 2·size only); `out`
 * and `input` may be the same array.
 */
export class PowerOfTwoFft {
  readonly size: number;
  /** The transform's own buffers in the kernels' memory: 2·size f64 each, and the real input (size f64). */
  readonly data: number;
  readonly scratch: number;
  readonly real: number;
  readonly table: number;

  constructor(size: number) {
    this.size = size;
    this.data = allocate(16 * size);
    this.scratch = allocate(16 * size);
    this.real = allocate(8 * size);
    this.table = twiddleTable(size);
  }

  /** out[k] = Σ_j input[j]·exp(−2πi·jk/size). */
  transform(out: Float64Array, input: Float64Array): void {
    const n2 = 2 * this.size;
    if (input.length < n2) throw new AnalysisInputError('fft.input', `holds ${input.length / 2} points for a transform of ${this.size}`);
    const h = heap();
    const at = this.data / 8;
    h.set(n2 === input.length ? input : input.subarray(0, n2), at);
    spectralKernels().fft(this.size, this.data, this.scratch, this.table);
    out.set(heap().subarray(at, at + n2));
  }

  /** out[k] = (1/size)·Σ_j input[j]·exp(+2πi·jk/size). */
  inverseTransform(out: Float64Array, input: Float64Array): void {
    const n = this.size;
    if (input.length < 2 * n) throw new AnalysisInputError('fft.input', `holds ${input.length / 2} points for a transform of ${n}`);
    const h = heap();
    const at = this.data / 8;
    for (let i = 0; i < n; i++) {
      h[at + 2 * i] = input[2 * i];
      h[at + 2 * i + 1] = -input[2 * i + 1];
    }
    spectralKernels().fft(n, this.data, this.scratch, this.table);
    const r = heap();
    for (let i = 0; i < n; i++) {
      out[2 * i] = r[at + 2 * i] / n;
      out[2 * i + 1] = -r[at + 2 * i + 1] / n;
    }
  }

  /** The whole spectrum of `size` real samples, all `size` bins (nothing is left for `completeSpectrum`). */
  realTransform(out: Float64Array, input: Float64Array | Float32Array): void {
    const n = this.size;
    if (input.length < n) throw new AnalysisInputError('fft.input', `holds ${input.length} samples for a transform of ${n}`);
    const h = heap();
    h.set(n === input.length ? input : input.subarray(0, n), this.real / 8);
    spectralKernels().realFft(n, this.real, this.data, this.scratch, this.table);
    const at = this.data / 8;
    out.set(heap().subarray(at, at + 2 * n));
  }

  /** Kept for callers written against half-spectrum real transforms: `realTransform` already fills every bin. */
  completeSpectrum(_spectrum: Float64Array): void {}
}

const fftCache = new Map<number, PowerOfTwoFft>();

export function isPowerOfTwo(n: number): boolean {
  return Number.isInteger(n) && n >= 2 && (n & (n - 1)) === 0;
}

/** Smallest power of two ≥ n (and ≥ 2). */
export function nextPowerOfTwo(n: number): number {
  let p = 2;
  while (p < n) p *= 2;
  return p;
}

/** The shared transform for a power-of-two size (its buffers and twiddle table are built once per thread). */
export function getFft(size: number): PowerOfTwoFft {
  let f = fftCache.get(size);
  if (f === undefined) {
    if (!isPowerOfTwo(size)) throw new AnalysisInputError('fft.size', `must be a power of two ≥ 2 (got ${size})`);
    f = new PowerOfTwoFft(size);
    fftCache.set(size, f);
  }
  return f;
}

/** Discrete Fourier transform of real input of one fixed length, written as interleaved complex `[re, im, …]`. */
export interface RealDft {
  readonly size: number;
  /** `out[2k] + i·out[2k+1] = Σ_n input[n]·exp(−2πi·k·n/size)`, k = 0 … size−1; `out.length` = 2·size. */
  forward(out: Float64Array, input: Float64Array): void;
}

const dftCache = new Map<number, RealDft>();

/**
 * A real-input DFT of any length ≥ 1. Powers of two go straight to `PowerOfTwoFft.realTransform`; other lengths use
 * Bluestein's chirp-z algorithm (Bluestein, 1970, IEEE Trans. Audio Electroacoust. 18:451–455), which rewrites
 * the DFT as a circular convolution evaluated with power-of-two FFTs, so Welch bins stay at exactly `k·fs/n`.
 */
export function getRealDft(size: number): RealDft {
  let d = dftCache.get(size);
  if (d === undefined) {
    if (!Number.isInteger(size) || size < 1) throw new AnalysisInputError('fft.size', `must be a whole number ≥ 1 (got ${size})`);
    d = isPowerOfTwo(size) ? powerOfTwoRealDft(size) : size === 1 ? trivialDft() : bluesteinDft(size);
    dftCache.set(size, d);
  }
  return d;
}

function trivialDft(): RealDft {
  return {
    size: 1,
    forward(out, input) {
      out[0] = input[0];
      out[1] = 0;
    },
  };
}

function powerOfTwoRealDft(size: number): RealDft {
  const f = getFft(size);
  return {
    size,
    forward(out, input) {
      f.realTransform(out, input);
      f.completeSpectrum(out);
    },
  };
}

function bluesteinDft(n: number): RealDft {
  const m = nextPowerOfTwo(2 * n - 1);
  const f = getFft(m);
  // chirp c_k = exp(−πi k²/n); k² is reduced mod 2n first so the angle stays exact for long inputs.
  const chirp = new Float64Array(2 * n);
  for (let k = 0; k < n; k++) {
    const k2 = (k * k) % (2 * n);
    const angle = (-Math.PI * k2) / n;
    chirp[2 * k] = cos(angle);
    chirp[2 * k + 1] = sin(angle);
  }
  // b_j = conj(c_j) for j = −(n−1) … n−1, placed circularly, then transformed once.
  const b = new Float64Array(2 * m);
  for (let k = 0; k < n; k++) {
    b[2 * k] = chirp[2 * k];
    b[2 * k + 1] = -chirp[2 * k + 1];
    if (k > 0) {
      b[2 * (m - k)] = chirp[2 * k];
      b[2 * (m - k) + 1] = -chirp[2 * k + 1];
    }
  }
  const bSpectrum = new Float64Array(2 * m);
  f.transform(bSpectrum, b);
  const a = new Float64Array(2 * m);
  const aSpectrum = new Float64Array(2 * m);
  const conv = new Float64Array(2 * m);
  return {
    size: n,
    forward(out, input) {
      a.fill(0);
      for (let k = 0; k < n; k++) {
        a[2 * k] = input[k] * chirp[2 * k];
        a[2 * k + 1] = input[k] * chirp[2 * k + 1];
      }
      f.transform(aSpectrum, a);
      for (let k = 0; k < m; k++) {
        const re = aSpectrum[2 * k];
        const im = aSpectrum[2 * k + 1];
        const br = bSpectrum[2 * k];
        const bi = bSpectrum[2 * k + 1];
        aSpectrum[2 * k] = re * br - im * bi;
        aSpectrum[2 * k + 1] = re * bi + im * br;
      }
      f.inverseTransform(conv, aSpectrum);
      for (let k = 0; k < n; k++) {
        const re = conv[2 * k];
        const im = conv[2 * k + 1];
        const cr = chirp[2 * k];
        const ci = chirp[2 * k + 1];
        out[2 * k] = re * cr - im * ci;
        out[2 * k + 1] = re * ci + im * cr;
      }
    },
  };
}
