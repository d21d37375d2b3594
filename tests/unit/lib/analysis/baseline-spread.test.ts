import { describe, expect, it } from 'vitest';
import { decomposeChannel } from '../../../../src/lib/analysis/decompose';
import { prepareTrialPower, renormalizeTrials } from '../../../../src/lib/analysis/renormalize';
import { planRecipe, runRecipe } from '../../../../src/lib/analysis/run-recipe';
import { gaussianSigmas } from '../../../../src/lib/analysis/wavelet';
import { seededNormal } from '../../../helpers/seeded-random';

const fs = 128;
const L = 2 * fs + 1; // epochs −1 … 1 s
const freqs = Float64Array.of(6, 10, 20);
const sigmas = gaussianSigmas(freqs, { fixed: 5 });
const first = 20;
const last = 90;

// Scenario of our own: white noise (5 µV) with a 10 Hz rhythm whose amplitude doubles after each event at 1 s.
function trialsOf(count: number, seed: number) {
  const normal = seededNormal(seed);
  const n = 400 + count * 400;
  const samples = new Float32Array(n);
  for (let i = 0; i < n; i++) samples[i] = 5 * normal();
  const starts = Int32Array.from({ length: count }, (_, k) => 200 + 400 * k);
  for (const s0 of starts) for (let j = 0; j < L; j++) samples[s0 + j] += (j >= fs ? 6 : 3) * Math.sin((2 * Math.PI * 10 * j) / fs);
  return { samples, starts };
}

function run(samples: Float32Array, starts: Int32Array, scope: 'average' | 'trial', spread: 'time' | 'trials', singleTrials = false) {
  return decomposeChannel({ samples, epochStarts: [starts], epochSamples: L, sampleRateHz: fs, frequencies: freqs, sigmas, baseline: { first, last, method: 'z-score', scope, spread }, singleTrials });
}

describe('z-score with the spread across trials (baseline.spread "trials")', () => {
  it('equals (P̄ − B̄)/S with B_k each trial’s baseline mean and S their sample SD, for both scopes', () => {
    const { samples, starts } = trialsOf(12, 3);
    const reference = run(samples, starts, 'average', 'time', true);
    const size = freqs.length * L;
    for (const scope of ['average', 'trial'] as const) {
      const got = run(samples, starts, scope, 'trials').normalized[0];
      for (let f = 0; f < freqs.length; f++) {
        // written out here from the stored single trials (Float32) and the trial average
        const bk: number[] = [];
        for (let k = 0; k < starts.length; k++) {
          let s = 0;
          for (let j = first; j <= last; j++) s += reference.singleTrials![0][k * size + f * L + j];
          bk.push(s / (last - first + 1));
        }
        const mean = bk.reduce((a, b) => a + b, 0) / bk.length;
        const sd = Math.sqrt(bk.reduce((a, b) => a + (b - mean) ** 2, 0) / (bk.length - 1));
        for (const j of [0, 50, 128, 200, 256]) {
          const expected = (reference.power[0][f * L + j] - mean) / sd;
          expect(Math.abs(got[f * L + j] - expected), `${scope} f=${freqs[f]} j=${j}`).toBeLessThan(1e-4 * Math.max(1, Math.abs(expected)));
        }
      }
    }
  });

  it('keeps the z-score of the same effect steady as trials are added, where the spread over time inflates it', () => {
    // The point: S over the baseline's time points of the trial average shrinks about as 1/√K, so the
    // z-score grows with the trial count K; S across trials estimates a per-trial spread that does not.
    const zAfter = (count: number, spread: 'time' | 'trials') => {
      const { samples, starts } = trialsOf(count, 11);
      const z = run(samples, starts, 'average', spread).normalized[0];
      let s = 0;
      for (let j = fs + 30; j < fs + 100; j++) s += z[1 * L + j];
      return s / 70;
    };
    const time = zAfter(40, 'time') / zAfter(10, 'time');
    const trials = zAfter(40, 'trials') / zAfter(10, 'trials');
    expect(time).toBeGreaterThan(1.5);
    expect(trials).toBeGreaterThan(0.6);
    expect(trials).toBeLessThan(1.4);
  });

  it('gives the same maps when the explorer re-normalizes held single trials live', () => {
    const { samples, starts } = trialsOf(9, 8);
    const core = run(samples, starts, 'trial', 'trials', true);
    const out = new Float64Array(freqs.length * L);
    renormalizeTrials(out, prepareTrialPower(core.singleTrials![0], starts.length, freqs.length, L), first, last, 'z-score', 'trials');
    for (let i = 0; i < out.length; i++) expect(Math.abs(out[i] - core.normalized[0][i])).toBeLessThan(1e-4 * Math.max(1, Math.abs(core.normalized[0][i])));
  });

  it('is refused for other methods and for a condition with a single epoch, naming the field', () => {
    const { samples } = trialsOf(3, 5);
    const recording = { sampleRateHz: fs, channelNames: ['Cz'], data: [samples], events: [1, 4, 7].map((o, i) => ({ onsetSeconds: o + 2.6, durationSeconds: 0, label: i === 0 ? 'solo' : 'pair' })) };
    const recipe = {
      format: 2,
      epochs: { events: ['pair'], start: -1, end: 1 },
      frequencies: { min: 6, max: 20, count: 3 },
      cycles: { fixed: 5 },
      baseline: { start: -0.8, end: -0.3, method: 'z-score', spread: 'trials' },
      spectrum: { segment: 1, overlap: 0.5, range: [1, 40], source: 'epochs' },
      aperiodic: { range: [2, 40], model: 'power-law' },
    };
    expect(runRecipe(recording, recipe).conditions.pair.trials).toBe(2);
    expect(() => planRecipe(recording, { ...recipe, baseline: { ...recipe.baseline, method: 'decibel' } })).toThrow(/^baseline\.spread applies only to method "z-score"/);
    expect(() => planRecipe(recording, { ...recipe, epochs: { ...recipe.epochs, events: ['solo'] } })).toThrow(/^baseline\.spread "trials" needs at least 2 kept epochs per condition/);
  });
});
