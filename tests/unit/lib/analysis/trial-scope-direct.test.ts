// Scope `trial` (analysis contract, "Baseline normalization": each trial normalized by its own baseline B_k, then
// averaged) is computed from each trial's coarse samples and, in decibels, from one full-resolution row per pair of
// trials (src/lib/analysis/trial-products.ts). These checks hold it to the slow, obvious computation: complex Morlet
// wavelet convolution written out as a sum in the time domain (Tallon-Baudry et al., 1997, J Neurosci 17:722;
// Cohen, 2014, "Analyzing Neural Time Series Data", ch. 12–13), then the contract's formulas trial by trial. The
// wavelet here is built from the contract's own definition with Math's functions, not from src/lib/analysis.
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import type { BaselineMethod } from '../../../../src/lib/analysis/baseline';
import { decomposeChannel } from '../../../../src/lib/analysis/decompose';
import { gaussianSigmas, getWaveletBank } from '../../../../src/lib/analysis/wavelet';
import { seededNormal } from '../../../helpers/seeded-random';
import { directPower } from '../../../helpers/direct-morlet';

// Scenarios of our own. Short: one channel at 128 Hz, epochs of 1.5 s (193 points), a 9 Hz burst in the second
// half of every other epoch over background noise. Long: 512 Hz, 0.5 s epochs, wavelets of 5 cycles from 1.5 Hz and
// a 14 Hz burst, so the trial groups of decibels (trial-products.ts, `groupPlan`) take rows both interpolated and
// straight on every time point, with blocks of two or more trials on the coarse grid.
interface Setup {
  fs: number;
  L: number;
  freqs: Float64Array;
  sigmas: Float64Array;
  first: number;
  last: number;
  burst: number;
}
const short: Setup = { fs: 128, L: 193, freqs: Float64Array.of(4, 9, 21), sigmas: gaussianSigmas(Float64Array.of(4, 9, 21), { min: 3, max: 7 }), first: 20, last: 60, burst: 9 };
const long: Setup = { fs: 512, L: 257, freqs: Float64Array.of(1.5, 4, 14, 21), sigmas: gaussianSigmas(Float64Array.of(1.5, 4, 14, 21), { fixed: 5 }), first: 30, last: 90, burst: 14 };

function epochs(trials: number, seed: number, setup: Setup = short, line = 0): { x: Float32Array; starts: Int32Array } {
  const { L, fs, burst } = setup;
  const normal = seededNormal(seed);
  const starts = Int32Array.from({ length: trials }, (_, k) => 30 + k * (L + 11));
  const x = new Float32Array(starts[trials - 1] + L + 30);
  // an offset the epoch means take out, and optionally mains hum at 50 Hz
  for (let i = 0; i < x.length; i++) x[i] = 5 * normal() + 12 + line * Math.sin((2 * Math.PI * 50 * i) / fs);
  for (let k = 0; k < trials; k += 2) {
    for (let j = Math.round(0.57 * L); j < Math.round(0.88 * L); j++) x[starts[k] + j] += 4 * Math.sin(2 * Math.PI * burst * (j / fs));
  }
  return { x, starts };
}


/** The contract's scope `trial`, term by term: mean over trials of the method applied to P_k(t) and B_k. */
function byDefinition(x: Float32Array, starts: Int32Array, method: BaselineMethod, setup: Setup = short): Float64Array {
  const { freqs, sigmas, fs, L, first, last } = setup;
  const bank = getWaveletBank(freqs, sigmas, fs, L);
  const out = new Float64Array(freqs.length * L);
  for (let k = 0; k < starts.length; k++) {
    for (let f = 0; f < freqs.length; f++) {
      const p = directPower(x, starts[k], freqs[f], sigmas[f], bank.halfWidths[f], setup.L, setup.fs);
      let b = 0;
      for (let j = first; j <= last; j++) b += p[j];
      b /= last - first + 1;
      for (let j = 0; j < L; j++) {
        const v = method === 'decibel' ? 10 * Math.log10(p[j] / b) : method === 'percent-change' ? (100 * (p[j] - b)) / b : p[j] / b;
        out[f * L + j] += v / starts.length;
      }
    }
  }
  return out;
}

function decompose(x: Float32Array, starts: Int32Array, method: BaselineMethod, scope: 'trial' | 'average' = 'trial', setup: Setup = short) {
  const { freqs, sigmas, fs, L, first, last } = setup;
  return decomposeChannel({ samples: x, epochStarts: [starts], epochSamples: L, sampleRateHz: fs, frequencies: freqs, sigmas, baseline: { first, last, method, scope } });
}

function worstDifference(a: Float64Array, b: Float64Array): number {
  let worst = 0;
  for (let i = 0; i < a.length; i++) worst = Math.max(worst, Math.abs(a[i] - b[i]));
  return worst;
}

