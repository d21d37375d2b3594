import { scaleLinear, scaleLog } from 'd3-scale';
import type { AxisScale } from './axes';
import { formatTick, logTicks } from './axes';
import { INK, MONO, SANS, type Ctx } from './figure';

export interface LineLayout {
  width: number;
  height: number;
  left: number;
  top: number;
  plotWidth: number;
  plotHeight: number;
  /** Height of the control lane between the title and the plot area (fit-range handles live there, clear of every label). */
  lane: number;
}

/** Margins for tick labels (left, bottom) and a title (top), plus an optional control lane above the plot area. */
export function lineLayout(width: number, height: number, { lane = 0 }: { lane?: number } = {}): LineLayout {
  const left = 64;
  const top = 22 + lane;
  const right = 16;
  const bottom = 38;
  return { width, height, left, top, plotWidth: Math.max(10, width - left - right), plotHeight: Math.max(10, height - top - bottom), lane };
}

/** A label's box in CSS pixels of the plot (left, top, width, height), as drawn. */
export interface LabelRect {
  x: number;
  y: number;
  width: number;
  height: number;
}

/** Linear or log scale over [lo, hi] onto a pixel range; a log scale needs lo > 0. */
export function axisScale(kind: 'linear' | 'log', lo: number, hi: number, p0: number, p1: number): AxisScale {
  const s = kind === 'log' ? scaleLog().domain([lo, hi]) : scaleLinear().domain([lo, hi]);
  return s.range([p0, p1]) as unknown as AxisScale;
}

export interface Series {
  xs: ArrayLike<number>;
  ys: ArrayLike<number>;
  colour: string;
  width: number;
  alpha?: number;
  dash?: number[];
}

/** Polylines clipped to the plot area; points with no position (non-finite, ≤ 0 on a log axis) break the line. */
export function drawSeries(ctx: Ctx & { clip(): void }, layout: LineLayout, x: AxisScale, y: AxisScale, series: Series[]): void {
  ctx.save();
  ctx.beginPath();
  ctx.rect(layout.left, layout.top, layout.plotWidth, layout.plotHeight);
  ctx.clip();
  for (const s of series) {
    ctx.strokeStyle = s.colour;
    ctx.lineWidth = s.width;
    ctx.globalAlpha = s.alpha ?? 1;
    ctx.setLineDash(s.dash ?? []);
    ctx.beginPath();
    let pen = false;
    for (let i = 0; i < s.xs.length; i++) {
      const px = x(s.xs[i]);
      const py = y(s.ys[i]);
      if (!Number.isFinite(px) || !Number.isFinite(py)) {
        pen = false;
        continue;
      }
      if (pen) ctx.lineTo(px, py);
      else ctx.moveTo(px, py);
      pen = true;
    }
    ctx.stroke();
  }
  ctx.restore();
}

/**
 * The area between `low` and `high` over `xs` (a spread band), filled; a point without a position on either edge
 * (non-finite, ≤ 0 on a log axis) splits the band.
 */
export function drawBand(ctx: Ctx & { clip(): void }, layout: LineLayout, x: AxisScale, y: AxisScale, band: { xs: ArrayLike<number>; low: ArrayLike<number>; high: ArrayLike<number>; colour: string; alpha: number }): void {
  ctx.save();
  ctx.beginPath();
  ctx.rect(layout.left, layout.top, layout.plotWidth, layout.plotHeight);
  ctx.clip();
  ctx.fillStyle = band.colour;
  ctx.globalAlpha = band.alpha;
  const n = band.xs.length;
  let i = 0;
  while (i < n) {
    const ok = (k: number) => Number.isFinite(x(band.xs[k])) && Number.isFinite(y(band.low[k])) && Number.isFinite(y(band.high[k]));
    while (i < n && !ok(i)) i++;
    let j = i;
    while (j < n && ok(j)) j++;
    if (j - i >= 2) {
      ctx.beginPath();
      ctx.moveTo(x(band.xs[i]), y(band.high[i]));
      for (let k = i + 1; k < j; k++) ctx.lineTo(x(band.xs[k]), y(band.high[k]));
      for (let k = j - 1; k >= i; k--) ctx.lineTo(x(band.xs[k]), y(band.low[k]));
      ctx.closePath();
      ctx.fill();
    }
    i = j;
  }
  ctx.restore();
}

/** Frame, ticks and axis titles of a line plot; returns the box of every tick label and title it drew. */
export function drawLineAxes(ctx: Ctx, layout: LineLayout, x: AxisScale, y: AxisScale, spec: { xLog: boolean; yLog: boolean; xTitle: string; yTitle: string; title: string }): LabelRect[] {
  const { left, top, plotWidth, plotHeight } = layout;
  const boxes: LabelRect[] = [];
  // Label boxes from the font's size (11 px mono, 12 px sans) and measured widths.
  const box = (text: string, px: number, py: number, align: 'left' | 'center' | 'right', base: 'top' | 'middle' | 'alphabetic', size: number) => {
    const w = ctx.measureText(text).width;
    const x0 = align === 'left' ? px : align === 'center' ? px - w / 2 : px - w;
    const y0 = base === 'top' ? py : base === 'middle' ? py - size / 2 : py - size * 0.8;
    boxes.push({ x: x0, y: y0, width: w, height: size });
  };
  const bottom = top + plotHeight;
  ctx.save();
  ctx.strokeStyle = INK;
  ctx.fillStyle = INK;
  ctx.lineWidth = 1;
  ctx.strokeRect(left - 0.5, top - 0.5, plotWidth + 1, plotHeight + 1);
  ctx.font = MONO;
  ctx.textAlign = 'center';
  ctx.textBaseline = 'top';
  for (const v of spec.xLog ? logTicks(x, 8) : x.ticks(Math.max(2, Math.floor(plotWidth / 70)))) {
    const px = Math.round(x(v)) + 0.5;
    ctx.beginPath();
    ctx.moveTo(px, bottom);
    ctx.lineTo(px, bottom + 4);
    ctx.stroke();
    ctx.fillText(formatTick(v), px, bottom + 6);
    box(formatTick(v), px, bottom + 6, 'center', 'top', 11);
  }
  ctx.fillText(spec.xTitle, left + plotWidth / 2, bottom + 21);
  box(spec.xTitle, left + plotWidth / 2, bottom + 21, 'center', 'top', 11);
  ctx.textAlign = 'right';
  ctx.textBaseline = 'middle';
  for (const v of spec.yLog ? logTicks(y, 5) : y.ticks(Math.max(2, Math.floor(plotHeight / 40)))) {
    const py = Math.round(y(v)) + 0.5;
    ctx.beginPath();
    ctx.moveTo(left - 4, py);
    ctx.lineTo(left, py);
    ctx.stroke();
    ctx.fillText(formatTick(v), left - 6, py);
    box(formatTick(v), left - 6, py, 'right', 'middle', 11);
  }
  ctx.save();
  ctx.translate(12, top + plotHeight / 2);
  ctx.rotate(-Math.PI / 2);
  ctx.textAlign = 'center';
  ctx.fillText(spec.yTitle, 0, 0);
  ctx.restore();
  const yw = ctx.measureText(spec.yTitle).width;
  boxes.push({ x: 12 - 5.5, y: top + plotHeight / 2 - yw / 2, width: 11, height: yw });
  ctx.font = SANS;
  ctx.textAlign = 'left';
  ctx.textBaseline = 'alphabetic';
  ctx.fillText(spec.title, left, top - layout.lane - 8);
  box(spec.title, left, top - layout.lane - 8, 'left', 'alphabetic', 12);
  ctx.restore();
  return boxes;
}
