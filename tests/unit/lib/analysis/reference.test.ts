import { describe, expect, it } from 'vitest';
import { conditionRecording } from '../../../../src/lib/analysis/condition-recording';
import type { Recording } from '../../../../src/lib/analysis/recording';
import { planRecipe, runRecipe } from '../../../../src/lib/analysis/run-recipe';
import { seededNormal } from '../../../helpers/seeded-random';

// Scenario of our own: a "Gull Rock" epilepsy-monitoring bench recording at 256 Hz, 40 s. Four scalp channels with a
// common drift, two mastoids, an eye channel, and a depth shaft LA1…LA5 whose contacts carry a shared 300 µV offset.
function bench(): Recording {
  const fs = 256;
  const n = fs * 40;
  const normal = seededNormal(77);
  const names = ['Fz', 'Cz', 'Pz', 'Oz', 'M1', 'M2', 'HEOG', 'LA1', 'LA2', 'LA3', 'LA4', 'LA5'];
  const drift = Float64Array.from({ length: n }, (_, s) => 40 * Math.sin((2 * Math.PI * 0.05 * s) / fs));
  const data = names.map((name, c) =>
    Float32Array.from({ length: n }, (_, s) => 10 * normal() + (c < 6 ? drift[s] : 0) + (name.startsWith('LA') ? 300 + 20 * Math.sin((2 * Math.PI * 7 * s) / fs + c) : 0)),
  );
  const events = Array.from({ length: 12 }, (_, k) => ({ onsetSeconds: 3 + 3 * k, durationSeconds: 0, label: 'probe' }));
  return { sampleRateHz: fs, channelNames: names, data, events, channelTypes: ['eeg', 'eeg', 'eeg', 'eeg', 'eeg', 'eeg', 'eog', 'intracranial', 'intracranial', 'intracranial', 'intracranial', 'intracranial'] };
}