describe('scope trial against direct wavelet convolution', () => {
  // 7 trials: three pairs and one trial on its own; 8: pairs only; 17 and 33: trials are paired in blocks of 16, so
  // these cross block boundaries and end with a short odd block after full ones.
  for (const trials of [7, 8, 17, 33]) {
    it(`matches the definition for decibels, percent change and power ratio (${trials} trials)`, () => {
      const { x, starts } = epochs(trials, 40 + trials);
      // Tolerances: the bank drops wavelet bins below 1e-13 of the peak (wavelet.ts), so powers agree to ~1e-12
      // relative (measured: 1e-13 dB); the rest is rounding.
      const limits: Record<string, number> = { decibel: 1e-10, 'percent-change': 1e-9, 'power-ratio': 1e-11 };
      for (const method of ['decibel', 'percent-change', 'power-ratio'] as const) {
        const got = decompose(x, starts, method).normalized[0];
        const want = byDefinition(x, starts, method);
        expect(worstDifference(got, want), method).toBeLessThan(limits[method]);
      }
    });
  }

  // Decibels in the long scenario. 1, 3, 5, 9 and 24 trials leave groups and blocks of every kind of remainder
  // (a lone trial, a short block, a short group after full ones, a group that spans two epoch blocks of 16).
  for (const trials of [1, 3, 5, 9, 24]) {
    it(`matches the definition in decibels with groups of trials (${trials} trials)`, () => {
      const { x, starts } = epochs(trials, 70 + trials, long);
      const got = decompose(x, starts, 'decibel', 'trial', long).normalized[0];
      expect(worstDifference(got, byDefinition(x, starts, 'decibel', long))).toBeLessThan(1e-10);
    });
  }

  it('matches the definition in decibels under strong mains hum, whose epochs have sharp edges', () => {
    // A 50 Hz line 10,000 times the noise (sd 5 µV): cut into epochs, its edges put power at every frequency near the epoch
    // ends, so each trial's power spans many decades and a group's product spans that many times more. Groups
    // whose interpolated row cannot hold such a dip hand over each trial's own row (TrialGroups.rows).
    const { x, starts } = epochs(24, 5, long, 50000);
    const got = decompose(x, starts, 'decibel', 'trial', long).normalized[0];
    expect(got.every(Number.isFinite)).toBe(true);
    expect(worstDifference(got, byDefinition(x, starts, 'decibel', long))).toBeLessThan(1e-9);
  });

  it('keeps the trial-averaged power of scope average to the last bit', () => {
    const { x, starts } = epochs(7, 3);
    for (const method of ['decibel', 'percent-change'] as const) {
      expect(Array.from(decompose(x, starts, method).power[0])).toEqual(Array.from(decompose(x, starts, method, 'average').power[0]));
    }
  });
});

describe('scope trial, properties (fast-check)', () => {
  const cases = fc.record({ seed: fc.integer({ min: 1, max: 1_000_000 }), trials: fc.integer({ min: 1, max: 9 }) });

  it('does not depend on the order of the trials beyond rounding (the pairs change)', () => {
    fc.assert(
      fc.property(cases, fc.integer({ min: 1, max: 1_000 }), ({ seed, trials }, shuffle) => {
        const { x, starts } = epochs(trials, seed);
        const order = Array.from(starts).sort((a, b) => ((a * shuffle) % 97) - ((b * shuffle) % 97) || a - b);
        for (const method of ['decibel', 'percent-change'] as const) {
          const a = decompose(x, starts, method).normalized[0];
          const b = decompose(x, Int32Array.from(order), method).normalized[0];
          expect(worstDifference(a, b)).toBeLessThan(1e-9);
        }
      }),
      { numRuns: 15 },
    );
  });

  it('equals scope average for a single trial (both are P/B)', () => {
    fc.assert(
      fc.property(fc.integer({ min: 1, max: 1_000_000 }), (seed) => {
        const { x, starts } = epochs(1, seed);
        for (const method of ['decibel', 'percent-change', 'power-ratio'] as const) {
          expect(worstDifference(decompose(x, starts, method).normalized[0], decompose(x, starts, method, 'average').normalized[0])).toBeLessThan(1e-9);
        }
      }),
      { numRuns: 15 },
    );
  });

  it('keeps the mean of logarithms under the logarithm of the mean, and percent change = 100·(ratio − 1)', () => {
    // (1/K)·Σ log(P_k/B_k) ≤ log((1/K)·Σ P_k/B_k) (Jensen's inequality; arithmetic–geometric mean inequality).
    fc.assert(
      fc.property(cases, ({ seed, trials }) => {
        const { x, starts } = epochs(trials, seed);
        const db = decompose(x, starts, 'decibel').normalized[0];
        const ratio = decompose(x, starts, 'power-ratio').normalized[0];
        const percent = decompose(x, starts, 'percent-change').normalized[0];
        for (let i = 0; i < db.length; i++) {
          expect(db[i]).toBeLessThanOrEqual(10 * Math.log10(ratio[i]) + 1e-9);
          expect(Math.abs(percent[i] - 100 * (ratio[i] - 1))).toBeLessThan(1e-9 * Math.max(1, Math.abs(percent[i])));
        }
      }),
      { numRuns: 15 },
    );
  });
});
