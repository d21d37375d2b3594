// Induced power (recipe "trialPower": "induced", our extension documented in DEVELOPERS.md): the condition's evoked
// response, the mean of its demeaned epochs, is taken out of every epoch before the wavelet transform (the usual
// split of total power into evoked and induced parts, e.g. Tallon-Baudry & Bertrand, 1999, Trends Cogn Sci 3:151).
import { describe, expect, it } from 'vitest';
import { decomposeChannel } from '../../../../src/lib/analysis/decompose';
import { runRecipe } from '../../../../src/lib/analysis/run-recipe';
import { gaussianSigmas } from '../../../../src/lib/analysis/wavelet';
import { seededNormal, seededUniform } from '../../../helpers/seeded-random';

const fs = 200;
const L = 301;
const freqs = Float64Array.of(5, 10, 20);
const sigmas = gaussianSigmas(freqs, { min: 3, max: 6 });

function decompose(x: Float32Array, starts: number[], opts: { induced?: boolean; itpc?: boolean; frequencies?: Float64Array } = {}) {
  const frequencies = opts.frequencies ?? freqs;
  return decomposeChannel({
    samples: x,
    epochStarts: [Int32Array.from(starts)],
    epochSamples: L,
    sampleRateHz: fs,
    frequencies,
    sigmas: gaussianSigmas(frequencies, { min: 3, max: 6 }),
    baseline: { first: 10, last: 60, method: 'decibel', scope: 'average' },
    induced: opts.induced,
    itpc: opts.itpc,
  });
}

// A scenario of our own: n trials laid end to end, each built by `trial(e, j)`.
function trials(n: number, trial: (e: number, j: number) => number) {
  const starts = Array.from({ length: n }, (_, e) => 20 + e * (L + 30));
  const x = new Float32Array(starts[n - 1] + L + 20);
  starts.forEach((s0, e) => {
    for (let j = 0; j < L; j++) x[s0 + j] = trial(e, j);
  });
  return { x, starts };
}

const max = (a: Float64Array) => a.reduce((m, v) => Math.max(m, Math.abs(v)), 0);

describe('induced power', () => {
  it('is zero (to rounding) when every trial is the same evoked waveform, whatever its offset', () => {
    const wave = (j: number) => 30 * Math.exp(-(((j - 150) / 20) ** 2)) * Math.sin((2 * Math.PI * 10 * j) / fs);
    const { x, starts } = trials(16, (e, j) => wave(j) + 100 * e); // a different DC offset per trial
    const total = decompose(x, starts);
    const induced = decompose(x, starts, { induced: true });
    expect(max(total.power[0])).toBeGreaterThan(1);
    // Samples are float32: a 1.5 mV offset leaves the waveform rounded to ~1e-4 µV in each trial, so the residual's
    // power is of order (1e-4/30)² ≈ 1e-11 of the total; without offsets the trials agree bit for bit.
    expect(max(induced.power[0])).toBeLessThan(1e-9 * max(total.power[0]));
    const same = trials(16, (_e, j) => wave(j));
    expect(max(decompose(same.x, same.starts, { induced: true }).power[0])).toBeLessThan(1e-20 * max(total.power[0]));
    // the evoked response is the waveform itself, with its own mean removed (float32 storage: 1e-4 µV)
    const ev = induced.evoked![0];
    let m = 0;
    for (let j = 0; j < L; j++) m += wave(j) / L;
    for (let j = 0; j < L; j++) expect(Math.abs(ev[j] - (wave(j) - m))).toBeLessThan(1e-4);
  });

  it('equals total power within 2 % for bursts whose phase is not locked to the event', () => {
    const u = seededUniform(31);
    const normal = seededNormal(32);
    const phases = Array.from({ length: 200 }, () => 2 * Math.PI * u());
    const { x, starts } = trials(200, (e, j) => 20 * Math.exp(-(((j - 150) / 40) ** 2)) * Math.cos((2 * Math.PI * 10 * j) / fs + phases[e]) + normal());
    const total = decompose(x, starts);
    const induced = decompose(x, starts, { induced: true });
    const f = 1; // 10 Hz
    for (let j = 120; j <= 180; j++) {
      const t = total.power[0][f * L + j];
      expect(Math.abs(induced.power[0][f * L + j] - t) / t).toBeLessThan(0.02);
    }
  });

  it('splits total power exactly into evoked and induced parts', () => {
    // mean_k |y_k|² = |ȳ|² + mean_k |y_k − ȳ|², ȳ the transform of the evoked response (linearity of the transform)
    const normal = seededNormal(7);
    const { x, starts } = trials(12, (e, j) => 15 * Math.sin((2 * Math.PI * 5 * j) / fs) * (j > 100 ? 1 : 0) + 8 * normal());
    const total = decompose(x, starts);
    const induced = decompose(x, starts, { induced: true });
    const evokedTrace = Float32Array.from(induced.evoked![0]);
    const evoked = decompose(evokedTrace, [0]);
    for (let i = 0; i < total.power[0].length; i++) {
      const t = total.power[0][i];
      expect(Math.abs(evoked.power[0][i] + induced.power[0][i] - t)).toBeLessThan(1e-6 * t + 1e-9);
    }
  });

  it('keeps phase consistency on the whole epochs', () => {
    const normal = seededNormal(17);
    const { x, starts } = trials(10, (e, j) => 10 * Math.sin((2 * Math.PI * 10 * j) / fs) + 10 * normal());
    const a = decompose(x, starts, { itpc: true });
    const b = decompose(x, starts, { itpc: true, induced: true });
    for (let i = 0; i < a.itpc![0].length; i++) expect(Math.abs(a.itpc![0][i] - b.itpc![0][i])).toBeLessThan(1e-9);
  });
});

