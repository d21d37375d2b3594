import { describe, expect, it } from 'vitest';
import { analyzeChannel, assembleResult, planRecipe, runRecipe } from '../../../../src/lib/analysis/run-recipe';
import type { Recording } from '../../../../src/lib/analysis/recording';
import { fitAperiodic } from '../../../../src/lib/analysis/aperiodic';
import { welchPsd } from '../../../../src/lib/analysis/welch';
import { assertClose } from '../../../helpers/assert-close';
import { seededNormal } from '../../../helpers/seeded-random';

// A small scenario of our own: three scalp channels at 128 Hz, 60 s, cues every 2 s alternating two labels,
// an 8 Hz rhythm on Cz that grows after each "tone/high" cue.
function makeRecording(): Recording {
  const fs = 128;
  const n = 60 * fs;
  const normal = seededNormal(42);
  const names = ['Fz', 'Cz', 'Pz'];
  const data = names.map(() => new Float32Array(n));
  const events = [];
  for (let k = 0; k < 28; k++) events.push({ onsetSeconds: 2 + 2 * k, durationSeconds: 0.1, label: k % 2 === 0 ? 'tone/high' : 'tone/low' });
  for (let c = 0; c < names.length; c++) for (let i = 0; i < n; i++) data[c][i] = 5 * normal();
  for (const e of events) {
    if (e.label !== 'tone/high') continue;
    const s0 = Math.round(e.onsetSeconds * fs);
    for (let i = 0; i < fs; i++) data[1][s0 + i] += 10 * Math.sin((2 * Math.PI * 8 * i) / fs);
  }
  return { sampleRateHz: fs, channelNames: names, data, events };
}

const recipe = {
  format: 2,
  epochs: { events: ['tone/high', 'tone/low'], start: -0.5, end: 1.5 },
  frequencies: { min: 4, max: 30, count: 8, spacing: 'log' },
  cycles: { min: 3, max: 7 },
  baseline: { start: -0.4, end: -0.1, method: 'decibel', scope: 'average' },
  spectrum: { segment: 2, overlap: 0.5, range: [1, 45], source: 'recording' },
  aperiodic: { range: [2, 40], model: 'power-law' },
};

