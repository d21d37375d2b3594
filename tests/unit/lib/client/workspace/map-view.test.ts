// The Maps screen's live normalized map (src/lib/client/workspace/map-view.ts), on a decomposition written by hand
// in a scenario of our own: one channel "Fz", one condition "bell", 2 frequencies × 8 time points at 4 Hz from
// −1 s. Expected values come from the contract's formulas worked here by hand (dB = 10·log10(P/B), B the mean of P
// over the baseline's grid points; percent change 100·(P − B)/B: common practice for baseline normalization).
import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { useResultsStore, type Decomposition } from '../../../../../src/lib/client/workspace/results';
import { INITIAL_WORKSPACE, useWorkspace } from '../../../../../src/lib/client/workspace/store';
import { useMapView, watchMapView } from '../../../../../src/lib/client/workspace/map-view';
import { assertClose } from '../../../../helpers/assert-close';

const nt = 8;
const times = Float64Array.from({ length: nt }, (_, j) => -1 + j / 4);
// Row f = 0 (4 Hz): 1, 2, 4, 8, 1, 2, 4, 8; row f = 1 (8 Hz): all 5.
const power = Float64Array.from([1, 2, 4, 8, 1, 2, 4, 8, 5, 5, 5, 5, 5, 5, 5, 5]);
const decomposition = {
  key: 'bell-run',
  recipe: { frequencies: { min: 4, max: 8, count: 2 } },
  recordingId: 'scenario',
  sampleRateHz: 4,
  epochStart: -1,
  channels: ['Fz'],
  labels: ['bell'],
  trials: [12],
  times,
  frequencies: Float64Array.from([4, 8]),
  spacing: 'linear',
  edgeSeconds: Float64Array.from([0, 0]),
  edges: { left: Int32Array.from([0, 0]), right: Int32Array.from([0, 0]) },
  mask: new Uint8Array(2 * nt),
  power: [[power]],
  itpc: null,
  evoked: null,
  warnings: [],
} as unknown as Decomposition;

let stop: (() => void) | null = null;
beforeEach(() => {
  useWorkspace.setState({ ...INITIAL_WORKSPACE, channel: 'Fz', condition: 'bell', method: 'decibel', baseline: { start: -1, end: -0.75 } });
  useResultsStore.setState({ cache: { [decomposition.key]: decomposition }, order: [decomposition.key], activeKey: decomposition.key, trialHold: null });
  stop = watchMapView();
});
afterEach(() => {
  stop?.();
  useResultsStore.setState({ cache: {}, order: [], activeKey: null });
});

describe('the live normalized map of the Maps screen', () => {
  it('is 10·log10(P/B) with B the mean over the baseline points, and its limits are symmetric around 0 dB', () => {
    // Baseline −1 … −0.75 s: grid points 0 and 1, so B = 1.5 at 4 Hz and 5 at 8 Hz.
    const map = useMapView.getState().normalized!;
    const expected = Array.from(power, (p, i) => 10 * Math.log10(p / (i < nt ? 1.5 : 5)));
    assertClose(Array.from(map.values), expected, 1e-12);
    const m = 10 * Math.log10(8 / 1.5);
    assertClose(map.domain, [-m, m], 1e-12);
    expect(map.kind).toBe('linear');
    expect(map.title).toBe('bell · dB · trial-average · Fz');
  });

  it('re-normalizes at once when the baseline moves, and not for a move onto the same grid points', () => {
    const before = useMapView.getState().normalized;
    // −0.5 … 0 s: points 2, 3, 4, B = (4 + 8 + 1)/3 at 4 Hz; percent change 100·(P − B)/B.
    useWorkspace.getState().set({ method: 'percent-change' });
    useWorkspace.getState().setBaseline({ start: -0.5, end: 0 });
    const after = useMapView.getState().normalized!;
    expect(after).not.toBe(before);
    const b = 13 / 3;
    assertClose(Array.from(after.values.subarray(0, nt)), Array.from(power.subarray(0, nt), (p) => (100 * (p - b)) / b), 1e-12);
    assertClose(Array.from(after.values.subarray(nt)), new Array(nt).fill(0), 1e-12);
    // 1 ms later snaps to the same grid points (4 Hz sampling): nothing new to paint.
    useWorkspace.getState().setBaseline({ start: -0.499, end: 0.001 });
    expect(useMapView.getState().normalized).toBe(after);
  });

  it('names a baseline that reaches past the event, keeping the same list while it stays the same', () => {
    useWorkspace.getState().setBaseline({ start: -0.5, end: 0.25 });
    const warnings = useMapView.getState().warnings;
    expect(warnings).toEqual(['Baseline reaches past the event at 0 s (ends at 0.25 s): it includes the response.']);
    useWorkspace.getState().setBaseline({ start: -0.75, end: 0.25 });
    expect(useMapView.getState().warnings).toBe(warnings);
  });

  it('stops following the stores once the screen stops watching', () => {
    stop!();
    stop = null;
    const before = useMapView.getState().normalized;
    useWorkspace.getState().setBaseline({ start: 0, end: 0.5 });
    expect(useMapView.getState().normalized).toBe(before);
  });
});
