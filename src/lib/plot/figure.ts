import type { Colormap } from './colormap';
import type { ColourScale } from './colour-scale';
import { formatTick, logTicks, type AxisScale } from './axes';

/** The parts of a 2-D canvas context the drawing functions use, so they run on a real canvas or a recorder. */
export type Ctx = Pick<
  CanvasRenderingContext2D,
  | 'save' | 'restore' | 'beginPath' | 'moveTo' | 'lineTo' | 'stroke' | 'fillRect' | 'strokeRect' | 'fillText' | 'rect'
  | 'fill' | 'arc' | 'closePath' | 'setLineDash' | 'measureText' | 'translate' | 'rotate' | 'drawImage' | 'createLinearGradient'
> & {
  fillStyle: string | CanvasGradient | CanvasPattern;
  strokeStyle: string | CanvasGradient | CanvasPattern;
  lineWidth: number;
  font: string;
  textAlign: CanvasTextAlign;
  textBaseline: CanvasTextBaseline;
  globalAlpha: number;
};

export const INK = '#10283a';
export const INK_SOFT = '#3b5366';
export const FOAM = '#fffdf8';
export const CORAL = '#cf5f45';
export const MONO = '11px "JetBrains Mono Variable", ui-monospace, monospace';
export const SANS = '600 12px "Inter Variable", ui-sans-serif, sans-serif';

/** Plot-area placement inside a panel, CSS pixels. */
export interface PanelLayout {
  width: number;
  height: number;
  left: number;
  top: number;
  plotWidth: number;
  plotHeight: number;
  /** Colour bar x position and width. */
  barX: number;
  barWidth: number;
}

/** Margins for tick labels (left, bottom), a title (top) and a colour bar with its labels (right). */
export function panelLayout(width: number, height: number): PanelLayout {
  const left = 48;
  const top = 24;
  const right = 66;
  const bottom = 38;
  const plotWidth = Math.max(10, width - left - right);
  const plotHeight = Math.max(10, height - top - bottom);
  return { width, height, left, top, plotWidth, plotHeight, barX: left + plotWidth + 14, barWidth: 12 };
}

export interface AxesSpec {
  title: string;
  time: AxisScale;
  frequency: AxisScale;
  frequencyLog: boolean;
}

/** Frame, time ticks (s) along the bottom, frequency ticks (Hz) on the left, the event line at 0 s, a title. */
export function drawAxes(ctx: Ctx, layout: PanelLayout, spec: AxesSpec): void {
  const { left, top, plotWidth, plotHeight } = layout;
  const bottom = top + plotHeight;
  ctx.save();
  ctx.strokeStyle = INK;
  ctx.lineWidth = 1;
  ctx.strokeRect(left - 0.5, top - 0.5, plotWidth + 1, plotHeight + 1);
  ctx.fillStyle = INK;
  ctx.font = MONO;
  ctx.textAlign = 'center';
  ctx.textBaseline = 'top';
  for (const t of spec.time.ticks(Math.max(2, Math.floor(plotWidth / 70)))) {
    const x = Math.round(spec.time(t)) + 0.5;
    ctx.beginPath();
    ctx.moveTo(x, bottom);
    ctx.lineTo(x, bottom + 4);
    ctx.stroke();
    ctx.fillText(formatTick(t), x, bottom + 6);
  }
  ctx.fillText('time (s)', left + plotWidth / 2, bottom + 21);
  ctx.textAlign = 'right';
  ctx.textBaseline = 'middle';
  const fTicks = spec.frequencyLog ? logTicks(spec.frequency, 6) : spec.frequency.ticks(Math.max(2, Math.floor(plotHeight / 40)));
  for (const f of fTicks) {
    const y = Math.round(spec.frequency(f)) + 0.5;
    if (y < top - 1 || y > bottom + 1) continue;
    ctx.beginPath();
    ctx.moveTo(left - 4, y);
    ctx.lineTo(left, y);
    ctx.stroke();
    ctx.fillText(formatTick(f), left - 6, y);
  }
  ctx.save();
  ctx.translate(12, top + plotHeight / 2);
  ctx.rotate(-Math.PI / 2);
  ctx.textAlign = 'center';
  ctx.fillText('frequency (Hz)', 0, 0);
  ctx.restore();
  // The event at 0 s, dashed, when it lies on the map.
  const [d0, d1] = spec.time.domain();
  if (d0 < 0 && d1 > 0) {
    const x = Math.round(spec.time(0)) + 0.5;
    ctx.setLineDash([3, 3]);
    ctx.strokeStyle = INK;
    ctx.beginPath();
    ctx.moveTo(x, top);
    ctx.lineTo(x, bottom);
    ctx.stroke();
    ctx.setLineDash([]);
  }
  ctx.font = SANS;
  ctx.textAlign = 'left';
  ctx.textBaseline = 'alphabetic';
  ctx.fillText(spec.title, left, top - 8);
  ctx.restore();
}

