// Live single-trial re-normalization from each trial's coarse samples (renormalize.ts, decompose.ts `CoarseTrials`):
// percent change and power ratio in scope `trial` are Σ_k P_k(t)/(K·B_k), and each P_k is fixed exactly by its S_f
// coarse samples, so the weighted sum is taken on the coarse grid and interpolated once. Checked against
//  - the analysis contract's definition ("Baseline normalization", scope trial: each trial normalized by its own
//    baseline mean B_k, then averaged) over power from complex Morlet wavelet convolution written out as a sum in the
//    time domain (Tallon-Baudry et al., 1997, J Neurosci 17:722; Cohen, 2014, "Analyzing Neural Time Series Data",
//    ch. 12–13), with Math's functions, not src/lib/analysis;
//  - today's row-by-row sweep over the stored trials (the same formula, another path);
//  - `interpolatePower` for the two-rows-in-one-transform interpolation.
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { decomposeChannel, interpolatePower } from '../../../../src/lib/analysis/decompose';
import { interpolateTwo, prepareTrialPower, renormalizeTrials } from '../../../../src/lib/analysis/renormalize';
import { gaussianSigmas, getWaveletBank } from '../../../../src/lib/analysis/wavelet';
import { seededNormal } from '../../../helpers/seeded-random';
import { directPower } from '../../../helpers/direct-morlet';

// Scenario of our own: one channel at 160 Hz, epochs of 1.5 s (240 points), a 11 Hz "lantern" burst in the second
// half of every third epoch over background noise with an offset.
const fs = 160;
const L = 240;
const freqs = Float64Array.of(5, 11, 26, 40);
const sigmas = gaussianSigmas(freqs, { min: 3, max: 8 });

function epochs(trials: number, seed: number): { x: Float32Array; starts: Int32Array } {
  const normal = seededNormal(seed);
  const starts = Int32Array.from({ length: trials }, (_, k) => 40 + k * (L + 13));
  const x = new Float32Array(starts[trials - 1] + L + 40);
  for (let i = 0; i < x.length; i++) x[i] = 4 * normal() + 9;
  for (let k = 0; k < trials; k += 3) for (let j = 130; j < 200; j++) x[starts[k] + j] += 5 * Math.sin(2 * Math.PI * 11 * (j / fs));
  return { x, starts };
}


/** The contract's scope `trial`, term by term, from directly convolved power. */
function byDefinition(direct: Float64Array[][], first: number, last: number, method: 'percent-change' | 'power-ratio'): Float64Array {
  const out = new Float64Array(freqs.length * L);
  const K = direct.length;
  for (let k = 0; k < K; k++) {
    for (let f = 0; f < freqs.length; f++) {
      const p = direct[k][f];
      let b = 0;
      for (let j = first; j <= last; j++) b += p[j];
      b /= last - first + 1;
      for (let j = 0; j < L; j++) out[f * L + j] += (method === 'percent-change' ? (100 * (p[j] - b)) / b : p[j] / b) / K;
    }
  }
  return out;
}

function held(trials: number, seed: number) {
  const { x, starts } = epochs(trials, seed);
  const d = decomposeChannel(
    { samples: x, epochStarts: [starts], epochSamples: L, sampleRateHz: fs, frequencies: freqs, sigmas, baseline: { first: 0, last: 10, method: 'decibel', scope: 'average' }, singleTrials: true, coarseTrials: true },
  );
  const coarse = d.coarseTrials!;
  const rows = d.singleTrials![0];
  return {
    x,
    starts,
    coarse,
    withCoarse: prepareTrialPower(rows, trials, freqs.length, L, { ...coarse, samples: coarse.samples[0] }),
    rowsOnly: prepareTrialPower(rows, trials, freqs.length, L),
  };
}

function worst(a: Float64Array, b: Float64Array): number {
  let w = 0;
  for (let i = 0; i < a.length; i++) w = Math.max(w, Math.abs(a[i] - b[i]));
  return w;
}

describe('coarse samples of the held trials', () => {
  it('are kept only when asked for, and fix each frequency of the trial-average path (S_f > 0)', () => {
    const { x, starts } = epochs(5, 3);
    const job = { samples: x, epochStarts: [starts], epochSamples: L, sampleRateHz: fs, frequencies: freqs, sigmas, baseline: { first: 0, last: 10, method: 'decibel' as const, scope: 'average' as const }, singleTrials: true };
    expect(decomposeChannel(job).coarseTrials).toBeNull();
    const { coarse } = held(5, 3);
    const bank = getWaveletBank(freqs, sigmas, fs, L);
    expect(Array.from(coarse.points)).toEqual(Array.from(bank.averageBandSizes, (m) => 2 * m));
    expect(Array.from(coarse.periods)).toEqual(Array.from(bank.sizes));
    // Not vacuous: this scenario has frequencies on the coarse path.
    expect(coarse.points.some((s) => s > 0)).toBe(true);
    expect(coarse.samples[0].length).toBe(5 * coarse.offsets[freqs.length]);
  });

  it('interpolate to each stored trial row (float32 copies of the same |y|²)', () => {
    const { coarse, withCoarse } = held(4, 8);
    const block = coarse.offsets[freqs.length];
    for (let k = 0; k < 4; k++) {
      for (let f = 0; f < freqs.length; f++) {
        const s = coarse.points[f];
        if (s === 0) continue;
        const acc = Float64Array.from(coarse.samples[0].subarray(k * block + coarse.offsets[f], k * block + coarse.offsets[f] + s));
        const row = new Float64Array(L);
        interpolatePower(row, 0, L, acc, coarse.periods[f]);
        const stored = withCoarse.trials.subarray((k * freqs.length + f) * L, (k * freqs.length + f + 1) * L);
        let peak = 0;
        for (const v of stored) peak = Math.max(peak, v);
        // float32 samples and rows: ~6e-8 relative each, spread by the interpolation (measured ≲ 1e-6 of the peak)
        expect(worst(row, Float64Array.from(stored))).toBeLessThan(1e-5 * peak);
      }
    }
  });
});

