import { describe, expect, it } from 'vitest';
import { drawMaskOutline, panelLayout, type Ctx } from '../../../../src/lib/plot/figure';

/** A context that records the path's segments (moveTo → lineTo) and ignores the rest. */
function recorder() {
  const segments: [number, number, number, number][] = [];
  let at: [number, number] = [0, 0];
  const ctx = {
    save() {},
    restore() {},
    beginPath() {},
    stroke() {},
    moveTo(x: number, y: number) {
      at = [x, y];
    },
    lineTo(x: number, y: number) {
      segments.push([at[0], at[1], x, y]);
      at = [x, y];
    },
    strokeStyle: '',
    lineWidth: 1,
  } as unknown as Ctx;
  return { ctx, segments };
}

describe('drawMaskOutline', () => {
  it('draws the four sides of one marked cell, on the raster’s cell edges (f = 0 at the bottom)', () => {
    const layout = panelLayout(56 + 100 + 66, 24 + 100 + 38); // plot area 100 × 100 at (56, 24)
    const { ctx, segments } = recorder();
    // 2 frequencies × 2 times; the marked cell is f = 0 (bottom row), t = 1 (right column).
    drawMaskOutline(ctx, layout, [0, 1, 0, 0], 2, 2);
    const sorted = segments.map((s) => s.join(',')).sort();
    expect(sorted).toEqual(
      [
        [106, 74, 106, 124], // left side, x = 56 + 50
        [156, 74, 156, 124], // right side, the plot's right border
        [106, 74, 156, 74], // top side, between the rows
        [106, 124, 156, 124], // bottom side, the plot's bottom border
      ]
        .map((s) => s.join(','))
        .sort(),
    );
  });

  it('merges a run of marked cells along a row into one segment per side', () => {
    const layout = panelLayout(56 + 100 + 66, 24 + 100 + 38);
    const { ctx, segments } = recorder();
    drawMaskOutline(ctx, layout, [1, 1, 1, 1], 1, 4);
    expect(segments).toHaveLength(4);
  });
});
