// The edge-zone rule, once (src/lib/analysis/edge-zone.ts): grid points closer than 3σ to either end of the epoch
// (analysis contract; 3σ after Cohen, 2019, NeuroImage 199:81–86). Expected counts below are worked by hand from the
// definition: point j is in the leading zone when j/fs < e, in the trailing zone when (L−1−j)/fs < e.
import { describe, expect, it } from 'vitest';
import { baselineEdgeOverlap, edgePointCount, edgeZones } from '../../../../src/lib/analysis/edge-zone';
import { baselinePointsIn } from '../../../../src/lib/analysis/baseline';
import { runRecipe } from '../../../../src/lib/analysis/run-recipe';

describe('edge zones', () => {
  it('counts the points with j/fs < e; an edge on a grid point leaves that point outside', () => {
    // 0.25 s at 400 Hz = exactly 100 samples: points 0 … 99 are closer than 0.25 s, point 100 is at 0.25 s.
    expect(edgePointCount(0.25, 400, 1000)).toBe(100);
    // 0.2501 s at 400 Hz = 100.04 samples: point 100 (0.25 s) is now closer than the edge.
    expect(edgePointCount(0.2501, 400, 1000)).toBe(101);
    // 0.1 × 3 = 0.30000000000000004 in binary: still exactly 30 points at 100 Hz (the 1e-9-sample tolerance).
    expect(edgePointCount(0.1 * 3, 100, 1000)).toBe(30);
    expect(edgePointCount(0, 100, 10)).toBe(0);
    expect(edgePointCount(5, 100, 10)).toBe(10);
    const z = edgeZones([0.25, 0.05], 100, 201);
    expect(Array.from(z.left)).toEqual([25, 5]);
    expect(Array.from(z.right)).toEqual([25, 5]);
  });

  it('finds the frequencies where a baseline reaches into the zone at either end', () => {
    const z = edgeZones([0.25, 0.05], 100, 201);
    expect(baselineEdgeOverlap(z, 201, 10, 20)).toEqual([0]); // inside the 0.25-s zone only
    expect(baselineEdgeOverlap(z, 201, 25, 50)).toEqual([]); // from 0.25 s: clear of both
    expect(baselineEdgeOverlap(z, 201, 150, 196)).toEqual([0, 1]); // point 196 = 0.04 s before the end
  });

  it('clamps baseline indices into the epoch (halves rounded up, as the contract says)', () => {
    // epoch −0.5 … 1.5 s at 100 Hz has 201 points; −0.2 … 0 s is points 30 … 50.
    expect(baselinePointsIn(-0.2, 0, -0.5, 100, 201)).toEqual({ first: 30, last: 50 });
    expect(baselinePointsIn(-0.6, 1.6, -0.5, 100, 201)).toEqual({ first: 0, last: 200 });
  });

  it('is the rule the run warns with: the warning counts the same frequencies', () => {
    const fs = 100;
    const data = [Float32Array.from({ length: 2000 }, (_, i) => Math.sin(i / 3) + Math.cos(i / 7))];
    const events = [3, 6, 9, 12].map((t) => ({ onsetSeconds: t, durationSeconds: 0, label: 'cue' }));
    const recipe = {
      format: 2,
      epochs: { events: ['cue'], start: -1, end: 1.5 },
      baseline: { start: -0.9, end: -0.6, method: 'decibel', scope: 'average' },
      frequencies: { min: 2, max: 30, count: 8, spacing: 'log' },
      cycles: { fixed: 5 },
      spectrum: { segment: 1, overlap: 0.5, range: [1, 40] },
      aperiodic: { range: [2, 40], model: 'power-law' },
    };
    const result = runRecipe({ sampleRateHz: fs, channelNames: ['Cz'], data, events }, recipe);
    const nTimes = result.times.length;
    const b = baselinePointsIn(-0.9, -0.6, -1, fs, nTimes);
    const hits = baselineEdgeOverlap(edgeZones(result.edgeSeconds, fs, nTimes), nTimes, b.first, b.last);
    expect(hits.length).toBeGreaterThan(0);
    expect(hits.length).toBeLessThan(8);
    const warning = result.warnings.find((w) => w.startsWith('baseline:'));
    expect(warning).toContain(`lies in the edge zone at ${hits.length} of 8 frequencies`);
  });
});
