import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import {
  baselineIndices,
  baselineStats,
  normalizeAverage,
  normalizeTrials,
  normalizeValue,
  type BaselineMethod,
} from '../../../../src/lib/analysis/baseline';
import { assertClose } from '../../../helpers/assert-close';

const methods: BaselineMethod[] = ['decibel', 'percent-change', 'z-score', 'power-ratio'];

describe('baseline normalization', () => {
  it('doubling power is +3.0103 dB and ×10 is +10 dB', () => {
    // Definition of the decibel for power quantities, IEC 60027-3: L = 10·log10(P/P0) dB.
    assertClose(normalizeValue('decibel', 2, 1, NaN), 3.0103, 5e-5);
    assertClose(normalizeValue('decibel', 10, 1, NaN), 10, 1e-12);
    assertClose(normalizeValue('decibel', 0.5, 1, NaN), -3.0103, 5e-5);
  });

  it('picks baseline grid indices by rounding halves up', () => {
    // contract: round((start − epochs.start)·fs) … round((end − epochs.start)·fs) inclusive
    expect(baselineIndices(-0.5, -0.2, -1, 512)).toEqual({ first: 256, last: 410 }); // 409.6 → 410
    expect(baselineIndices(-0.5, 0, -1, 100)).toEqual({ first: 50, last: 100 });
    expect(baselineIndices(0.0025, 0.0075, 0, 200)).toEqual({ first: 1, last: 2 }); // 0.5 → 1, 1.5 → 2
  });

  it('computes each method on a hand-checked example, scope average', () => {
    // Worked on paper: baseline points [2, 4] → B = 3, S = √2 (sample SD, n − 1); P = 6.
    const row = Float64Array.of(2, 4, 6);
    const stats = baselineStats(row, 0, 0, 1);
    assertClose(stats.mean, 3, 1e-15);
    assertClose(stats.sd, Math.SQRT2, 1e-15);
    const b = { first: 0, last: 1 };
    assertClose(normalizeAverage(row, 3, b, 'power-ratio'), [2 / 3, 4 / 3, 2], 1e-15);
    assertClose(normalizeAverage(row, 3, b, 'percent-change'), [-100 / 3, 100 / 3, 100], 1e-12);
    assertClose(normalizeAverage(row, 3, b, 'z-score'), [-1 / Math.SQRT2, 1 / Math.SQRT2, 3 / Math.SQRT2], 1e-12);
    assertClose(normalizeAverage(row, 3, b, 'decibel'), [10 * Math.log10(2 / 3), 10 * Math.log10(4 / 3), 10 * Math.log10(2)], 1e-12);
  });

  it('normalizes each trial by its own baseline in scope trial', () => {
    // Two trials, baseline = first point. Trial A [1, 4] → ratio [1, 4]; trial B [10, 20] → ratio [1, 2].
    // Scope trial: mean of ratios = [1, 3]. Scope average: mean power [5.5, 12], ratio [1, 12/5.5 = 2.1818…].
    const a = Float64Array.of(1, 4);
    const bTrial = Float64Array.of(10, 20);
    const idx = { first: 0, last: 0 };
    assertClose(normalizeTrials([a, bTrial], 2, idx, 'power-ratio'), [1, 3], 1e-15);
    assertClose(normalizeAverage(Float64Array.of(5.5, 12), 2, idx, 'power-ratio'), [1, 12 / 5.5], 1e-15);
    // dB, scope trial: mean(10·log10 4, 10·log10 2) = 10·log10(√8) = 4.5154 dB
    assertClose(normalizeTrials([a, bTrial], 2, idx, 'decibel')[1], 4.5154, 5e-5);
    // percent, scope trial: mean(300 %, 100 %) = 200 %
    assertClose(normalizeTrials([a, bTrial], 2, idx, 'percent-change')[1], 200, 1e-12);
    // zscore, scope trial, baseline = both points: A → B 2.5, S 2.1213; B → B 15, S 7.0711; value at point 1:
    // (4 − 2.5)/2.1213 = 0.70711 and (20 − 15)/7.0711 = 0.70711; mean 0.70711
    assertClose(normalizeTrials([a, bTrial], 2, { first: 0, last: 1 }, 'z-score')[1], Math.SQRT1_2, 1e-12);
  });

  const positiveRow = fc.array(fc.double({ min: 1e-6, max: 1e6, noNaN: true }), { minLength: 3, maxLength: 30 });

  it('a baseline equal to the signal gives 0 dB, 0 % and ratio 1', () => {
    // property of the definitions: P = B ⇒ log10 1 = 0, (P − B)/B = 0, P/B = 1
    fc.assert(
      fc.property(fc.double({ min: 1e-9, max: 1e9, noNaN: true }), (p) => {
        expect(normalizeValue('decibel', p, p, 1)).toBe(0);
        expect(normalizeValue('percent-change', p, p, 1)).toBe(0);
        expect(normalizeValue('power-ratio', p, p, 1)).toBe(1);
      }),
    );
    fc.assert(
      fc.property(fc.double({ min: 1e-6, max: 1e6, noNaN: true }), fc.integer({ min: 2, max: 20 }), (p, n) => {
        const flat = new Float64Array(n).fill(p);
        const out = normalizeAverage(flat, n, { first: 0, last: n - 1 }, 'decibel');
        for (const v of out) assertClose(v, 0, 1e-12);
      }),
    );
  });

  it('scaling all power by a constant leaves every method unchanged', () => {
    // homogeneity of the definitions: each is a ratio of power to power (or of differences), so c cancels.
    fc.assert(
      fc.property(positiveRow, fc.double({ min: 1e-3, max: 1e3, noNaN: true }), (values, c) => {
        const row = Float64Array.from(values);
        // z-score needs a baseline spread well above rounding (S ≫ ε·B)
        fc.pre(Math.abs(row[0] - row[1]) > 1e-6 * Math.max(row[0], row[1]));
        const scaled = row.map((v) => v * c);
        const b = { first: 0, last: 1 };
        for (const m of methods) {
          const x = normalizeAverage(row, row.length, b, m);
          const y = normalizeAverage(scaled, row.length, b, m);
          for (let i = 0; i < x.length; i++) {
            if (!Number.isFinite(x[i])) continue; // zscore with equal baseline points has S = 0
            assertClose(y[i], x[i], 1e-9 * Math.max(1, Math.abs(x[i])), m);
          }
          const t = normalizeTrials([row, row.map((v) => v * 2)], row.length, b, m);
          const u = normalizeTrials([scaled, scaled.map((v) => v * 2)], row.length, b, m);
          for (let i = 0; i < t.length; i++) if (Number.isFinite(t[i])) assertClose(u[i], t[i], 1e-9 * Math.max(1, Math.abs(t[i])), m);
        }
      }),
    );
  });
});
