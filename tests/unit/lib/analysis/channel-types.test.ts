import { describe, expect, it } from 'vitest';
import { inferChannelType, resolveChannels } from '../../../../src/lib/analysis/channel-types';
import { planRecipe, runRecipe } from '../../../../src/lib/analysis/run-recipe';
import { bytesSource, openEdf, toRecording, writeEdf } from '../../../../src/lib/formats';
import { seededNormal } from '../../../helpers/seeded-random';

describe('inferChannelType', () => {
  it('reads the EDF+ signal-type word of a label', () => {
    // EDF+ (Kemp & Olivan, 2003, Clin Neurophysiol 114:1755–1761, §2.1.3.1) lists the type words EEG, ECG, EOG,
    // ERG, EMG, MEG, MCG, EP, Temp, Resp, SaO2, Light, Sound and Event before the label's sensor name.
    const cases: [string, string][] = [
      ['EEG Fz', 'eeg'],
      ['ECG LA-RA', 'ecg'],
      ['EOG ROC', 'eog'],
      ['EMG Chin1', 'emg'],
      ['MEG 0113', 'meg-magnetometer'],
      ['Resp Thorax', 'other'],
      ['SaO2 Finger', 'other'],
      ['Temp Body', 'other'],
      ['Event Marker', 'stimulus'],
      ['SEEG LA3', 'intracranial'],
      ['ECoG G12', 'intracranial'],
    ];
    for (const [label, type] of cases) expect(inferChannelType(label), label).toBe(type);
  });

  it('follows common label conventions without a type word, and MEG units', () => {
    // Common practice in clinical montages: EKG/ECG, HEOG/VEOG/LOC/ROC, Chin EMG, STI/TRIG/Status lines.
    const cases: [string, string][] = [
      ['Fz', 'eeg'],
      ['T7', 'eeg'],
      ['EKG', 'ecg'],
      ['ECG2', 'ecg'],
      ['HEOG', 'eog'],
      ['VEOG', 'eog'],
      ['LOC', 'eog'],
      ['Chin1', 'emg'],
      ['STI 014', 'stimulus'],
      ['Status', 'stimulus'],
      ['TRIG', 'stimulus'],
      ['Pleth', 'other'],
    ];
    for (const [label, type] of cases) expect(inferChannelType(label), label).toBe(type);
    expect(inferChannelType('MEG 0112', 'fT/cm')).toBe('meg-gradiometer');
    expect(inferChannelType('MAG 1', 'fT')).toBe('meg-magnetometer');
    expect(inferChannelType('GRAD 2', 'fT/cm')).toBe('meg-gradiometer');
  });

  it('applies the recipe types over the inference and names a channel the recording lacks', () => {
    const rec = { sampleRateHz: 100, channelNames: ['Fz', 'X1', 'EKG'], data: [new Float32Array(4), new Float32Array(4), new Float32Array(4)], events: [] };
    const r = resolveChannels(rec, { types: { X1: 'eog' }, bad: ['Fz'] });
    expect(r.types).toEqual(['eeg', 'eog', 'ecg']);
    expect(r.bad).toEqual([true, false, false]);
    expect(r.goodBrain).toEqual([]);
    expect(() => resolveChannels(rec, { types: { Oz: 'eeg' } })).toThrow(/^signals\.types\["Oz"\] names no signal in the recording/);
    expect(() => resolveChannels(rec, { bad: ['Oz'] })).toThrow(/^signals\.bad\[0\] names no signal/);
  });
});

// Scenario of our own ("Tern Point sleep-lab nap study"): two EEG electrodes, one eye, one heart and one chin
// muscle channel, 200 Hz, cues every 4 s. The heart channel carries 1 mV R-waves once a second, as a real ECG does.
function napRecording() {
  const fs = 200;
  const seconds = 64;
  const n = fs * seconds;
  const normal = seededNormal(21);
  const eeg = () => Float64Array.from({ length: n }, () => 8 * normal());
  const ecg = Float64Array.from({ length: n }, (_, i) => (i % fs < 6 ? 1000 : 0) + 5 * normal());
  const annotations = Array.from({ length: 14 }, (_, k) => ({ onsetSeconds: 4 + 4 * k, texts: ['chirp'] }));
  const signal = (label: string, samples: Float64Array, range = 2000) => ({ label, physicalDimension: 'uV', physicalMin: -range, physicalMax: range, samplesPerRecord: fs, samples });
  const bytes = writeEdf({
    start: { year: 2025, month: 6, day: 2, hour: 13, minute: 0, second: 0 },
    recordDurationSeconds: 1,
    signals: [signal('EEG C3', eeg()), signal('EEG C4', eeg()), signal('EOG LOC', eeg()), signal('ECG II', ecg), signal('EMG Chin', eeg())],
    annotations,
  });
  return { bytes, fs };
}

const recipe = {
  format: 2,
  epochs: { events: ['chirp'], start: -1, end: 2 },
  frequencies: { min: 4, max: 30, count: 4, spacing: 'log' },
  cycles: { fixed: 4 },
  baseline: { start: -0.6, end: -0.3, method: 'decibel', scope: 'average' },
  spectrum: { segment: 2, overlap: 0.5, range: [1, 40], source: 'recording' },
  aperiodic: { range: [2, 40], model: 'power-law' },
  rejection: { peakToPeakMicrovolts: 150, flatMicrovolts: 0.5 },
};

