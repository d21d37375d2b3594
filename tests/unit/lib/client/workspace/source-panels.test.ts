import { describe, expect, it } from 'vitest';
import type { Recording } from '../../../../../src/lib/analysis/recording';
import { badWith, channelsView, conditionTally, epochSpans, rejectionTypes, typesWith } from '../../../../../src/lib/client/workspace/source-panels';
import { chartSitesOf } from '../../../../../src/lib/client/workspace/band-view';
import { conditionsToggled, keptByCondition } from '../../../../../src/lib/client/workspace/recipe-fields';
import { defaultConditioning, defaultRejection, type EpochDecision } from '../../../../../src/lib/client/workspace/source-rules';

// Four signals named as EDF+ files name them (Kemp & Olivan, 2003, §2.1.3.1: a type word, then the label).
const recording: Recording = {
  sampleRateHz: 500,
  channelNames: ['Fz', 'Cz', 'EOG ROC', 'STI 014'],
  data: [0, 1, 2, 3].map(() => new Float32Array(5000)),
  events: [],
};

const decision = (eventIndex: number, condition: string, onsetSeconds: number, rejected: boolean, fit: EpochDecision['fit'] = 'fits'): EpochDecision => ({
  eventIndex,
  key: `e${eventIndex}`,
  condition,
  onsetSeconds,
  rejected,
  reasons: [],
  fit,
  rejectedByRules: rejected,
  manual: null,
  peakToPeakMicrovolts: null,
  peakToPeakChannel: null,
  minStdMicrovolts: null,
  minStdChannel: null,
});

describe('channelsView', () => {
  it('reads each type from the label, counts the good brain channels, and offers the µV ones to the reference', () => {
    const view = channelsView(recording, { ...defaultConditioning, bad: ['Cz'] });
    expect(view.rows.map((r) => [r.name, r.type, r.unit, r.bad])).toEqual([
      ['Fz', 'eeg', 'µV', false],
      ['Cz', 'eeg', 'µV', true],
      ['EOG ROC', 'eog', 'µV', false],
      ['STI 014', 'stimulus', 'µV', false],
    ]);
    expect(view.analysed).toBe(1);
    expect(view.electrodes).toEqual(['Fz', 'EOG ROC', 'STI 014']);
  });

  it('keeps only type changes that differ from the file, and marks bad channels once', () => {
    const changed = typesWith(recording, defaultConditioning, 'EOG ROC', 'eeg');
    expect(changed).toEqual({ 'EOG ROC': 'eeg' });
    expect(typesWith(recording, { ...defaultConditioning, types: changed }, 'EOG ROC', 'eog')).toEqual({});
    expect(badWith({ ...defaultConditioning, bad: ['Fz'] }, 'Fz', true)).toEqual(['Fz']);
    expect(badWith({ ...defaultConditioning, bad: ['Fz'] }, 'Fz', false)).toEqual([]);
  });
});

describe('epochSpans', () => {
  it('spans round((end − start)·fs) + 1 samples from the onset plus the window start (analysis contract, "Units and grids")', () => {
    const spans = epochSpans(recording, [decision(3, 'a', 2.0, false), decision(5, 'a', 4.5, true)], { start: -0.2, end: 0.8 }, 5);
    // 500 Hz: 1 s of window is 501 points; 2.0 s is sample 1000, −0.2 s is 100 samples back.
    expect(spans).toEqual([
      { startSample: 900, endSample: 1401, rejected: false, selected: false },
      { startSample: 2150, endSample: 2651, rejected: true, selected: true },
    ]);
  });
});

describe('rejectionTypes and conditionTally', () => {
  it('meets brain types across channels, or the types of the picked channels only', () => {
    expect(rejectionTypes(recording, defaultConditioning, defaultRejection)).toEqual([['eeg', 'µV']]);
    expect(rejectionTypes(recording, defaultConditioning, { ...defaultRejection, scope: 'channel', channels: ['EOG ROC'] })).toEqual([['eog', 'µV']]);
  });

  it('counts kept and rejected epochs per condition, and those outside the recording or across a gap', () => {
    const tally = conditionTally([decision(0, 'a', 1, false), decision(1, 'a', 2, true, 'outside'), decision(2, 'b', 3, true, 'gap'), decision(3, 'b', 4, true)]);
    expect(tally).toEqual([
      { condition: 'a', total: 2, kept: 1, rejected: 1, outside: 1, gap: 0 },
      { condition: 'b', total: 2, kept: 0, rejected: 2, outside: 0, gap: 1 },
    ]);
    expect(keptByCondition([decision(0, 'a', 1, false), decision(1, 'a', 2, true), decision(2, 'b', 3, false)])).toEqual(new Map([['a', 1], ['b', 1]]));
  });
});

describe('the Recipe screen condition ticks', () => {
  it('keeps "every condition" as an empty list', () => {
    expect(conditionsToggled(['a', 'b', 'c'], [], 'b')).toEqual(['a', 'c']);
    expect(conditionsToggled(['a', 'b', 'c'], ['a', 'c'], 'b')).toEqual([]);
  });
});

describe('chartSitesOf', () => {
  const d = { recordingId: 'rec-1', channels: ['Fz', 'Cz', 'Pz'] };
  const groups = [{ name: 'midline', channels: ['Fz', 'Cz', 'Pz'] }];
  it('shows the view channel until sites are picked, and forgets sites picked on another recording', () => {
    expect(chartSitesOf(null, d, groups, 'Cz')).toEqual(['Cz']);
    expect(chartSitesOf({ recordingId: 'rec-0', sites: ['Fz', 'midline'] }, d, groups, 'Cz')).toEqual(['Cz']);
  });
  it('keeps the picked sites the run still has', () => {
    expect(chartSitesOf({ recordingId: 'rec-1', sites: ['TP9', 'midline', 'Pz'] }, d, groups, 'Cz')).toEqual(['midline', 'Pz']);
    expect(chartSitesOf({ recordingId: 'rec-1', sites: ['TP9'] }, d, groups, 'Cz')).toEqual(['Cz']);
  });
});