describe('reference', () => {
  it('common average: the re-referenced electrode channels sum to zero at every sample; others stay as recorded', () => {
    // The defining property of the common average reference (common practice): Σ_c (x_c − mean) = 0.
    const rec = bench();
    const out = conditionRecording(rec, { reference: { kind: 'common-average' }, signals: { bad: ['Oz'] } }).recording;
    const electrodes = out.channelNames.flatMap((n, c) => (['eeg', 'intracranial'].includes(out.channelTypes[c]) ? [c] : []));
    expect(electrodes.map((c) => out.channelNames[c])).toEqual(['Fz', 'Cz', 'Pz', 'M1', 'M2', 'LA1', 'LA2', 'LA3', 'LA4', 'LA5']);
    let worst = 0;
    for (let s = 0; s < out.data[0].length; s++) {
      let sum = 0;
      let size = 0;
      for (const c of electrodes) {
        sum += out.data[c][s];
        size = Math.max(size, Math.abs(out.data[c][s]));
      }
      // each output sample is rounded once to Float32 (relative 2^-24): the sum is zero to 10 such roundings
      worst = Math.max(worst, Math.abs(sum) / (size * electrodes.length * 2 ** -24));
    }
    expect(worst).toBeLessThan(1);
    // the eye channel is untouched (the same array), and the bad channel is gone
    expect(out.data[out.channelNames.indexOf('HEOG')]).toBe(rec.data[6]);
    expect(out.channelNames).not.toContain('Oz');
    // and the mean was taken over the good electrodes only: Fz − mean(Fz, Cz, Pz, M1, M2, LA1…LA5), by hand
    const s = 1234;
    const good = [0, 1, 2, 4, 5, 7, 8, 9, 10, 11];
    const mean = good.reduce((a, c) => a + rec.data[c][s], 0) / good.length;
    expect(out.data[0][s]).toBe(Math.fround(rec.data[0][s] - mean));
  });

  it('mean of chosen channels (linked mastoids): x − (M1 + M2)/2', () => {
    const rec = bench();
    const out = conditionRecording(rec, { reference: { kind: 'mean-of-channels', channels: ['M1', 'M2'] } }).recording;
    for (const s of [0, 999, 5000, rec.data[0].length - 1]) {
      const m = (rec.data[4][s] + rec.data[5][s]) / 2;
      expect(out.data[1][s]).toBe(Math.fround(rec.data[1][s] - m));
      expect(out.data[4][s]).toBe(Math.fround(rec.data[4][s] - m)); // M1 becomes (M1 − M2)/2
    }
    // the common drift of the scalp channels is gone: Cz's slow part is far smaller than before
    const slow = (x: Float32Array) => Math.abs(x.slice(0, 256 * 5).reduce((a, b) => a + b, 0) / (256 * 5));
    expect(slow(out.data[1])).toBeLessThan(0.2 * slow(rec.data[1]));
  });

  it('bipolar pairs equal the differences, by hand and along a named shaft', () => {
    const rec = bench();
    const out = conditionRecording(rec, { reference: { kind: 'bipolar', pairs: [['Fz', 'Cz']], shafts: ['LA'] } }).recording;
    expect(out.channelNames).toEqual(['Fz-Cz', 'LA1-LA2', 'LA2-LA3', 'LA3-LA4', 'LA4-LA5', 'HEOG']);
    expect(out.channelTypes).toEqual(['eeg', 'intracranial', 'intracranial', 'intracranial', 'intracranial', 'eog']);
    const pairs: [number, number, number][] = [[0, 0, 1], [1, 7, 8], [2, 8, 9], [3, 9, 10], [4, 10, 11]];
    for (const [o, a, b] of pairs) {
      for (let s = 0; s < rec.data[0].length; s += 97) expect(out.data[o][s]).toBe(Math.fround(rec.data[a][s] - rec.data[b][s]));
    }
    // the shaft's shared 300 µV offset cancels in each pair
    const mean = (x: Float32Array) => x.reduce((p, v) => p + v, 0) / x.length;
    expect(Math.abs(mean(out.data[1]))).toBeLessThan(5);
  });

  it('skips shaft pairs with a bad contact and says so', () => {
    const r = conditionRecording(bench(), { signals: { bad: ['LA3'] }, reference: { kind: 'bipolar', shafts: ['LA'] } });
    expect(r.recording.channelNames.filter((n) => n.startsWith('LA'))).toEqual(['LA1-LA2', 'LA4-LA5']);
    expect(r.warnings).toEqual(['reference.shafts[0] "LA": LA2-LA3, LA3-LA4 left out (a contact is marked bad)']);
  });

  it('names the field for a missing or bad reference channel and for a shaft without contacts', () => {
    const rec = bench();
    const bad = (spec: object) => () => conditionRecording(rec, spec);
    expect(bad({ reference: { kind: 'mean-of-channels', channels: ['M1', 'A2'] } })).toThrow(/^reference\.channels\[1\] names no signal in the recording \("A2"/);
    expect(bad({ signals: { bad: ['M2'] }, reference: { kind: 'mean-of-channels', channels: ['M1', 'M2'] } })).toThrow(/^reference\.channels\[1\] "M2" is marked bad/);
    expect(bad({ reference: { kind: 'bipolar', shafts: ['RH'] } })).toThrow(/^reference\.shafts\[0\] "RH" matches no channel named RH<number>/);
    expect(bad({ reference: { kind: 'bipolar', pairs: [['Fz', 'Fz']] } })).toThrow(/^reference\.pairs\[0\] pairs "Fz" with itself/);
    expect(bad({ signals: { types: { Fz: 'eog', Cz: 'eog', Pz: 'eog', Oz: 'eog', M1: 'eog', M2: 'eog', LA1: 'eog', LA2: 'eog', LA3: 'eog', LA4: 'eog' } }, reference: { kind: 'common-average' } })).toThrow(/^reference "common-average" needs at least 2 good EEG or intracranial channels/);
  });
});

describe('a reference in a run', () => {
  const recipe = {
    format: 2,
    epochs: { events: ['probe'], start: -1, end: 1.5 },
    frequencies: { min: 4, max: 30, count: 4, spacing: 'log' },
    cycles: { fixed: 4 },
    baseline: { start: -0.7, end: -0.4, method: 'decibel', scope: 'trial' },
    spectrum: { segment: 1, overlap: 0.5, range: [1, 40], source: 'recording' },
    aperiodic: { range: [2, 40], model: 'power-law' },
  };

  it('is applied to the continuous recording before epoching: the same bits as referencing by hand first', () => {
    const rec = bench();
    const byRecipe = runRecipe(rec, { ...recipe, reference: { kind: 'mean-of-channels', channels: ['M1', 'M2'] } });
    const byHand = conditionRecording(rec, { reference: { kind: 'mean-of-channels', channels: ['M1', 'M2'] } }).recording;
    const plain = runRecipe({ ...rec, data: byHand.data }, recipe);
    expect(JSON.stringify(byRecipe)).toBe(JSON.stringify(plain));
    expect(JSON.stringify(byRecipe.conditions)).not.toBe(JSON.stringify(runRecipe(rec, recipe).conditions));
  });

  it('lets the recipe name bipolar channels, and refuses a name the montage does not make', () => {
    const rec = bench();
    const r = runRecipe(rec, { ...recipe, reference: { kind: 'bipolar', shafts: ['LA'] }, channels: ['LA2-LA3'] });
    expect(r.channels).toEqual(['LA2-LA3']);
    expect(r.channelTypes).toEqual(['intracranial']);
    expect(() => planRecipe(rec, { ...recipe, reference: { kind: 'bipolar', shafts: ['LA'] }, channels: ['LA1'] })).toThrow(/^channels\[0\] names no signal in the recording \("LA1"/);
    expect(() => planRecipe(rec, { ...recipe, reference: { kind: 'linked' } })).toThrow(/^reference\.kind must be/);
  });
});
