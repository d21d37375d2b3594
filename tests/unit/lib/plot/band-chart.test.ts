import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { bandChartLayout } from '../../../../src/lib/plot/band-chart';

describe('bandChartLayout', () => {
  it('keeps every bar inside its group and every group inside the width it is given (fast-check)', () => {
    fc.assert(
      fc.property(fc.integer({ min: 240, max: 2000 }), fc.integer({ min: 1, max: 12 }), fc.integer({ min: 1, max: 8 }), (width, groups, bars) => {
        const l = bandChartLayout({ width, height: 240, groups, bars, values: [1, -2], neutral: 0 });
        expect(l.barX(0)).toBeGreaterThanOrEqual(-1e-9);
        expect(l.barX(bars - 1) + l.barWidth).toBeLessThanOrEqual(l.groupWidth + 1e-9);
        expect(l.barWidth).toBeGreaterThan(0);
        for (let g = 0; g < groups; g++) {
          // Each group starts inside the plot and after the end of the one before it: groups never overlap.
          const x0 = l.groupX(g);
          expect(x0).toBeGreaterThanOrEqual(l.left - 1e-9);
          if (g > 0) expect(x0).toBeGreaterThanOrEqual(l.groupX(g - 1) + l.groupWidth - 1e-9);
        }
        expect(l.groupX(groups - 1) + l.groupWidth).toBeLessThanOrEqual(width - l.right + 1e-9);
      }),
    );
  });
  it('centres the value axis on the neutral value with nice ticks that include it (d3-scale nice)', () => {
    const l = bandChartLayout({ width: 600, height: 240, groups: 4, bars: 4, values: [0.669, -1.2], neutral: 0 });
    expect(l.ticks).toContain(0);
    expect(l.y(0)).toBeCloseTo((l.top + l.height - l.bottom) / 2, 9);
    const ratio = bandChartLayout({ width: 600, height: 240, groups: 1, bars: 1, values: [1.5, 0.8], neutral: 1 });
    expect(ratio.ticks).toContain(1);
  });
});
