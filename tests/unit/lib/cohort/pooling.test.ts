import { describe, expect, it } from 'vitest';
import { readFileSync } from 'node:fs';
import { describePoolingDifference, findPoolingDifference, type PoolingCandidate } from '../../../../src/lib/cohort/pooling';

const base = () => JSON.parse(readFileSync('public/recipes/harbour-lights.json', 'utf8')) as Record<string, any>;
const summary = () => ({ normalizedUnit: 'decibel', bands: [{ label: 'theta', lowHz: 4, highHz: 8 }], windows: [{ label: 'early', startS: 0.1, endS: 0.5 }] });
const candidate = (label: string, edit: (r: Record<string, any>) => void = () => undefined, s = summary()): PoolingCandidate => {
  const recipe = base();
  edit(recipe);
  return { label, recipe, summary: s };
};

describe('pooling refuses sessions whose recipes differ in what changes the numbers', () => {
  it('accepts recipes that differ only in epochs, rejection, channels and the recording', () => {
    const a = candidate('S01 (version 1)');
    const b = candidate('S02 (version 3)', (r) => {
      r.rejection.peakToPeakMicrovolts = 200;
      r.channels = ['Fz'];
      r.recording = { fingerprint: 'a'.repeat(64) };
      r.epochs.start = -1.5;
    });
    expect(findPoolingDifference([a, b])).toBeNull();
  });

  it('reads an omitted default as the default: scope "average", spread "time", reference as recorded', () => {
    const a = candidate('S01', (r) => { r.baseline.method = 'z-score'; });
    const b = candidate('S02', (r) => { r.baseline.method = 'z-score'; r.baseline.scope = 'average'; r.baseline.spread = 'time'; r.reference = { kind: 'as-recorded' }; });
    expect(findPoolingDifference([a, b])).toBeNull();
  });

  const cases: [string, (r: Record<string, any>) => void][] = [
    ['baseline.start', (r) => { r.baseline.start = -0.4; }],
    ['baseline.end', (r) => { r.baseline.end = -0.1; }],
    ['baseline.method', (r) => { r.baseline.method = 'percent-change'; }],
    ['baseline.scope', (r) => { r.baseline.scope = 'trial'; }],
    ['frequencies.count', (r) => { r.frequencies.count = 40; }],
    ['frequencies.spacing', (r) => { r.frequencies.spacing = 'linear'; }],
    ['cycles', (r) => { r.cycles = { fixed: 7 }; }],
    ['reference', (r) => { r.reference = { kind: 'common-average' }; }],
    ['filters.highPass', (r) => { r.filters = { highPass: { cutoffHz: 0.5, order: 4 } }; }],
    ['filters.notch', (r) => { r.filters = { notch: { lineHz: 50 } }; }],
    ['signals.types', (r) => { r.signals = { types: { Fp1: 'eog' } }; }],
  ];
  for (const [field, edit] of cases) {
    it(`names ${field} when it differs, with both values and the sessions`, () => {
      const d = findPoolingDifference([candidate('S01 (version 1)'), candidate('S02 (version 1)'), candidate('S03 (version 2)', edit)]);
      expect(d?.field).toBe(field);
      expect(d?.first.label).toBe('S01 (version 1)');
      expect(d?.other.label).toBe('S03 (version 2)');
      expect(describePoolingDifference(d!)).toMatch(new RegExp(`^Cannot pool: ${field.replace('.', '\\.')} differs — .* in S01 \\(version 1\\), .* in S03 \\(version 2\\)`));
    });
  }

  it('names baseline.spread between two z-scores with another spread', () => {
    const d = findPoolingDifference([candidate('S01', (r) => { r.baseline.method = 'z-score'; }), candidate('S02', (r) => { r.baseline.method = 'z-score'; r.baseline.spread = 'trials'; })]);
    expect(d).toMatchObject({ field: 'baseline.spread', first: { value: 'time' }, other: { value: 'trials' } });
  });

  it('names summary.bands when two summaries average other band edges', () => {
    const other = summary();
    other.bands[0].highHz = 7;
    const d = findPoolingDifference([candidate('S01'), candidate('S02', undefined, other)]);
    expect(d?.field).toBe('summary.bands');
  });
});