describe('renormalizeTrials with coarse samples', () => {
  for (const trials of [6, 11]) {
    it(`matches the contract's definition over directly convolved power, for moved baselines (${trials} trials)`, () => {
      const h = held(trials, 20 + trials);
      const bank = getWaveletBank(freqs, sigmas, fs, L);
      const direct = Array.from({ length: trials }, (_, k) => Array.from(freqs, (f, i) => directPower(h.x, h.starts[k], f, sigmas[i], bank.halfWidths[i], L, fs)));
      for (const [first, last] of [[10, 60], [11, 60], [40, 41], [0, 239]]) {
        for (const method of ['percent-change', 'power-ratio'] as const) {
          const got = new Float64Array(freqs.length * L);
          renormalizeTrials(got, h.withCoarse, first, last, method);
          const want = byDefinition(direct, first, last, method);
          // float32 storage of rows and samples: ~1e-6 relative (percent change is 100× a ratio near 1)
          expect(worst(got, want), `${method} ${first}…${last}`).toBeLessThan(method === 'percent-change' ? 1e-3 : 1e-5);
          const rows = new Float64Array(freqs.length * L);
          renormalizeTrials(rows, h.rowsOnly, first, last, method);
          expect(worst(got, rows), `${method} ${first}…${last} against the row sweep`).toBeLessThan(method === 'percent-change' ? 1e-3 : 1e-5);
        }
      }
    });
  }

  it('equals the row sweep for any baseline and any split of the rows (property)', () => {
    const h = held(9, 77);
    fc.assert(
      fc.property(fc.integer({ min: 0, max: L - 1 }), fc.integer({ min: 0, max: 60 }), fc.constantFrom('percent-change' as const, 'power-ratio' as const), fc.integer({ min: 0, max: freqs.length }), (first, span, method, split) => {
        const last = Math.min(L - 1, first + span);
        const rows = new Float64Array(freqs.length * L);
        renormalizeTrials(rows, h.rowsOnly, first, last, method);
        const got = new Float64Array(freqs.length * L);
        renormalizeTrials(got, h.withCoarse, first, last, method, 'time', [0, split]);
        renormalizeTrials(got, h.withCoarse, first, last, method, 'time', [split, freqs.length]);
        let scale = 1;
        for (const v of rows) scale = Math.max(scale, Math.abs(v));
        expect(worst(got, rows)).toBeLessThan(1e-5 * scale);
      }),
      { numRuns: 40 },
    );
  });

  it('leaves z-scores and decibels on their own paths (the same bits with or without coarse samples)', () => {
    const h = held(6, 5);
    for (const method of ['z-score', 'decibel'] as const) {
      const a = new Float64Array(freqs.length * L);
      const b = new Float64Array(freqs.length * L);
      renormalizeTrials(a, h.withCoarse, 12, 50, method);
      renormalizeTrials(b, h.rowsOnly, 12, 50, method);
      expect(Array.from(a)).toEqual(Array.from(b));
    }
  });
});

describe('interpolateTwo', () => {
  it('gives interpolatePower of each of two rows (one complex transform for two real rows) (property)', () => {
    fc.assert(
      fc.property(fc.constantFrom(16, 32, 64), fc.constantFrom(16, 32, 64), fc.integer({ min: 1, max: 1000 }), (sa, sb, seed) => {
        const n = 256;
        const normal = seededNormal(seed);
        // Power-like rows: squares, so positive, with a 100× spread between the two rows.
        const a = Float64Array.from({ length: sa }, () => normal() ** 2 * 100);
        const b = Float64Array.from({ length: sb }, () => normal() ** 2);
        const wantA = new Float64Array(200);
        const wantB = new Float64Array(200);
        interpolatePower(wantA, 0, 200, a, n);
        interpolatePower(wantB, 0, 200, b, n);
        const got = new Float64Array(400);
        interpolateTwo(got, 0, a, 200, b, 200, n);
        expect(worst(got.subarray(0, 200), wantA)).toBeLessThan(1e-11);
        expect(worst(got.subarray(200), wantB)).toBeLessThan(1e-11);
        const alone = new Float64Array(200);
        interpolateTwo(alone, 0, b, -1, null, 200, n);
        expect(worst(alone, wantB)).toBeLessThan(1e-12);
      }),
      { numRuns: 30 },
    );
  });
});
