import { describe, expect, it } from 'vitest';
import { scaleLinear, scaleLog } from 'd3-scale';
import { formatEndTick, ticksWithEnds, type AxisScale } from '../../../../src/lib/plot/axes';

describe('axis ticks with the range ends', () => {
  it('labels both ends of an epoch and the nice steps between (1, 2 or 5 × 10^k, as d3 picks them)', () => {
    const time = scaleLinear().domain([-0.501, 1.501]).range([0, 700]) as unknown as AxisScale;
    const ticks = ticksWithEnds(time, -0.5, 1.5, 10, false, 40);
    expect(ticks[0]).toBe(-0.5);
    expect(ticks[ticks.length - 1]).toBe(1.5);
    // d3's 10-tick step over 2 s is 0.2: every inner tick is a multiple of it, and none duplicates an end.
    for (const t of ticks.slice(1, -1)) expect(Math.abs(t / 0.2 - Math.round(t / 0.2))).toBeLessThan(1e-9);
    expect(new Set(ticks).size).toBe(ticks.length);
  });

  it('drops a nice tick too close to an end so labels do not overlap', () => {
    const time = scaleLinear().domain([-0.998, 2]).range([0, 600]) as unknown as AxisScale;
    const ticks = ticksWithEnds(time, -0.998, 2, 8, false, 40);
    expect(ticks[0]).toBe(-0.998);
    // −1 lies outside the range; −0.5 is 100 px from the start end: kept. 2 is the end itself (not repeated).
    expect(ticks).toContain(-0.5);
    expect(ticks.filter((t) => t === 2)).toHaveLength(1);
    for (let i = 1; i < ticks.length; i++) expect(time(ticks[i]) - time(ticks[i - 1])).toBeGreaterThanOrEqual(40 - 1e-9);
  });

  it('on a log frequency axis keeps 1, 2, 5 × 10^k between the lowest and highest grid frequency', () => {
    const f = scaleLog().domain([2.8, 48]).range([300, 0]) as unknown as AxisScale;
    const ticks = ticksWithEnds(f, 3, 45, 6, true, 16);
    expect(ticks[0]).toBe(3);
    expect(ticks[ticks.length - 1]).toBe(45);
    for (const t of ticks.slice(1, -1)) expect([5, 10, 20].includes(t)).toBe(true);
  });

  it('writes an end as the grid value to 4 significant digits, so 1.998 s is not shown as 2', () => {
    expect(formatEndTick(1.998)).toBe('1.998');
    expect(formatEndTick(-0.5)).toBe('-0.5');
    expect(formatEndTick(44.99999999)).toBe('45');
  });
});
