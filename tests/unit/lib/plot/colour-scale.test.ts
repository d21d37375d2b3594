import { describe, expect, it } from 'vitest';
import { colourPosition, ratioLimits } from '../../../../src/lib/plot/colour-scale';

describe('power-ratio colour scale', () => {
  it('is a log scale centred on 1: a halving sits as far below the centre as a doubling above it', () => {
    const domain = ratioLimits([0.8, 1.3, 2, 0.4, Number.NaN, 0, Infinity]);
    // the largest departure from 1 is 0.4 (a factor 2.5 down): limits [1/2.5, 2.5]
    expect(domain[0]).toBeCloseTo(0.4, 12);
    expect(domain[1]).toBeCloseTo(2.5, 12);
    const scale = { domain, kind: 'log' as const };
    expect(colourPosition(scale, 1)).toBeCloseTo(0.5, 12);
    expect(colourPosition(scale, 2) - 0.5).toBeCloseTo(0.5 - colourPosition(scale, 0.5), 12);
  });

  it('leaves masked cells out and gives [1/2, 2] when there is nothing to scale', () => {
    expect(ratioLimits([1, 1, 1])).toEqual([0.5, 2]);
    expect(ratioLimits([10, 1.5], [1, 0])).toEqual([1 / 1.5, 1.5]);
  });
});
