import { describe, expect, it } from 'vitest';
import { hannWindow, welchPsd } from '../../../../src/lib/analysis/welch';
import { assertClose } from '../../../helpers/assert-close';
import { seededNormal } from '../../../helpers/seeded-random';

describe('Welch power spectrum', () => {
  it('gives white noise of variance σ² the one-sided density 2σ²/fs', () => {
    // One-sided PSD of white noise: total variance σ² spread evenly over 0 … fs/2 (common practice, e.g.
    // Bendat & Piersol, Random Data, from memory). Average over bins: 1 % tolerance at ~6000 segments × 64 bins.
    const normal = seededNormal(21);
    const fs = 250;
    const sigma = 3;
    const x = new Float64Array(200_000);
    for (let i = 0; i < x.length; i++) x[i] = sigma * normal();
    for (const [segment, overlap] of [[128, 64], [100, 50]]) {
      const { psd, frequencies, segments } = welchPsd(x, fs, segment, overlap);
      expect(segments).toBeGreaterThan(1000);
      expect(frequencies[1]).toBeCloseTo(fs / segment, 12);
      let mean = 0;
      let count = 0;
      for (let k = 2; k < psd.length - 2; k++) {
        mean += psd[k];
        count++;
      }
      assertClose(mean / count, (2 * sigma * sigma) / fs, 0.01 * ((2 * sigma * sigma) / fs), `segment ${segment}`);
    }
  });

  it('uses a periodic Hann window with an equivalent noise bandwidth of 1.5 bins', () => {
    // Harris, 1978, Proc. IEEE 66:51–83, Table 1: Hann window ENBW = 1.50 bins; ENBW = N·Σw²/(Σw)².
    for (const n of [64, 100, 512]) {
      const w = hannWindow(n);
      let s1 = 0;
      let s2 = 0;
      for (const v of w) {
        s1 += v;
        s2 += v * v;
      }
      assertClose((n * s2) / (s1 * s1), 1.5, 1e-12, `N=${n}`);
      expect(w[0]).toBe(0);
      assertClose(w[n / 2], 1, 1e-15);
    }
  });

  it('integrates a sinusoid of amplitude A to power A²/2', () => {
    // Mean power of A·sin is A²/2 (common practice); the density summed over bins × Δf recovers it.
    const fs = 200;
    const A = 5;
    const x = new Float64Array(20_000);
    for (let i = 0; i < x.length; i++) x[i] = A * Math.sin(2 * Math.PI * 17.3 * (i / fs));
    const { psd } = welchPsd(x, fs, 400, 200);
    let total = 0;
    for (const p of psd) total += p * (fs / 400);
    assertClose(total, (A * A) / 2, 0.01 * (A * A) / 2);
  });

  it('removes each segment mean and draws segments only inside the given spans', () => {
    const x = new Float64Array(1000).fill(7);
    const flat = welchPsd(x, 100, 100, 0);
    for (const p of flat.psd) assertClose(p, 0, 1e-20);
    // [0, 250): starts 0, 50, 100, 150; [300, 420): start 300
    expect(welchPsd(x, 100, 100, 50, [0, 250, 300, 420]).segments).toBe(4 + 1);
    expect(Number.isNaN(welchPsd(x, 100, 100, 0, [0, 50]).psd[0])).toBe(true);
    expect(() => welchPsd(x, 100, 100, 100)).toThrow(/spectrum\.overlap/);
  });
});
