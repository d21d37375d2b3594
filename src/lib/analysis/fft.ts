import FFT from 'fft.js';
import { AnalysisInputError } from './errors';
import { cos, sin } from './portable-math';

// fft.js builds its twiddle table in the constructor; a wavelet bank or a Welch run asks for the same few sizes
// thousands of times, so instances are kept per size.
const fftCache = new Map<number, FFT>();

export function isPowerOfTwo(n: number): boolean {
  return Number.isInteger(n) && n >= 2 && (n & (n - 1)) === 0;
}

/** Smallest power of two ≥ n (and ≥ 2). */
export function nextPowerOfTwo(n: number): number {
  let p = 2;
  while (p < n) p *= 2;
  return p;
}

/** The shared fft.js instance for a power-of-two size. */
export function getFft(size: number): FFT {
  let f = fftCache.get(size);
  if (f === undefined) {
    if (!isPowerOfTwo(size)) throw new AnalysisInputError('fft.size', `must be a power of two ≥ 2 (got ${size})`);
    f = new FFT(size);
    // fft.js fills its twiddle table with Math.cos/Math.sin, whose last bit differs between engines; refill it with
    // the same formula in portable math so a transform gives the same bits in the browser and in Node.
    const table = (f as unknown as { table: number[] }).table;
    for (let i = 0; i < table.length; i += 2) {
      const angle = (Math.PI * i) / size;
      table[i] = cos(angle);
      table[i + 1] = -sin(angle);
    }
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
 * A real-input DFT of any length ≥ 1. Powers of two go straight to fft.js `realTransform`; other lengths use
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
