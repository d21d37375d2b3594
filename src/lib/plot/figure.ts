import type { Colormap } from './colormap';
import type { ColourScale } from './colour-scale';
import { formatEndTick, formatTick, logTicks, ticksWithEnds, type AxisScale } from './axes';

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
  const left = 56;
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
  /** First and last grid time and frequency: labelled as the range ends beside the nice steps (ticksWithEnds). */
  timeEnds?: [number, number];
  frequencyEnds?: [number, number];
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
  const tCount = Math.max(2, Math.floor(plotWidth / 70));
  const tTicks = spec.timeEnds ? ticksWithEnds(spec.time, spec.timeEnds[0], spec.timeEnds[1], tCount, false, 50) : spec.time.ticks(tCount);
  drawTimeTicks(ctx, bottom, spec.time, tTicks, spec.timeEnds !== undefined);
  ctx.textAlign = 'center';
  ctx.fillText('time (s)', left + plotWidth / 2, bottom + 21);
  ctx.textAlign = 'right';
  ctx.textBaseline = 'middle';
  const fCount = spec.frequencyLog ? 6 : Math.max(2, Math.floor(plotHeight / 40));
  const fEnds = spec.frequencyEnds;
  const fTicks = fEnds ? ticksWithEnds(spec.frequency, fEnds[0], fEnds[1], fCount, spec.frequencyLog, 16) : spec.frequencyLog ? logTicks(spec.frequency, 6) : spec.frequency.ticks(fCount);
  fTicks.forEach((f, i) => {
    const y = Math.round(spec.frequency(f)) + 0.5;
    if (y < top - 1 || y > bottom + 1) return;
    ctx.beginPath();
    ctx.moveTo(left - 4, y);
    ctx.lineTo(left, y);
    ctx.stroke();
    const end = fEnds !== undefined && (i === 0 || i === fTicks.length - 1);
    ctx.fillText(end ? formatEndTick(f) : formatTick(f), left - 6, y);
  });
  ctx.save();
  ctx.translate(12, top + plotHeight / 2);
  ctx.rotate(-Math.PI / 2);
  ctx.textAlign = 'center';
  ctx.fillText('frequency (Hz)', 0, 0);
  ctx.restore();
  drawEventLine(ctx, layout, spec.time);
  ctx.font = SANS;
  ctx.textAlign = 'left';
  ctx.textBaseline = 'alphabetic';
  ctx.fillText(spec.title, left, top - 8);
  ctx.restore();
}

/**
 * Time ticks under a plot whose bottom edge is `bottom`, with their labels; with `ends`, the first and last tick are
 * the range ends (ticksWithEnds), labelled leaning inwards so they stay inside the panel.
 */
function drawTimeTicks(ctx: Ctx, bottom: number, time: AxisScale, ticks: number[], ends: boolean): void {
  ctx.strokeStyle = INK;
  ticks.forEach((t, i) => {
    const x = Math.round(time(t)) + 0.5;
    ctx.beginPath();
    ctx.moveTo(x, bottom);
    ctx.lineTo(x, bottom + 4);
    ctx.stroke();
    const end = ends && (i === 0 || i === ticks.length - 1);
    ctx.textAlign = end ? (i === 0 ? 'left' : 'right') : 'center';
    ctx.fillText(end ? formatEndTick(t) : formatTick(t), end ? x + (i === 0 ? -3 : 3) : x, bottom + 6);
  });
}

/** The event at 0 s, dashed over the plot area, when it lies on the map. */
export function drawEventLine(ctx: Ctx, layout: PanelLayout, time: AxisScale): void {
  const [d0, d1] = time.domain();
  if (!(d0 < 0 && d1 > 0)) return;
  const x = Math.round(time(0)) + 0.5;
  ctx.save();
  ctx.lineWidth = 1;
  ctx.setLineDash([3, 3]);
  ctx.strokeStyle = INK;
  ctx.beginPath();
  ctx.moveTo(x, layout.top);
  ctx.lineTo(x, layout.top + layout.plotHeight);
  ctx.stroke();
  ctx.setLineDash([]);
  ctx.restore();
}

const barGradients = new WeakMap<object, { colormap: Colormap; key: string; gradient: CanvasGradient }>();

