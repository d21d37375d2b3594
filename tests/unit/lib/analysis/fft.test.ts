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

  it('fft.js complex transform agrees with the direct DFT of ascending, sine and random inputs', () => {
    // generators after fft.js's own cross-verify test; the reference is the direct DFT.
    const normal = seededNormal(9);
    for (const n of [2, 4, 8, 16, 32, 64]) {
      for (const gen of [(i: number) => i, (i: number) => Math.sin((2 * Math.PI * 3 * i) / n), () => normal()]) {
        const x = Array.from({ length: n }, (_, i) => gen(i));
        const f = getFft(n);
        const out = f.createComplexArray();
        f.transform(out, f.toComplexArray(x, undefined));
        assertClose(out, directDft(x), 1e-9 * n * n, `n=${n}`);
      }
    }
  });

  it('caches one fft.js instance per size and refuses sizes that are not powers of two', () => {
    expect(getFft(1024)).toBe(getFft(1024));
    expect(getFft(1024)).toBeInstanceOf(FFT);
    expect(() => getFft(12)).toThrow(/power of two/);
    expect(nextPowerOfTwo(1537)).toBe(2048);
    expect(nextPowerOfTwo(1)).toBe(2);
  });
});
