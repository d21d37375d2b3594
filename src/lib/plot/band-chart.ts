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
 * most 28 px wide and never wider than their group. The value axis is symmetric about `neutral` (the method's no-change value) with nice limits, its
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
  // Each bar gets an equal slot of the group (less a margin that separates groups); the bar fills 80 % of it, at
  // most 28 px, so the bars always fit their group however narrow the card.
  const pad = Math.min(16, groupWidth * 0.2);
  const slot = (groupWidth - pad) / Math.max(1, bars);
  const barWidth = Math.min(28, slot * 0.8);
  const gap = Math.min(slot - barWidth, 6);
  const used = bars * (barWidth + gap) - gap;
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
    barX: (bi) => (groupWidth - used) / 2 + bi * (barWidth + gap),
    barWidth,
  };
}
