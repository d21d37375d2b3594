import { scaleLinear } from 'd3-scale';

export interface BandChartLayout {
  width: number;
  height: number;
  left: number;
  right: number;
  top: number;
  bottom: number;
  /** Tick values of the value axis (nice numbers, symmetric about the neutral value). */
  ticks: number[];
  /** Value → y pixel. */
  y: (v: number) => number;
  /** Left edge of group `gi` (window × condition). */
  groupX: (gi: number) => number;
  groupWidth: number;
  /** Left edge of bar `bi` inside its group, and every bar's width. */
  barX: (bi: number) => number;
  barWidth: number;
}

/**
 * Geometry of the grouped band chart, sized to `width` (its card): groups share the width, bars inside a group at
 * most 28 px wide. The value axis is symmetric about `neutral` (the method's no-change value) with nice limits, its
 * unit set apart as a rotated axis title left of the tick labels (never against a number). Pure: the screen's SVG and
 * an exported figure use the same numbers.
 */
export function bandChartLayout({ width, height, groups, bars, values, neutral }: { width: number; height: number; groups: number; bars: number; values: readonly number[]; neutral: number }): BandChartLayout {
  const left = 72;
  const right = 12;
  const top = 22;
  const bottom = 44;
  let m = 0;
  for (const v of values) if (Number.isFinite(v)) m = Math.max(m, Math.abs(v - neutral));
  if (!(m > 0)) m = 1;
  const scale = scaleLinear().domain([neutral - m, neutral + m]).range([height - bottom, top]).nice(5);
  const inner = Math.max(1, width - left - right);
  const groupWidth = inner / Math.max(1, groups);
  const barWidth = Math.max(2, Math.min(28, (groupWidth - 16) / Math.max(1, bars) - 3));
  const used = bars * (barWidth + 3) - 3;
  return {
    width,
    height,
    left,
    right,
    top,
    bottom,
    ticks: scale.ticks(5),
    y: (v) => scale(v),
    groupX: (gi) => left + gi * groupWidth,
    groupWidth,
    barX: (bi) => (groupWidth - used) / 2 + bi * (barWidth + 3),
    barWidth,
  };
}
