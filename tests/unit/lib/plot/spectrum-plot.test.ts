import { describe, expect, it } from 'vitest';
import { spectrumPlotModel } from '../../../../src/lib/plot/spectrum-plot';
import { assertClose } from '../../../helpers/assert-close';

// Three epochs of a 1/f² spectrum scaled by 1, 2 and 4 over 1…8 Hz, a recipe spectrum over 0…10 Hz, and the fit
// log10 P = 1 − 2·log10 f (a power law: offset 1, exponent 2; Donoghue et al., 2020, eq. 1 without knee).
const frequencies = Float64Array.from([1, 2, 3, 4, 5, 6, 7, 8]);
const base = Array.from(frequencies, (f) => 10 / (f * f));
const perTrial = Float64Array.from([...base, ...base.map((v) => 2 * v), ...base.map((v) => 4 * v)]);
const recipe = { frequencies: Float64Array.from({ length: 11 }, (_, i) => i), psd: Float64Array.from({ length: 11 }, (_, i) => (i === 0 ? 0 : 20 / (i * i))) };
const fit = { offset: 1, exponent: 2, knee: null };

describe('spectrumPlotModel', () => {
  const model = spectrumPlotModel({ frequencies, perTrial, trials: 3, recipe, fit, fitRange: [2, 6], axes: 'log-log', showEpochs: false });

  it('keeps the recipe spectrum to the per-epoch bins and draws no epoch line unless asked', () => {
    expect(Array.from(model.mean.xs)).toEqual([1, 2, 3, 4, 5, 6, 7, 8]);
    expect(model.epochs).toEqual([]);
    expect(spectrumPlotModel({ frequencies, perTrial, trials: 3, recipe, fit, fitRange: [2, 6], axes: 'log-log', showEpochs: true }).epochs).toHaveLength(3);
  });
  it('spreads from the 10th to the 90th percentile across epochs (definition 7: 1.2× and 3.6× the base here)', () => {
    // Sorted scale factors [1, 2, 4]: h = 0.2 → 1 + 0.2·(2 − 1) = 1.2; h = 1.8 → 2 + 0.8·(4 − 2) = 3.6.
    assertClose(model.spread.low, base.map((v) => 1.2 * v), 1e-12);
    assertClose(model.spread.high, base.map((v) => 3.6 * v), 1e-12);
  });
  it('draws the fit as 10^(offset − exponent·log10 f) over the fit range, and what lies above it', () => {
    assertClose(model.fitLine!.xs, [2, 3, 4, 5, 6], 0);
    assertClose(model.fitLine!.ys, [2, 3, 4, 5, 6].map((f) => 10 / (f * f)), 1e-12);
    // The recipe spectrum is twice the fitted line: log10 2 above it everywhere.
    assertClose(model.aboveLine, model.mean.xs.map(() => Math.log10(2)), 1e-12);
  });
  it('spans the y axis over the band and the mean only (positive values on a log axis)', () => {
    expect(model.yDomain[0]).toBeCloseTo(1.2 * (10 / 64), 12);
    expect(model.yDomain[1]).toBeCloseTo(3.6 * 10, 12); // the 90th percentile at 1 Hz is above the mean's 20
    expect(model.xDomain).toEqual([1, 8]);
  });
});