describe('channel types in a run', () => {
  it('decomposes only the EEG channels by default, and the ECG channel no longer rejects epochs', async () => {
    const { bytes } = napRecording();
    const rec = toRecording(await openEdf(bytesSource(bytes)));
    expect(rec.channelNames).toEqual(['C3', 'C4', 'LOC', 'II', 'Chin']);
    expect(rec.channelTypes).toEqual(['eeg', 'eeg', 'eog', 'ecg', 'emg']);
    const result = runRecipe(rec, recipe);
    expect(result.channels).toEqual(['C3', 'C4']);
    expect(result.channelTypes).toEqual(['eeg', 'eeg']);
    expect(result.channelUnits).toEqual(['µV', 'µV']);
    expect(result.conditions.chirp.trials).toBe(14);
    expect(result.conditions.chirp.rejected).toBe(0);
    // The same ECG channel typed as EEG by the recipe is checked by the 150 µV rule and rejects every epoch.
    expect(() => planRecipe(rec, { ...recipe, signals: { types: { II: 'eeg' } } })).toThrow(/^epochs\.events\[0\] : all 14 epochs of "chirp" were left out \(14 rejected/);
    // Named by hand, a non-brain channel is decomposed (e.g. to look at the eye channel's own power).
    expect(runRecipe(rec, { ...recipe, channels: ['C3', 'LOC'] }).channelTypes).toEqual(['eeg', 'eog']);
  });

  it('leaves a bad channel out everywhere and names the field that still asks for it', async () => {
    const rec = toRecording(await openEdf(bytesSource(napRecording().bytes)));
    const result = runRecipe(rec, { ...recipe, signals: { bad: ['C4'] } });
    expect(result.channels).toEqual(['C3']);
    expect(() => planRecipe(rec, { ...recipe, channels: ['C3', 'C4'], signals: { bad: ['C4'] } })).toThrow(/^channels\[1\] "C4" is marked bad \(signals\.bad\)/);
    expect(() => planRecipe(rec, { ...recipe, signals: { bad: ['C3', 'C4'] } })).toThrow(/^channels may be left out only when the recording has good EEG, MEG or intracranial channels/);
    expect(() => planRecipe(rec, { ...recipe, signals: { types: { LOC: 'eye' } } })).toThrow(/^signals\.types\.LOC must be a channel type/);
  });

  it('keeps MEG in fT and fT/cm, checks it with limits of its own unit, and says when it has none', async () => {
    // SI prefixes: 1 pT = 1e3 fT and 1 pT/m = 10 fT/cm. A magnetometer written in pT and a gradiometer in pT/m.
    const fs = 200;
    const n = fs * 30;
    const normal = seededNormal(4);
    const mag = Float64Array.from({ length: n }, () => 0.2 * normal());
    const grad = Float64Array.from({ length: n }, () => 20 * normal());
    mag[10 * fs] = 9; // one artefact of 9 pT = 9000 fT, inside the epoch of the cue at 10 s
    const bytes = writeEdf({
      start: { year: 2025, month: 1, day: 1, hour: 0, minute: 0, second: 0 },
      recordDurationSeconds: 1,
      signals: [
        { label: 'MEG 0111', physicalDimension: 'pT', physicalMin: -10, physicalMax: 10, samplesPerRecord: fs, samples: mag },
        { label: 'MEG 0112', physicalDimension: 'pT/m', physicalMin: -1000, physicalMax: 1000, samplesPerRecord: fs, samples: grad },
      ],
      annotations: [5, 10, 15, 20].map((o) => ({ onsetSeconds: o, texts: ['chirp'] })),
    });
    const rec = toRecording(await openEdf(bytesSource(bytes)));
    expect(rec.channelTypes).toEqual(['meg-magnetometer', 'meg-gradiometer']);
    expect(rec.channelUnits).toEqual(['fT', 'fT/cm']);
    // The 9000 fT artefact, to the int16 resolution of the EDF (20 pT / 65535 ≈ 0.3 fT).
    expect(Math.abs(rec.data[0][10 * fs] - 9000)).toBeLessThan(0.5);
    const r = runRecipe(rec, { ...recipe, frequencies: { min: 4, max: 30, count: 3 } });
    expect(r.channelUnits).toEqual(['fT', 'fT/cm']);
    expect(r.conditions.chirp.rejected).toBe(0);
    expect(r.warnings).toContain('rejection: meg-magnetometer channels are not checked (no rejection.byType["meg-magnetometer"] limits in their unit)');
    const limited = runRecipe(rec, { ...recipe, rejection: { ...recipe.rejection, byType: { 'meg-magnetometer': { peakToPeak: 4000, flat: null }, 'meg-gradiometer': { peakToPeak: 4000, flat: null } } } });
    expect(limited.conditions.chirp.rejected).toBe(1);
    expect(limited.warnings.some((w) => w.startsWith('rejection: meg'))).toBe(false);
  });
});
