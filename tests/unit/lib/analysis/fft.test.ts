import FFT from 'fft.js';
import { describe, expect, it } from 'vitest';
import { getFft, getRealDft, nextPowerOfTwo } from '../../../../src/lib/analysis/fft';
import { assertClose } from '../../../helpers/assert-close';
import { directDft, seededNormal } from '../../../helpers/seeded-random';

describe('fft helpers', () => {
  it('satisfies Parseval: Σ|x|² = (1/N)·Σ|X|² on random signals', () => {
    // Parseval's theorem for the DFT (e.g. Oppenheim & Schafer, Discrete-Time Signal Processing, §8.6).
    const normal = seededNormal(11);
    for (const n of [8, 64, 100, 256, 1000, 4096]) {
      const x = new Float64Array(n);
      for (let i = 0; i < n; i++) x[i] = normal();
      const X = new Float64Array(2 * n);
      getRealDft(n).forward(X, x);
      let time = 0;
      let freq = 0;
      for (let i = 0; i < n; i++) time += x[i] * x[i];
      for (let k = 0; k < n; k++) freq += X[2 * k] * X[2 * k] + X[2 * k + 1] * X[2 * k + 1];
      assertClose(freq / n, time, 1e-9 * time, `n=${n}`);
    }
  });

  it('matches a direct DFT on small power-of-two and other sizes', () => {
    // The DFT definition X_k = Σ x_n exp(−2πikn/N), evaluated term by term, is the independent reference.
    const normal = seededNormal(5);
    for (const n of [2, 3, 4, 5, 7, 8, 12, 16, 31, 32, 64, 100, 128]) {
      const x = new Float64Array(n);
      for (let i = 0; i < n; i++) x[i] = normal();
      const X = new Float64Array(2 * n);
      getRealDft(n).forward(X, x);
      assertClose(X, directDft(x), 1e-9 * n, `n=${n}`);
    }
  });

  it('the spectral kernels\' complex transform agrees with the direct DFT of ascending, sine and random inputs', () => {
    // generators after fft.js's own cross-verify test; the reference is the direct DFT. Sizes cover the radix-4
    // passes alone (powers of four) and with the closing radix-2 pass.
    const normal = seededNormal(9);
    for (const n of [2, 4, 8, 16, 32, 64, 128]) {
      for (const gen of [(i: number) => i, (i: number) => Math.sin((2 * Math.PI * 3 * i) / n), () => normal()]) {
        const x = Array.from({ length: n }, (_, i) => gen(i));
        const input = new Float64Array(2 * n);
        x.forEach((v, i) => (input[2 * i] = v));
        const out = new Float64Array(2 * n);
        getFft(n).transform(out, input);
        assertClose(out, directDft(x), 1e-9 * n * n, `n=${n}`);
      }
    }
  });

  it('agrees with fft.js, an independent implementation, on every operation from 2 to 65,536 points', () => {
    // fft.js (npm, radix-4, its own twiddle table) is the reference: forward, inverse (divided by n) and real
    // transforms. Relative to the spectrum's peak the two agree to rounding (a few ulps times log2 n).
    const normal = seededNormal(21);
    for (let n = 2; n <= 65536; n *= 2) {
      const reference = new FFT(n);
      const input = new Float64Array(2 * n).map(() => normal());
      const expected = new Float64Array(2 * n);
      const got = new Float64Array(2 * n);
      reference.transform(expected, input);
      getFft(n).transform(got, input);
      let peak = 0;
      for (const v of expected) peak = Math.max(peak, Math.abs(v));
      assertClose(got, expected, 1e-14 * peak * Math.log2(2 * n), `forward n=${n}`);
      reference.inverseTransform(expected, input);
      getFft(n).inverseTransform(got, input);
      assertClose(got, expected, (1e-14 * peak * Math.log2(2 * n)) / n, `inverse n=${n}`);
      const real = new Float64Array(n).map(() => normal());
      reference.realTransform(expected, real);
      reference.completeSpectrum(expected);
      getFft(n).realTransform(got, real);
      assertClose(got, expected, 1e-14 * peak * Math.log2(2 * n), `real n=${n}`);
    }
  });

  it('reads and writes only the first 2·n entries, and may transform an array in place', () => {
    const normal = seededNormal(4);
    const n = 256;
    const input = new Float64Array(2 * n + 10).map(() => normal());
    const out = new Float64Array(2 * n + 10).fill(7);
    getFft(n).transform(out, input);
    expect(Array.from(out.subarray(2 * n))).toEqual(new Array(10).fill(7));
    const copy = input.slice();
    getFft(n).transform(copy, copy);
    expect(Array.from(copy.subarray(0, 2 * n))).toEqual(Array.from(out.subarray(0, 2 * n)));
  });

  it('refuses an input shorter than the transform (it would read the last call\'s tail)', () => {
    const out = new Float64Array(64);
    expect(() => getFft(32).transform(out, new Float64Array(62))).toThrow(/31 points for a transform of 32/);
    expect(() => getFft(32).inverseTransform(out, new Float64Array(10))).toThrow(/transform of 32/);
    expect(() => getFft(32).realTransform(out, new Float64Array(31))).toThrow(/31 samples for a transform of 32/);
  });

  it('caches one transform per size and refuses sizes that are not powers of two', () => {
    expect(getFft(1024)).toBe(getFft(1024));
    expect(() => getFft(12)).toThrow(/power of two/);
    expect(nextPowerOfTwo(1537)).toBe(2048);
    expect(nextPowerOfTwo(1)).toBe(2);
  });
});
