// The aperiodic line drawn on the Spectrum screen is the fitted model, in the engine's portable maths
// (src/lib/analysis/aperiodic.ts, `aperiodicLine`). Models as in Donoghue et al. (2020, Nat Neurosci 23:1655–1665):
// log10 P = offset − exponent·log10 f, and with a knee log10 P = offset − log10(knee + f^exponent).
import { describe, expect, it } from 'vitest';
import { aperiodicLine, fitAperiodic } from '../../../../src/lib/analysis/aperiodic';
import { log10, pow } from '../../../../src/lib/analysis/portable-math';

describe('aperiodicLine', () => {
  it('evaluates both models by their formulas', () => {
    expect(aperiodicLine({ offset: 2, exponent: 1.5, knee: null }, 10)).toBe(2 - 1.5 * log10(10));
    expect(aperiodicLine({ offset: 2, exponent: 1.5, knee: null }, 10)).toBeCloseTo(0.5, 14);
    expect(aperiodicLine({ offset: 3, exponent: 2, knee: 100 }, 10)).toBe(3 - log10(100 + pow(10, 2)));
    expect(aperiodicLine({ offset: 3, exponent: 2, knee: 100 }, 10)).toBeCloseTo(3 - Math.log10(200), 14);
  });

  it('reproduces the spectrum a noiseless power law was fitted on', () => {
    const f = Float64Array.from({ length: 40 }, (_, i) => 1 + i);
    const psd = Float64Array.from(f, (x) => 100 * x ** -1.5);
    const fit = fitAperiodic(f, psd, [1, 40], 'power-law');
    for (const x of [1, 7, 40]) expect(aperiodicLine(fit, x)).toBeCloseTo(Math.log10(100 * x ** -1.5), 9);
  });
});