describe('phase consistency of random phases', () => {
  it('averages √(π/(4n)) at n = 100, within 10 % (mean of the Rayleigh distribution; common practice, from memory)', () => {
    const u = seededUniform(99);
    const n = 100;
    const ten = Float64Array.of(10);
    let sum = 0;
    const reps = 60;
    for (let r = 0; r < reps; r++) {
      const phases = Array.from({ length: n }, () => 2 * Math.PI * u());
      const { x, starts } = trials(n, (e, j) => Math.cos((2 * Math.PI * 10 * j) / fs + phases[e]));
      sum += decompose(x, starts, { itpc: true, frequencies: ten }).itpc![0][150];
    }
    const expected = Math.sqrt(Math.PI / (4 * n));
    expect(Math.abs(sum / reps - expected) / expected).toBeLessThan(0.1);
  });
});

describe('runRecipe with "trialPower": "induced"', () => {
  const { x, starts } = trials(6, (e, j) => Math.sin(j / 7) + e);
  const rec = { sampleRateHz: fs, channelNames: ['Pz'], data: [x], events: starts.map((s) => ({ onsetSeconds: (s + 100) / fs, durationSeconds: 0, label: e(s) })) };
  function e(s: number) {
    return s === starts[0] ? 'lone' : 'many';
  }
  const recipe = {
    format: 2,
    epochs: { events: ['many'], start: -0.5, end: 1 },
    frequencies: { min: 5, max: 20, count: 3 },
    cycles: { min: 3, max: 6 },
    baseline: { start: -0.4, end: -0.1, method: 'percent-change' },
    spectrum: { segment: 0.5, overlap: 0.5, range: [1, 40] },
    aperiodic: { range: [2, 40], model: 'power-law' },
    trialPower: 'induced',
  };

  it('adds the evoked response per channel and condition', () => {
    const r = runRecipe(rec as never, recipe);
    expect(r.conditions.many.evoked).toHaveLength(1);
    expect(r.conditions.many.evoked![0]).toHaveLength(r.times.length);
    expect(runRecipe(rec as never, { ...recipe, trialPower: 'total' }).conditions.many.evoked).toBeUndefined();
  });

  it('refuses a condition with one epoch and an unknown value, naming the field', () => {
    expect(() => runRecipe(rec as never, { ...recipe, epochs: { ...recipe.epochs, events: ['lone'] } })).toThrow(/trialPower.*at least 2/);
    expect(() => runRecipe(rec as never, { ...recipe, trialPower: 'evoked' })).toThrow(/trialPower/);
  });
});
