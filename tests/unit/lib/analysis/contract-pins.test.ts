// Rules of the analysis contract (shared/specs/analysis.md) checked one by one against values worked by hand or
// computed here by a direct formula that shares no code with the implementation.
import { describe, expect, it } from 'vitest';
import { selectEpochs } from '../../../../src/lib/analysis/epochs';
import { welchPsd } from '../../../../src/lib/analysis/welch';
import { fitAperiodic } from '../../../../src/lib/analysis/aperiodic';
import { runRecipe } from '../../../../src/lib/analysis/run-recipe';
import type { Recording } from '../../../../src/lib/analysis/recording';
import { assertClose } from '../../../helpers/assert-close';

describe('epoch start sample = round(o·fs) + round(start·fs), halves up', () => {
  it('rounds both terms separately, halves up', () => {
    // o·fs = 1.001 × 500 = 500.5 → 501; start·fs = −0.501 × 500 = −250.5 → −250; start = 251 (by hand).
    const sel = selectEpochs([{ onsetSeconds: 1.001, durationSeconds: 0, label: 'a' }], 'a', -0.501, 10, 500, 10_000);
    expect([...sel.starts]).toEqual([251]);
  });
  it('keeps exact sample positions deep into a long recording', () => {
    // 7,200 s at 1,000 Hz: o·fs = 7,200,000.4 → 7,200,000; start = −1 s → −1,000.
    const sel = selectEpochs([{ onsetSeconds: 7200.0004, durationSeconds: 0, label: 'a' }], 'a', -1, 3, 1000, 8_000_000);
    expect([...sel.starts]).toEqual([7_199_000]);
  });
});

describe('Welch density is doubled except at 0 Hz and Nyquist', () => {
  it('equals a direct periodogram of one Hann-windowed, mean-removed segment', () => {
    const x = [3, -1, 4, 1, -5, 9, 2, -6];
    const n = x.length;
    const fs = 16;
    // Direct DFT X_k = Σ x_m w_m e^{−2πikm/N}, periodic Hann w_m = 0.5 − 0.5 cos(2πm/N) (Harris, 1978).
    const mean = x.reduce((a, b) => a + b, 0) / n;
    const w = x.map((_, m) => 0.5 - 0.5 * Math.cos((2 * Math.PI * m) / n));
    const sw2 = w.reduce((a, b) => a + b * b, 0);
    const expected: number[] = [];
    for (let k = 0; k <= n / 2; k++) {
      let re = 0;
      let im = 0;
      for (let m = 0; m < n; m++) {
        const v = (x[m] - mean) * w[m];
        re += v * Math.cos((2 * Math.PI * k * m) / n);
        im -= v * Math.sin((2 * Math.PI * k * m) / n);
      }
      const oneSided = k === 0 || k === n / 2 ? 1 : 2;
      expected.push((oneSided * (re * re + im * im)) / (fs * sw2));
    }
    const got = welchPsd(x, fs, n, 0);
    expect(got.segments).toBe(1);
    assertClose(got.psd, expected, 1e-12, 'psd');
    assertClose(got.frequencies, [0, 2, 4, 6, 8], 1e-12, 'bins k·fs/N');
  });
});

describe('aperiodic r² and RMSE are in log10 units', () => {
  it('match the hand-computed values for a line plus known residuals', () => {
    // log10 P = 2 − 1.5·log10 f + r, at log10 f = 0, .25, .5, .75, 1 with r = δ·[1, −2, 0, 2, −1]. r sums to zero
    // and is orthogonal to log10 f, so least squares returns the line exactly; RMSE = √(10δ²/5) = δ√2, and
    // r² = 1 − Σr²/Σ(y − ȳ)², where Σ(y − ȳ)² = 1.5²·Σ(x − 0.5)² + Σr² = 2.25 × 0.625 + 10δ² (the cross term
    // vanishes because r ⟂ x; by hand).
    const d = 0.01;
    const xs = [0, 0.25, 0.5, 0.75, 1];
    const r = [d, -2 * d, 0, 2 * d, -d];
    const f = xs.map((x) => 10 ** x);
    const p = xs.map((x, i) => 10 ** (2 - 1.5 * x + r[i]));
    const fit = fitAperiodic(f, p, [1, 10], 'power-law', { robust: false });
    assertClose(fit.exponent, 1.5, 1e-9, 'exponent');
    assertClose(fit.offset, 2, 1e-9, 'offset');
    assertClose(fit.rmse, d * Math.SQRT2, 1e-9, 'rmse');
    assertClose(fit.r2, 1 - (10 * d * d) / (2.25 * 0.625 + 10 * d * d), 1e-12, 'r2');
  });
});

describe('edgeSeconds = 3σ with σ = n/(2πf)', () => {
  it('follows the cycles at each frequency of the grid', () => {
    const fs = 200;
    const samples = 20 * fs;
    const data = [Float32Array.from({ length: samples }, (_, i) => Math.sin(i / 7))];
    const recording: Recording = {
      sampleRateHz: fs,
      channelNames: ['Cz'],
      data,
      events: [5, 10, 15].map((o) => ({ onsetSeconds: o, durationSeconds: 0, label: 'cue' })),
    };
    const result = runRecipe(recording, {
      format: 2,
      epochs: { events: ['cue'], start: -1, end: 2 },
      frequencies: { min: 2, max: 8, count: 3, spacing: 'log' },
      cycles: { fixed: 3 },
      baseline: { start: -0.5, end: -0.2, method: 'decibel', scope: 'average' },
      spectrum: { segment: 2, overlap: 0.5, range: [1, 45], source: 'recording' },
      aperiodic: { range: [2, 40], model: 'power-law' },
    });
    // The contract's own example: 2 Hz with 3 cycles gives 3 × 3/(2π × 2) = 0.716 s.
    assertClose(result.edgeSeconds[0], 0.7162, 1e-4, '2 Hz');
    for (let i = 0; i < 3; i++) assertClose(result.edgeSeconds[i], (3 * 3) / (2 * Math.PI * result.frequencies[i]), 1e-12, `f${i}`);
  });
});
