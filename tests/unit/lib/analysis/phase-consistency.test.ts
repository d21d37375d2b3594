// Analysis contract (shared/specs/analysis.md), "Inter-trial phase consistency": with `"itpc": true` each condition
// holds |(1/N) Σ_k y_k/|y_k|| beside its power, y_k the complex wavelet coefficient of the demeaned trial k.
import { describe, expect, it } from 'vitest';
import { decomposeChannel } from '../../../../src/lib/analysis/decompose';
import { rayleighP, rayleighZ } from '../../../../src/lib/analysis/phase-consistency';
import { runRecipe } from '../../../../src/lib/analysis/run-recipe';
import { gaussianSigmas } from '../../../../src/lib/analysis/wavelet';
import { seededNormal, seededUniform } from '../../../helpers/seeded-random';

const fs = 200;
const L = 401; // -1 … 1 s
const freqs = Float64Array.of(4, 8, 13, 30);

// Independent reference written from the contract's own formula, not the engine's wavelet bank: the complex Morlet
// w(t) = exp(2πift)·exp(−t²/(2σ²)) sampled at k/fs over |t| ≤ 6σ, linear convolution of the demeaned epoch (zero
// outside it), then the resultant length of the unit phasors. Phase consistency does not depend on the wavelet's
// scale, so no normalization is needed.
function directItpc(x: Float32Array, starts: number[], f: number, sigma: number): Float64Array {
  const h = Math.ceil(6 * sigma * fs);
  const re = new Float64Array(L);
  const im = new Float64Array(L);
  for (const s0 of starts) {
    let mean = 0;
    for (let i = 0; i < L; i++) mean += x[s0 + i] / L;
    for (let j = 0; j < L; j++) {
      let yr = 0;
      let yi = 0;
      for (let k = -h; k <= h; k++) {
        const i = j - k;
        if (i < 0 || i >= L) continue;
        const t = k / fs;
        const g = Math.exp(-(t * t) / (2 * sigma * sigma));
        const v = x[s0 + i] - mean;
        yr += v * g * Math.cos(2 * Math.PI * f * t);
        yi += v * g * Math.sin(2 * Math.PI * f * t);
      }
      const m = Math.hypot(yr, yi);
      if (m > 0) {
        re[j] += yr / m;
        im[j] += yi / m;
      }
    }
  }
  return re.map((r, j) => Math.hypot(r, im[j]) / starts.length);
}

// A scenario of our own: 12 trials of noise, with an 8 Hz burst whose phase is locked to the event in half of them
// and random in the others.
function recording(seed: number) {
  const normal = seededNormal(seed);
  const uniform = seededUniform(seed + 1);
  const starts = Array.from({ length: 12 }, (_, e) => 50 + e * 500);
  const x = new Float32Array(starts[starts.length - 1] + L + 50);
  for (let i = 0; i < x.length; i++) x[i] = 5 * normal();
  starts.forEach((s0, e) => {
    const phase = e % 2 === 0 ? 0.3 : 2 * Math.PI * uniform();
    for (let j = 200; j < 350; j++) x[s0 + j] += 20 * Math.cos(2 * Math.PI * 8 * (j / fs) + phase);
  });
  return { x, starts };
}

function decompose(x: Float32Array, starts: number[], itpc: boolean, scope: 'average' | 'trial' = 'average') {
  return decomposeChannel({
    samples: x,
    epochStarts: [Int32Array.from(starts)],
    epochSamples: L,
    sampleRateHz: fs,
    frequencies: freqs,
    sigmas: gaussianSigmas(freqs, { min: 3, max: 7 }),
    baseline: { first: 20, last: 120, method: 'decibel', scope },
    itpc,
  });
}