/** A vertical colour bar beside the map, ticks of its scale and the unit on top. */
export function drawColourBar(ctx: Ctx, layout: PanelLayout, colormap: Colormap, scale: ColourScale, unit: string, reverse = false): void {
  const { barX, barWidth, top, plotHeight } = layout;
  ctx.save();
  // A 33-stop gradient: one fill per frame instead of one per pixel row (the bar repaints on every baseline move),
  // made once per context, colormap and place (each stop's colour string is parsed again by every new gradient).
  const key = `${top}|${plotHeight}|${reverse}`;
  let kept = barGradients.get(ctx);
  if (kept === undefined || kept.colormap !== colormap || kept.key !== key) {
    const gradient = ctx.createLinearGradient(0, top + plotHeight, 0, top);
    const b = colormap.bytes;
    for (let i = 0; i <= 32; i++) {
      const t = i / 32;
      const k = Math.round((reverse ? 1 - t : t) * (colormap.size - 1));
      gradient.addColorStop(t, `rgb(${b[4 * k]},${b[4 * k + 1]},${b[4 * k + 2]})`);
    }
    kept = { colormap, key, gradient };
    barGradients.set(ctx, kept);
  }
  ctx.fillStyle = kept.gradient;
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

/**
 * Outlines the cells where `mask[f·nTimes + t]` is 1 (e.g. phase consistency with Rayleigh p < 0.05): a line runs
 * along every cell edge between a marked and an unmarked cell (or the plot's border), cells laid out as the raster
 * draws them (equal rows, f = 0 at the bottom). Runs along a row are merged into one segment, so a map of 1500 times
 * costs one line per run, not per cell. Drawn twice: a light halo under an ink line, visible on any colour.
 */
export function drawMaskOutline(ctx: Ctx, layout: PanelLayout, mask: ArrayLike<number>, nFreqs: number, nTimes: number): void {
  const { left, top, plotWidth, plotHeight } = layout;
  const x = (t: number) => left + (t * plotWidth) / nTimes;
  const y = (rowFromTop: number) => top + (rowFromTop * plotHeight) / nFreqs;
  const on = (f: number, t: number) => f >= 0 && f < nFreqs && t >= 0 && t < nTimes && mask[f * nTimes + t] !== 0;
  ctx.save();
  ctx.beginPath();
  for (let f = 0; f < nFreqs; f++) {
    const row = nFreqs - 1 - f;
    // Vertical edges: where the mark starts or ends along the row.
    for (let t = 0; t <= nTimes; t++) {
      if (on(f, t) !== on(f, t - 1)) {
        ctx.moveTo(x(t), y(row));
        ctx.lineTo(x(t), y(row + 1));
      }
    }
    // Horizontal edges above this row (towards f + 1), merged into runs.
    let run = -1;
    for (let t = 0; t <= nTimes; t++) {
      const edge = t < nTimes && on(f, t) !== on(f + 1, t);
      if (edge && run < 0) run = t;
      if (!edge && run >= 0) {
        ctx.moveTo(x(run), y(row));
        ctx.lineTo(x(t), y(row));
        run = -1;
      }
    }
    if (f === 0) {
      for (let t = 0; t <= nTimes; t++) {
        const edge = t < nTimes && on(0, t);
        if (edge && run < 0) run = t;
        if (!edge && run >= 0) {
          ctx.moveTo(x(run), y(nFreqs));
          ctx.lineTo(x(t), y(nFreqs));
          run = -1;
        }
      }
    }
  }
  ctx.strokeStyle = FOAM;
  ctx.lineWidth = 3;
  ctx.stroke();
  ctx.strokeStyle = INK;
  ctx.lineWidth = 1.25;
  ctx.stroke();
  ctx.restore();
}

/** The baseline window as a band over the plot area (for static pictures; the live island draws it in the DOM). */
export function drawBaselineBand(ctx: Ctx, layout: PanelLayout, time: AxisScale, start: number, end: number): void {
  const x0 = time(start);
  const x1 = time(end);
  ctx.save();
  ctx.globalAlpha = 0.3;
  ctx.fillStyle = FOAM;
  ctx.fillRect(x0, layout.top, Math.max(1, x1 - x0), layout.plotHeight);
  ctx.globalAlpha = 1;
  ctx.strokeStyle = INK;
  ctx.lineWidth = 2;
  for (const x of [x0, x1]) {
    ctx.beginPath();
    ctx.moveTo(x, layout.top);
    ctx.lineTo(x, layout.top + layout.plotHeight);
    ctx.stroke();
  }
  // The handles as the live band draws them: an ink tab across each edge at the plot's bottom.
  ctx.fillStyle = INK;
  for (const x of [x0, x1]) ctx.fillRect(x - 3, layout.top + layout.plotHeight - 18, 6, 18);
  ctx.restore();
}

/** One line of a trace plot: values per time point, drawn in `colour`, named in the legend. */
export interface TraceSeries {
  values: ArrayLike<number>;
  label: string;
  colour: string;
  dashed?: boolean;
}

/**
 * A time trace under a map (e.g. the evoked response, µV): the same left margin and plot width as the map's
 * `panelLayout` and the map's own time scale, so a time sits at the same x in both. Zero line, the event at 0 s,
 * a few value ticks, the range-end time ticks, a legend at the top right.
 */
export function drawTrace(ctx: Ctx, layout: PanelLayout, time: AxisScale, times: ArrayLike<number>, series: TraceSeries[], unit: string, title: string): void {
  const { left, top, plotWidth, plotHeight } = layout;
  const bottom = top + plotHeight;
  let lo = Infinity;
  let hi = -Infinity;
  for (const s of series) for (let i = 0; i < s.values.length; i++) if (Number.isFinite(s.values[i])) ((lo = Math.min(lo, s.values[i])), (hi = Math.max(hi, s.values[i])));
  if (!(hi > lo)) ((lo = -1), (hi = 1));
  const pad = 0.08 * (hi - lo);
  const y0 = lo - pad;
  const y1 = hi + pad;
  const y = (v: number) => bottom - ((v - y0) / (y1 - y0)) * plotHeight;
  ctx.save();
  ctx.strokeStyle = INK;
  ctx.lineWidth = 1;
  ctx.strokeRect(left - 0.5, top - 0.5, plotWidth + 1, plotHeight + 1);
  ctx.font = MONO;
  ctx.fillStyle = INK;
  ctx.textAlign = 'right';
  ctx.textBaseline = 'middle';
  for (const v of [lo, 0, hi]) {
    if (v < y0 || v > y1) continue;
    const yy = Math.round(y(v)) + 0.5;
    ctx.beginPath();
    ctx.moveTo(left - 4, yy);
    ctx.lineTo(left, yy);
    ctx.stroke();
    ctx.fillText(formatTick(v), left - 6, yy);
  }
  if (y0 < 0 && y1 > 0) {
    ctx.strokeStyle = INK_SOFT;
    ctx.globalAlpha = 0.5;
    ctx.beginPath();
    ctx.moveTo(left, Math.round(y(0)) + 0.5);
    ctx.lineTo(left + plotWidth, Math.round(y(0)) + 0.5);
    ctx.stroke();
    ctx.globalAlpha = 1;
  }
  drawEventLine(ctx, layout, time);
  const n = times.length;
  ctx.textBaseline = 'top';
  drawTimeTicks(ctx, bottom, time, ticksWithEnds(time, times[0], times[n - 1], Math.max(2, Math.floor(plotWidth / 70)), false, 50), true);
  ctx.save();
  ctx.translate(12, top + plotHeight / 2);
  ctx.rotate(-Math.PI / 2);
  ctx.textAlign = 'center';
  ctx.textBaseline = 'middle';
  ctx.fillText(unit, 0, 0);
  ctx.restore();
  // Lines, clipped to the plot area by construction (values inside [y0, y1]).
  for (const s of series) {
    ctx.strokeStyle = s.colour;
    ctx.lineWidth = 1.5;
    ctx.setLineDash(s.dashed ? [5, 3] : []);
    ctx.beginPath();
    let started = false;
    for (let i = 0; i < s.values.length; i++) {
      const v = s.values[i];
      if (!Number.isFinite(v)) {
        started = false;
        continue;
      }
      const x = time(times[i]);
      if (started) ctx.lineTo(x, y(v));
      else ctx.moveTo(x, y(v));
      started = true;
    }
    ctx.stroke();
  }
  ctx.setLineDash([]);
  ctx.font = SANS;
  ctx.textAlign = 'left';
  ctx.textBaseline = 'alphabetic';
  ctx.fillStyle = INK;
  ctx.fillText(title, left, top - 8);
  ctx.textAlign = 'right';
  let x = left + plotWidth;
  for (let i = series.length - 1; i >= 0; i--) {
    const s = series[i];
    ctx.font = MONO;
    ctx.fillStyle = s.colour;
    ctx.fillText(s.label, x, top - 8);
    x -= ctx.measureText(s.label).width + 16;
  }
  ctx.restore();
}
