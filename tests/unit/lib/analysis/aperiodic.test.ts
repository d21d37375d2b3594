import { describe, expect, it } from 'vitest';
import { fitAperiodic } from '../../../../src/lib/analysis/aperiodic';
import { welchPsd } from '../../../../src/lib/analysis/welch';
import { assertClose } from '../../../helpers/assert-close';
import { coloredNoise, seededNormal } from '../../../helpers/seeded-random';

const fs = 256;
const length = 1 << 16; // 256 s
const segment = 512; // 2 s, 0.5 Hz bins

function spectrumOf(x: Float64Array) {
  return welchPsd(x, fs, segment, segment / 2);
}

// Adds a·sin(2π·10·t), with a set so the peak bin stands `gain` times above the aperiodic density at 10 Hz:
// a Hann-windowed sinusoid puts (a²/2)/(1.5·Δf) into its bin (ENBW 1.5 bins, Harris, 1978, Proc. IEEE 66:51–83).
function withPeak(x: Float64Array, gain: number): Float64Array {
  const base = spectrumOf(x);
  const p10 = base.psd[20];
  const a = Math.sqrt(2 * 1.5 * (fs / segment) * gain * p10);
  return x.map((v, i) => v + a * Math.sin(2 * Math.PI * 10 * (i / fs)));
}

describe('aperiodic fit', () => {
  it('recovers the exponent of colored noise, 1.0 to 2.5, within ±0.1', () => {
    // Synthesized with PSD ∝ f^(−χ); in log-log that is a line of slope −χ (definition of the fixed model).
    for (const chi of [1.0, 1.5, 2.0, 2.5]) {
      const { frequencies, psd } = spectrumOf(coloredNoise(length, fs, chi, 100 + chi * 10));
      const fit = fitAperiodic(frequencies, psd, [2, 40], 'power-law');
      assertClose(fit.exponent, chi, 0.1, `χ=${chi}`);
      expect(fit.knee).toBeNull();
      expect(fit.r2).toBeGreaterThan(0.95);
      expect(fit.rmse).toBeLessThan(0.1);
    }
  });

  it('stays within ±0.15 with a strong narrow 10 Hz peak while a naive fit is biased', () => {
    // The robust fit follows Donoghue et al., 2020, Nature Neuroscience 23:1655–1665: the aperiodic line is fitted
    // to points not raised by oscillatory peaks. The naive single least-squares fit must show the peak's pull.
    for (const chi of [1.0, 1.5, 2.0, 2.5]) {
      const x = withPeak(coloredNoise(length, fs, chi, 200 + chi * 10), 100); // 20 dB above the aperiodic line
      const { frequencies, psd } = spectrumOf(x);
      const robust = fitAperiodic(frequencies, psd, [2, 40], 'power-law');
      const naive = fitAperiodic(frequencies, psd, [2, 40], 'power-law', { robust: false });
      assertClose(robust.exponent, chi, 0.15, `robust χ=${chi}`);
      expect(robust.excluded).toBeGreaterThan(0);
      expect(Math.abs(naive.exponent - chi), `naive χ=${chi} gave ${naive.exponent}, robust ${robust.exponent}`).toBeGreaterThan(0.1);
      expect(Math.abs(naive.exponent - chi)).toBeGreaterThan(3 * Math.abs(robust.exponent - chi));
    }
  });

  it('recovers offset, knee and exponent of the knee model by Levenberg–Marquardt', () => {
    // log10 P = b − log10(k + f^χ) evaluated exactly (the contract's knee model), then with multiplicative noise.
    const b = 3;
    const k = 40;
    const chi = 2;
    const f = Float64Array.from({ length: 119 }, (_, i) => 1 + i * 0.5);
    const exact = f.map((v) => Math.pow(10, b) / (k + Math.pow(v, chi)));
    const fit = fitAperiodic(f, exact, [1, 60], 'power-law-knee');
    assertClose(fit.exponent, chi, 1e-3, 'exponent');
    assertClose(fit.knee!, k, 0.1, 'power-law-knee');
    assertClose(fit.offset, b, 1e-3, 'offset');
    assertClose(fit.r2, 1, 1e-6);
    // the knee frequency of the contract, knee^(1/exponent): 40^(1/2) = 6.3246 Hz (by hand)
    assertClose(fit.kneeHz!, Math.sqrt(40), 1e-3, 'knee frequency');
    expect(fitAperiodic(f, exact, [1, 60], 'power-law').kneeHz).toBeNull();
    const normal = seededNormal(77);
    const noisy = exact.map((v) => v * Math.pow(10, 0.03 * normal()));
    const nfit = fitAperiodic(f, noisy, [1, 60], 'power-law-knee');
    assertClose(nfit.exponent, chi, 0.1, 'noisy exponent');
    // a fixed fit of the same knee spectrum is flatter than χ: the knee model is doing real work
    expect(fitAperiodic(f, exact, [1, 60], 'power-law').exponent).toBeLessThan(chi - 0.2);
  });

  it('reports r² and RMSE over all bins in range, the kept-bin figures beside them, and the peak above the line', () => {
    // A spectrum of our own: log10 P = 2 − 1.5·log10 f + 0.6·exp(−(f − 10)²/2) + noise (SD 0.02), 0.25 Hz bins.
    // The Gaussian bump has centre 10 Hz, height 0.6 and full width at half height 2·√(2 ln 2)·1 = 2.355 Hz.
    const normal = seededNormal(5);
    const f = Float64Array.from({ length: 157 }, (_, i) => 1 + 0.25 * i);
    const logP = f.map((v) => 2 - 1.5 * Math.log10(v) + 0.6 * Math.exp(-((v - 10) ** 2) / 2) + 0.02 * normal());
    const fit = fitAperiodic(f, logP.map((v) => 10 ** v), [1, 40], 'power-law');
    // r² and RMSE over every bin, computed here from the returned line (independent of the core's sums)
    const res = Array.from(f, (v, i) => logP[i] - (fit.offset - fit.exponent * Math.log10(v)));
    const mean = logP.reduce((a, b) => a + b, 0) / f.length;
    const ssTot = logP.reduce((a, v) => a + (v - mean) ** 2, 0);
    const ssRes = res.reduce((a, r) => a + r * r, 0);
    assertClose(fit.r2, 1 - ssRes / ssTot, 1e-9, 'r² over all bins');
    assertClose(fit.rmse, Math.sqrt(ssRes / f.length), 1e-9, 'RMSE over all bins');
    expect(fit.rmseKept).toBeLessThan(0.03); // the line through the kept bins fits to about the noise
    expect(fit.rmse).toBeGreaterThan(2 * fit.rmseKept); // the peak counts against the fit over all bins
    expect(fit.r2).toBeLessThan(fit.r2Kept);
    const big = fit.peaks.filter((p) => p.heightLog10 > 0.2);
    expect(big).toHaveLength(1);
    assertClose(big[0].centreHz, 10, 0.25, 'peak centre (within one 0.25 Hz bin, noise included)');
    assertClose(big[0].heightLog10, 0.6, 0.06, 'peak height');
    assertClose(big[0].bandwidthHz, 2.355, 0.3, 'peak FWHM');
  });

  it('names the range when it holds too few bins', () => {
    expect(() => fitAperiodic([0, 1, 2, 3], [1, 1, 1, 1], [2.5, 2.9], 'power-law')).toThrow(/aperiodic\.range/);
  });
});
