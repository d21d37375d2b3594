import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { boxesIntersect, placeLabels } from '../../../../src/lib/plot/label-placement';
import { scalpGeometry } from '../../../../src/lib/plot/scalp-map';

const noTwoIntersect = (boxes: { x: number; y: number; width: number; height: number }[]) => {
  for (let i = 0; i < boxes.length; i++) for (let j = i + 1; j < boxes.length; j++) if (boxesIntersect(boxes[i], boxes[j])) return `${i} and ${j}`;
  return null;
};

describe('placeLabels', () => {
  it('leaves boxes that do not intersect where they are', () => {
    const boxes = [{ x: 0, y: 0, width: 10, height: 5 }, { x: 20, y: 0, width: 10, height: 5 }];
    expect(placeLabels(boxes)).toEqual(boxes);
  });
  it('pushes any set of up to 64 crowded boxes apart until no two intersect (fast-check)', () => {
    const box = fc.record({ x: fc.double({ min: -50, max: 50, noNaN: true }), y: fc.double({ min: -50, max: 50, noNaN: true }), width: fc.double({ min: 4, max: 30, noNaN: true }), height: fc.double({ min: 4, max: 10, noNaN: true }) });
    fc.assert(fc.property(fc.array(box, { maxLength: 64 }), (boxes) => {
      expect(noTwoIntersect(placeLabels(boxes))).toBeNull();
    }), { numRuns: 60 });
  });
  it('separates boxes that sit exactly on top of each other', () => {
    const placed = placeLabels([0, 1, 2].map(() => ({ x: 0, y: 0, width: 10, height: 5 })));
    expect(noTwoIntersect(placed)).toBeNull();
  });
});

describe('scalpGeometry labels', () => {
  it('keeps the labels of a 32-channel cap apart, TP9/CP5 and TP10/CP6 included', () => {
    const cap = ['Fp1', 'Fp2', 'F7', 'F3', 'Fz', 'F4', 'F8', 'FC5', 'FC1', 'FC2', 'FC6', 'T7', 'C3', 'Cz', 'C4', 'T8', 'TP9', 'CP5', 'CP1', 'CP2', 'CP6', 'TP10', 'P7', 'P3', 'Pz', 'P4', 'P8', 'PO9', 'O1', 'Oz', 'O2', 'PO10'];
    const g = scalpGeometry(cap.map((channel, i) => ({ channel, value: i })), { cells: 8 });
    expect(noTwoIntersect(g.labels)).toBeNull();
    expect(g.unplaced).toEqual([]);
  });
});