/** A vertical colour bar beside the map, ticks of its scale and the unit on top. */
export function drawColourBar(ctx: Ctx, layout: PanelLayout, colormap: Colormap, scale: ColourScale, unit: string, reverse = false): void {
  const { barX, barWidth, top, plotHeight } = layout;
  ctx.save();
  // A 33-stop gradient: one fill per frame instead of one per pixel row (the bar repaints on every baseline move).
  const gradient = ctx.createLinearGradient(0, top + plotHeight, 0, top);
  const b = colormap.bytes;
  for (let i = 0; i <= 32; i++) {
    const t = i / 32;
    const k = Math.round((reverse ? 1 - t : t) * (colormap.size - 1));
    gradient.addColorStop(t, `rgb(${b[4 * k]},${b[4 * k + 1]},${b[4 * k + 2]})`);
  }
  ctx.fillStyle = gradient;
  ctx.fillRect(barX, top, barWidth, plotHeight);
  ctx.strokeStyle = INK;
  ctx.lineWidth = 1;
  ctx.strokeRect(barX - 0.5, top - 0.5, barWidth + 1, plotHeight + 1);
  ctx.fillStyle = INK;
  ctx.font = MONO;
  ctx.textAlign = 'left';
  ctx.textBaseline = 'middle';
  const [lo, hi] = scale.domain;
  const ticks =
    scale.kind === 'log' ? [lo, Math.sqrt(lo * hi), hi] : [lo, (lo + hi) / 2, hi];
  for (const v of ticks) {
    const t = scale.kind === 'log' ? Math.log(v / lo) / Math.log(hi / lo) : hi > lo ? (v - lo) / (hi - lo) : 0.5;
    const y = Math.round(top + (1 - t) * plotHeight) + 0.5;
    ctx.beginPath();
    ctx.moveTo(barX + barWidth, y);
    ctx.lineTo(barX + barWidth + 3, y);
    ctx.stroke();
    ctx.fillText(formatTick(v), barX + barWidth + 5, y);
  }
  ctx.textAlign = 'center';
  ctx.textBaseline = 'alphabetic';
  ctx.fillText(unit, barX + barWidth / 2, top - 8);
  ctx.restore();
}

/** The baseline window as a band over the plot area (for static pictures; the live island draws it in the DOM). */
export function drawBaselineBand(ctx: Ctx, layout: PanelLayout, time: AxisScale, start: number, end: number): void {
  const x0 = time(start);
  const x1 = time(end);
  ctx.save();
  ctx.globalAlpha = 0.22;
  ctx.fillStyle = FOAM;
  ctx.fillRect(x0, layout.top, Math.max(1, x1 - x0), layout.plotHeight);
  ctx.globalAlpha = 1;
  ctx.strokeStyle = INK;
  ctx.lineWidth = 1.5;
  for (const x of [x0, x1]) {
    ctx.beginPath();
    ctx.moveTo(x, layout.top);
    ctx.lineTo(x, layout.top + layout.plotHeight + 6);
    ctx.stroke();
  }
  ctx.restore();
}
