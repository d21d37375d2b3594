import { scaleLinear, scaleLog } from 'd3-scale';
import { describe, expect, it } from 'vitest';
import { cellRanges, describeAnchor, notesOnMap, pinBox, regionRanges, versionStanding, type PinScales } from '../../../../../src/lib/client/workspace/note-pins';
import type { NoteView } from '../../../../../src/lib/client/review/types';

// The map's axes as the panel builds them (src/lib/plot/axes.ts): the independent reference here is d3-scale's own
// scaleLinear/scaleLog, so a pixel → value → pixel round trip is checked against the library, not against our maths.
const times = Array.from({ length: 11 }, (_, i) => -0.5 + 0.1 * i); // −0.5 … 0.5 s, 0.1 s apart
const frequencies = [4, 8, 16, 32]; // log spaced, ratio 2
const scales: PinScales = {
  time: scaleLinear().domain([-0.55, 0.55]).range([50, 600]),
  // rows span f/√2 … f·√2; pixel 300 is the bottom (lowest frequency)
  frequency: scaleLog().domain([4 / Math.SQRT2, 32 * Math.SQRT2]).range([300, 20]),
};
const grid = { times, frequencies, spacing: 'log' as const };

describe('regionRanges', () => {
  it('turns a dragged rectangle into time and frequency ranges through the scales, rounded outward', () => {
    const x0 = scales.time(0.2);
    const x1 = scales.time(0.4);
    const y0 = scales.frequency(6);
    const y1 = scales.frequency(12);
    // dragged from bottom right to top left: the order does not matter
    expect(regionRanges({ x0: x1, y0, x1: x0, y1 }, scales, grid)).toEqual({ timeS: [0.2, 0.4], frequencyHz: [6, 12] });
    const r = regionRanges({ x0: x0 + 0.3, y0, x1, y1: y1 + 0.3 }, scales, grid);
    expect(r.timeS[0]).toBeLessThanOrEqual(scales.time.invert(x0 + 0.3));
    expect(r.frequencyHz[1]).toBeGreaterThanOrEqual(scales.frequency.invert(y1 + 0.3));
  });

  it('clamps a rectangle dragged past the map to its axes', () => {
    const r = regionRanges({ x0: 0, y0: 400, x1: 700, y1: 0 }, scales, grid);
    expect(r.timeS).toEqual([-0.55, 0.55]);
    expect(r.frequencyHz[0]).toBeCloseTo(2.82, 2); // 4/√2 = 2.828…, rounded down to 0.01 Hz
    expect(r.frequencyHz[1]).toBeCloseTo(45.26, 2); // 32·√2 = 45.254…, rounded up
  });

  it('takes a click as the one cell under it (log rows span f/√r … f·√r)', () => {
    const r = regionRanges({ x0: scales.time(0.01), y0: scales.frequency(9), x1: scales.time(0.01) + 1, y1: scales.frequency(9) + 1 }, scales, grid);
    expect(r.timeS).toEqual([-0.05, 0.05]);
    expect(r.frequencyHz).toEqual([5.65, 11.32]); // 8/√2 = 5.657, 8·√2 = 11.314
  });
});

describe('cellRanges (what the keyboard pins)', () => {
  it('spans the outer edges of the corner cells, in either order, and equals a click on one cell', () => {
    expect(cellRanges(grid, { t0: 7, t1: 5, f0: 1, f1: 2 })).toEqual({ timeS: [-0.05, 0.25], frequencyHz: [5.65, 22.63] }); // 8/√2, 16·√2
    const click = regionRanges({ x0: scales.time(0), y0: scales.frequency(8), x1: scales.time(0), y1: scales.frequency(8) }, scales, grid);
    expect(cellRanges(grid, { t0: 5, t1: 5, f0: 1, f1: 1 })).toEqual(click);
  });
});

describe('pinBox', () => {
  it('places an anchor where the scales put its ranges, and clamps it to the map', () => {
    const box = pinBox({ timeS: [0.2, 0.4], frequencyHz: [6, 12] }, scales)!;
    expect(box.left).toBeCloseTo(scales.time(0.2), 9);
    expect(box.width).toBeCloseTo(scales.time(0.4) - scales.time(0.2), 9);
    expect(box.top).toBeCloseTo(scales.frequency(12), 9);
    expect(box.height).toBeCloseTo(scales.frequency(6) - scales.frequency(12), 9);
    const clamped = pinBox({ timeS: [-2, 0], frequencyHz: [1, 100] }, scales)!;
    expect(clamped.left).toBeCloseTo(50, 9);
    expect(clamped.top).toBeCloseTo(20, 9);
  });

  it('draws nothing for an anchor outside the map or without ranges', () => {
    expect(pinBox({ timeS: [1, 2], frequencyHz: [6, 12] }, scales)).toBeNull();
    expect(pinBox({ channel: 'Fz' }, scales)).toBeNull();
  });
});

const note = (id: string, anchor: NoteView['anchor'], extra: Partial<NoteView> = {}): NoteView => ({
  id, parentId: null, recipeVersion: 1, anchor, authorId: 'u', body: id, mentions: [], revision: 1, resolvedAt: null, resolvedBy: null, createdAt: '2026-12-02T10:00:00Z', updatedAt: '2026-12-02T10:00:00Z', ...extra,
});

describe('notesOnMap', () => {
  const ranges = { timeS: [0, 0.5] as [number, number], frequencyHz: [4, 8] as [number, number] };
  const notes = [
    note('fz-lamp', { channel: 'Fz', condition: 'lamp', ...ranges }),
    note('cz-lamp', { channel: 'Cz', condition: 'lamp', ...ranges }),
    note('fz-oar', { channel: 'Fz', condition: 'oar', ...ranges }),
    note('front-any', { channelGroup: 'front', ...ranges }),
    note('reply', null, { parentId: 'fz-lamp' }),
    note('session', null, { recipeVersion: null }),
    note('no-ranges', { channel: 'Fz', condition: 'lamp' }),
  ];
  it('keeps the top-level notes of this channel (or a group holding it) and condition, with both ranges', () => {
    expect(notesOnMap(notes, 'Fz', 'lamp', { front: ['Fz', 'F3'] }).map((n) => n.id)).toEqual(['fz-lamp', 'front-any']);
    expect(notesOnMap(notes, 'Cz', 'lamp', { front: ['Fz', 'F3'] }).map((n) => n.id)).toEqual(['cz-lamp']);
    expect(notesOnMap(notes, 'Fz', 'oar').map((n) => n.id)).toEqual(['fz-oar']);
  });
});

describe('words and versions', () => {
  it('describes an anchor and tells an older version from the current one', () => {
    expect(describeAnchor({ channel: 'Fz', condition: 'lamp', timeS: [0.2, 0.6], frequencyHz: [4, 8] })).toBe('Fz · lamp · 0.2…0.6 s · 4…8 Hz');
    expect(describeAnchor(null)).toBe('the session as a whole');
    expect(versionStanding({ recipeVersion: 1 }, 2)).toBe('older');
    expect(versionStanding({ recipeVersion: 2 }, 2)).toBe('current');
    expect(versionStanding({ recipeVersion: null }, 2)).toBe('session');
  });
});