describe('runRecipe', () => {
  const recording = makeRecording();

  it('returns the contract Result shape', () => {
    const r = runRecipe(recording, recipe);
    expect(r.channels).toEqual(['Fz', 'Cz', 'Pz']);
    expect(r.frequencies.length).toBe(8);
    expect(r.edgeSeconds.length).toBe(8);
    expect(r.times.length).toBe(257);
    assertClose(r.times[0], -0.5, 1e-15);
    assertClose(r.times[256], 1.5, 1e-12);
    expect(Object.keys(r.conditions)).toEqual(['tone/high', 'tone/low']);
    expect(r.conditions['tone/high'].trials).toBe(14);
    const p = r.conditions['tone/high'].power;
    expect([p.length, p[0].length, p[0][0].length]).toEqual([3, 8, 257]);
    expect(r.spectrum.frequencies[0]).toBe(1);
    expect(r.spectrum.frequencies[r.spectrum.frequencies.length - 1]).toBe(45);
    expect(r.spectrum.psd[0].length).toBe(r.spectrum.frequencies.length);
    expect(r.aperiodic.map((a) => a.channel)).toEqual(['Fz', 'Cz', 'Pz']);
    expect(r.aperiodic[0].knee).toBeNull();
    // the 8 Hz burst after "tone/high" on Cz raises dB there and not after "tone/low"
    const fi = r.frequencies.findIndex((f) => Math.abs(f - 8) < 1.5);
    const ti = r.times.findIndex((t) => t >= 0.5);
    expect(r.conditions['tone/high'].normalized[1][fi][ti]).toBeGreaterThan(6);
    expect(Math.abs(r.conditions['tone/low'].normalized[1][fi][ti])).toBeLessThan(3);
    // the baseline sits in the edge zone at the lowest frequencies: a warning says so
    expect(r.warnings.some((w) => w.startsWith('baseline:'))).toBe(true);
  });

  it('gives bit-identical numbers run whole or split channel by channel', () => {
    // The worker pool runs analyzeChannel per channel; its assembly must match a single-thread run exactly.
    for (const scope of ['average', 'trial'] as const) {
      const r = { ...recipe, baseline: { ...recipe.baseline, method: 'z-score', scope } };
      const whole = runRecipe(recording, r);
      const plan = planRecipe(recording, r);
      const reversed = [2, 1, 0].map((i) => analyzeChannel(plan, recording.data[plan.channelIndices[i]].slice()));
      const split = assembleResult(plan, reversed.reverse());
      expect(JSON.stringify(split)).toBe(JSON.stringify(whole));
      const oneChannel = runRecipe(recording, { ...r, channels: ['Pz'] });
      expect(oneChannel.conditions['tone/low'].normalized[0]).toEqual(whole.conditions['tone/low'].normalized[2]);
    }
  });

  it('gives the same bits for a format-1 recipe as for its format-2 spelling', () => {
    // Analysis contract: format 1 is still read and upgraded; the numbers must not depend on the spelling.
    const pairs = [['db', 'decibel'], ['percent', 'percent-change'], ['zscore', 'z-score'], ['ratio', 'power-ratio']] as const;
    for (const [old, now] of pairs) {
      const two = { ...recipe, baseline: { ...recipe.baseline, method: now, scope: 'trial' }, aperiodic: { range: [2, 40], model: 'power-law-knee' } };
      const one = {
        epochs: { events: recipe.epochs.events, tmin: recipe.epochs.start, tmax: recipe.epochs.end },
        frequencies: recipe.frequencies,
        cycles: recipe.cycles,
        baseline: { ...recipe.baseline, method: old, scope: 'trial' },
        spectrum: recipe.spectrum,
        aperiodic: { range: [2, 40], mode: 'knee' },
        channels: ['Cz'],
      };
      expect(JSON.stringify(runRecipe(recording, one))).toBe(JSON.stringify(runRecipe(recording, { ...two, channels: ['Cz'] })));
    }
  });

  it('fits the aperiodic line per condition on that condition’s kept epochs when the spectrum comes from epochs', () => {
    const r = { ...recipe, spectrum: { segment: 1, overlap: 0.5, range: [1, 45], source: 'epochs' } };
    const result = runRecipe(recording, r);
    const plan = planRecipe(recording, r);
    expect(Object.keys(result.aperiodicByCondition!)).toEqual(['tone/high', 'tone/low']);
    plan.labels.forEach((label, c) => {
      // Welch over this condition's epochs only, spans written out here from the plan's epoch starts
      const spans = Int32Array.from(Array.from(plan.epochStarts[c]).flatMap((s) => [s, s + plan.epochSamples]));
      const w = welchPsd(recording.data[1], plan.sampleRateHz, plan.spectrum.segmentSamples, plan.spectrum.overlapSamples, spans);
      const { channel, ...fit } = result.aperiodicByCondition![label][1];
      expect(channel).toBe('Cz');
      expect(fit).toEqual(fitAperiodic(w.frequencies, w.psd, [2, 40], 'power-law'));
    });
    // the 8 Hz burst after "tone/high" on Cz shows as a peak above that condition's line only
    const near8 = (label: string) => result.aperiodicByCondition![label][1].peaks.some((p) => Math.abs(p.centreHz - 8) < 1.5);
    expect(near8('tone/high')).toBe(true);
    expect(near8('tone/low')).toBe(false);
    expect(runRecipe(recording, recipe).aperiodicByCondition).toBeUndefined();
  });

  it('reports progress and honours cancellation', () => {
    const seen: number[] = [];
    runRecipe(recording, { ...recipe, channels: ['Fz', 'Cz'] }, { onProgress: (f) => seen.push(f) });
    expect(seen[seen.length - 1]).toBe(1);
    for (let i = 1; i < seen.length; i++) expect(seen[i]).toBeGreaterThanOrEqual(seen[i - 1]);
    expect(() => runRecipe(recording, recipe, { shouldCancel: () => true })).toThrow(/cancelled/);
  });

  it('counts dropped epochs in the warnings', () => {
    const late = { ...recording, events: [...recording.events, { onsetSeconds: 59.5, durationSeconds: 0, label: 'tone/low' }] };
    const r = runRecipe(late, { ...recipe, channels: ['Fz'] });
    expect(r.conditions['tone/low'].trials).toBe(14);
    expect(r.conditions['tone/low'].dropped).toBe(1);
    expect(r.warnings.some((w) => /"tone\/low": 1 of 15 epochs dropped/.test(w))).toBe(true);
  });

  const bad: [string, object, RegExp][] = [
    ['start ≥ end', { epochs: { ...recipe.epochs, start: 1.5 } }, /^epochs\.start must be less than epochs\.end/],
    ['baseline before the epoch', { baseline: { ...recipe.baseline, start: -0.8 } }, /^baseline\.start is before the epoch start/],
    ['baseline after the epoch', { baseline: { ...recipe.baseline, end: 1.6 } }, /^baseline\.end is after the epoch end/],
    ['max frequency at Nyquist', { frequencies: { ...recipe.frequencies, max: 64 } }, /^frequencies\.max must be below the Nyquist frequency \(64 Hz/],
    ['too few cycles of the lowest frequency in the epoch', { cycles: { fixed: 12 } }, /^cycles is too many for the epoch length: at 4 Hz/],
    ['unknown channel', { channels: ['Fz', 'Oz'] }, /^channels\[1\] names no signal in the recording \("Oz"/],
    ['no events of a label', { epochs: { ...recipe.epochs, events: ['tone/high', 'tone/mid'] } }, /^epochs\.events\[1\] has no events labelled "tone\/mid"/],
    ['format-1 method name in a format-2 recipe', { baseline: { ...recipe.baseline, method: 'db' } }, /^baseline\.method must be one of "decibel", "percent-change", "z-score", "power-ratio"/],
    ['cycles of the wrong shape', { cycles: { n: 3 } }, /^cycles must be/],
    ['unknown recipe field', { colour: 'blue' }, /^recipe .*colour/],
    ['aperiodic range with too few bins', { aperiodic: { range: [10, 10.5], model: 'power-law-knee' } }, /^aperiodic\.range holds 2 spectrum bins/],
    ['segment longer than the recording', { spectrum: { ...recipe.spectrum, segment: 100 } }, /^spectrum\.segment/],
  ];
  for (const [what, change, message] of bad) {
    it(`rejects ${what}, naming the field`, () => {
      expect(() => planRecipe(recording, { ...recipe, ...change })).toThrow(message);
    });
  }
});
