import { describe, expect, it } from 'vitest';
import { frequencyGrid } from '../../../../../src/lib/analysis/frequency-grid';
import { planRecipe } from '../../../../../src/lib/analysis/run-recipe';
import { edgeSecondsOf, gaussianSigmas } from '../../../../../src/lib/analysis/wavelet';
import { DEFAULT_DRAFT, toRecipe } from '../../../../../src/lib/client/workspace/recipe';
import { conditionsPerLabel, defaultRejection } from '../../../../../src/lib/client/workspace/source-rules';
import { DEFAULT_BANDS } from '../../../../../src/lib/client/workspace/view';
import { useWorkspace } from '../../../../../src/lib/client/workspace/store';

const window = useWorkspace.getState().epochWindow;
const baseline = useWorkspace.getState().baseline;

describe('first-time defaults', () => {
  it('epochs −1 … 2 s, baseline −0.5 … −0.2 s, frequencies covering the default bands', () => {
    expect(window).toEqual({ start: -1, end: 2 });
    expect(baseline).toEqual({ start: -0.5, end: -0.2 });
    expect(DEFAULT_DRAFT.frequencies.min).toBeLessThanOrEqual(Math.min(...DEFAULT_BANDS.map((b) => b.lowHz)));
    expect(DEFAULT_DRAFT.frequencies.max).toBeGreaterThanOrEqual(Math.max(...DEFAULT_BANDS.map((b) => b.highHz)));
  });

  it('keep the baseline clear of the edge zone at the lowest frequency (edge = 3σ, σ = n / 2πf)', () => {
    const f = frequencyGrid(DEFAULT_DRAFT.frequencies);
    const edges = edgeSecondsOf(gaussianSigmas(f, { min: DEFAULT_DRAFT.cyclesMin, max: DEFAULT_DRAFT.cyclesMax }));
    // By hand at 3 Hz with 3 cycles: σ = 3 / (2π·3) = 0.159 s, 3σ = 0.477 s < −0.5 − (−1) = 0.5 s.
    expect(edges[0]).toBeCloseTo(3 * 3 / (2 * Math.PI * 3), 12);
    expect(baseline.start - window.start).toBeGreaterThan(edges[0]);
    // And the core agrees: the default recipe earns no baseline warning on a 500 Hz recording.
    const n = 500 * 20;
    const rec = { sampleRateHz: 500, channelNames: ['Cz'], data: [Float32Array.from({ length: n }, (_, i) => Math.sin(i / 7))], events: [{ onsetSeconds: 5, durationSeconds: 0, label: 'cue' }] };
    const recipe = toRecipe({ draft: DEFAULT_DRAFT, conditions: [{ name: 'cue', labels: ['cue'] }], epochWindow: window, rejection: defaultRejection, fingerprint: null, baseline, method: 'decibel', scope: 'average', fitRange: [2, 40] });
    expect(planRecipe(rec, recipe).warnings.filter((w) => w.startsWith('baseline'))).toEqual([]);
  });

  it('make one condition per label for a handful of labels, with names a condition may carry', () => {
    expect(conditionsPerLabel([{ label: 'cue/left' }, { label: 'cue/right' }, { label: 'cue/left' }])).toEqual([
      { name: 'cue/left', labels: ['cue/left'] },
      { name: 'cue/right', labels: ['cue/right'] },
    ]);
    expect(conditionsPerLabel([{ label: 'Stimulus, S  1' }])).toEqual([{ name: 'Stimulus- S  1', labels: ['Stimulus, S  1'] }]);
    expect(conditionsPerLabel(Array.from({ length: 9 }, (_, i) => ({ label: `t${i}` })))).toEqual([]);
  });

  it('a recording opened with no conditions yet gets them; one with conditions keeps them', () => {
    const local = { fileName: 'x', sizeBytes: 0, format: 'csv' as const, identifying: null, startDateTime: null, ignoredSignals: [], warnings: [] };
    const rec = { sampleRateHz: 100, channelNames: ['Fz'], data: [new Float32Array(1000)], events: [{ onsetSeconds: 3, durationSeconds: 0, label: 'bell' }] };
    useWorkspace.getState().load({ recording: rec, local, fingerprint: 'f' });
    expect(useWorkspace.getState().conditions).toEqual([{ name: 'bell', labels: ['bell'] }]);
    useWorkspace.getState().setConditions([{ name: 'bell cue', labels: ['bell'] }]);
    useWorkspace.getState().load({ recording: rec, local, fingerprint: 'f' });
    expect(useWorkspace.getState().conditions).toEqual([{ name: 'bell cue', labels: ['bell'] }]);
  });
});