describe('inter-trial phase consistency', () => {
  it('equals the resultant length of unit phasors from direct time-domain convolution', () => {
    const { x, starts } = recording(11);
    const sigmas = gaussianSigmas(freqs, { min: 3, max: 7 });
    const out = decompose(x, starts, true);
    for (let f = 0; f < freqs.length; f++) {
      const ref = directItpc(x, starts, freqs[f], sigmas[f]);
      for (let j = 0; j < L; j++) {
        expect(Math.abs(out.itpc![0][f * L + j] - ref[j]), `f ${freqs[f]} Hz, t ${j}`).toBeLessThan(1e-6);
      }
    }
  });

  it('is 1 for identical trials and leaves power and normalized bits untouched', () => {
    const { x } = recording(5);
    const copy = new Float32Array(x.length * 1);
    copy.set(x);
    // the same epoch four times over: every phase agrees
    const same = [50, 50, 50, 50];
    const out = decompose(copy, same, true);
    for (const v of out.itpc![0]) expect(Math.abs(v - 1)).toBeLessThan(1e-12);
    for (const scope of ['average', 'trial'] as const) {
      const { x: y, starts } = recording(9);
      const a = decompose(y, starts, false, scope);
      const b = decompose(y, starts, true, scope);
      expect(a.itpc).toBeNull();
      expect(Buffer.from(b.power[0].buffer).equals(Buffer.from(a.power[0].buffer))).toBe(true);
      expect(Buffer.from(b.normalized[0].buffer).equals(Buffer.from(a.normalized[0].buffer))).toBe(true);
    }
  });

  it('is high where the burst is phase-locked and near the chance level elsewhere', () => {
    const { x, starts } = recording(21);
    const out = decompose(x, starts, true);
    const f8 = 1;
    const at = (t: number) => out.itpc![0][f8 * L + t];
    // 6 of 12 trials share a phase: the resultant is at least about 6/12 = 0.5 inside the burst
    expect(at(275)).toBeGreaterThan(0.45);
    // before the burst, noise only: mean resultant length of N uniform phases is about √π/(2√N) ≈ 0.26 for
    // N = 12 (the mean of the Rayleigh distribution; common practice, from memory)
    let pre = 0;
    for (let t = 60; t < 140; t++) pre += at(t) / 80;
    expect(pre).toBeLessThan(0.4);
  });
});

describe('Rayleigh test', () => {
  it('Z = n·r² and p tends to exp(−Z) for large n', () => {
    expect(rayleighZ(20, 0.5)).toBeCloseTo(5, 12);
    // Zar's approximation against the large-sample limit exp(−Z) (Zar, 1999, §27.1)
    expect(Math.abs(rayleighP(10000, Math.sqrt(3 / 10000)) - Math.exp(-3))).toBeLessThan(1e-3);
    expect(rayleighP(12, 1)).toBeLessThan(1e-5);
    expect(rayleighP(12, 0)).toBe(1);
    expect(rayleighP(0, 0.5)).toBeNaN();
  });

  it('rejects about 5 % of uniform phase sets at p < 0.05 (calibration under the null)', () => {
    const u = seededUniform(2026);
    const n = 15;
    const sets = 20000;
    let hits = 0;
    for (let s = 0; s < sets; s++) {
      let re = 0;
      let im = 0;
      for (let k = 0; k < n; k++) {
        const a = 2 * Math.PI * u();
        re += Math.cos(a);
        im += Math.sin(a);
      }
      if (rayleighP(n, Math.hypot(re, im) / n) < 0.05) hits++;
    }
    // binomial SE at 20,000 sets is 0.0015; ±0.008 leaves room for the approximation's own error
    expect(Math.abs(hits / sets - 0.05)).toBeLessThan(0.008);
  });
});

describe('runRecipe with "itpc": true', () => {
  it('adds itpc beside power in each condition, only when asked', () => {
    const { x, starts } = recording(3);
    const rec = {
      sampleRateHz: fs,
      channelNames: ['Cz'],
      data: [x],
      events: starts.map((s) => ({ onsetSeconds: (s + 200) / fs, durationSeconds: 0, label: 'go' })),
    };
    const recipe = {
      format: 2,
      epochs: { events: ['go'], start: -1, end: 1 },
      frequencies: { min: 4, max: 30, count: 4 },
      cycles: { min: 3, max: 7 },
      baseline: { start: -0.8, end: -0.3, method: 'decibel' },
      spectrum: { segment: 1, overlap: 0.5, range: [1, 45] },
      aperiodic: { range: [2, 40], model: 'power-law' },
    };
    const without = runRecipe(rec as never, recipe);
    expect(without.conditions.go.itpc).toBeUndefined();
    const withItpc = runRecipe(rec as never, { ...recipe, itpc: true });
    const m = withItpc.conditions.go.itpc!;
    expect(m.length).toBe(1);
    expect(m[0].length).toBe(4);
    expect(m[0][0].length).toBe(withItpc.times.length);
    for (const v of m.flat(2)) expect(v >= 0 && v <= 1 + 1e-12).toBe(true);
    expect(withItpc.conditions.go.power).toEqual(without.conditions.go.power);
  });

  it('refuses a non-boolean itpc, naming the field', () => {
    const rec = { sampleRateHz: fs, channelNames: ['Cz'], data: [new Float32Array(2000)], events: [] };
    expect(() => runRecipe(rec as never, { format: 2, itpc: 'yes' })).toThrow(/itpc/);
  });
});
