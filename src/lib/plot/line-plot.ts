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
}

export function lineLayout(width: number, height: number): LineLayout {
  const left = 64;
  const top = 22;
  const right = 16;
  const bottom = 38;
  return { width, height, left, top, plotWidth: Math.max(10, width - left - right), plotHeight: Math.max(10, height - top - bottom) };
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

/** Frame, ticks and axis titles of a line plot. */
export function drawLineAxes(ctx: Ctx, layout: LineLayout, x: AxisScale, y: AxisScale, spec: { xLog: boolean; yLog: boolean; xTitle: string; yTitle: string; title: string }): void {
  const { left, top, plotWidth, plotHeight } = layout;
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
  }
  ctx.fillText(spec.xTitle, left + plotWidth / 2, bottom + 21);
  ctx.textAlign = 'right';
  ctx.textBaseline = 'middle';
  for (const v of spec.yLog ? logTicks(y, 5) : y.ticks(Math.max(2, Math.floor(plotHeight / 40)))) {
    const py = Math.round(y(v)) + 0.5;
    ctx.beginPath();
    ctx.moveTo(left - 4, py);
    ctx.lineTo(left, py);
    ctx.stroke();
    ctx.fillText(formatTick(v), left - 6, py);
  }
  ctx.save();
  ctx.translate(12, top + plotHeight / 2);
  ctx.rotate(-Math.PI / 2);
  ctx.textAlign = 'center';
  ctx.fillText(spec.yTitle, 0, 0);
  ctx.restore();
  ctx.font = SANS;
  ctx.textAlign = 'left';
  ctx.textBaseline = 'alphabetic';
  ctx.fillText(spec.title, left, top - 8);
  ctx.restore();
}
