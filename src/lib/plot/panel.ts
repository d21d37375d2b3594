import { frequencyScale, timeScale, type AxisScale } from './axes';
import type { Colormap } from './colormap';
import type { ColourScale } from './colour-scale';
import type { EdgeZones } from './edge-zone';
import { drawAxes, drawBaselineBand, drawColourBar, drawEventLine, drawMaskOutline, FOAM, type Ctx, type PanelLayout } from './figure';
import { rasterizeMap, type ImageBuffer } from './raster';

/** Everything one map panel shows. */
export interface PanelSpec {
  title: string;
  unit: string;
  values: ArrayLike<number>;
  times: ArrayLike<number>;
  frequencies: ArrayLike<number>;
  spacing: 'log' | 'linear';
  edges: EdgeZones | null;
  colormap: Colormap;
  scale: ColourScale;
  /** Draw the baseline band into the picture (exports); the live island draws it in the DOM instead. */
  baseline?: { start: number; end: number } | null;
  /** Cells to outline (`[f·T + t]` 1 = marked), e.g. phase consistency with Rayleigh p < 0.05; null or absent: none. */
  outline?: ArrayLike<number> | null;
}

export interface PanelScales {
  time: AxisScale;
  frequency: AxisScale;
}

/** Scales of a panel's plot area in CSS pixels. */
export function panelScales(layout: PanelLayout, times: ArrayLike<number>, frequencies: ArrayLike<number>, spacing: 'log' | 'linear'): PanelScales {
  return {
    time: timeScale(times, layout.left, layout.left + layout.plotWidth),
    frequency: frequencyScale(frequencies, spacing, layout.top + layout.plotHeight, layout.top),
  };
}

type PaintCtx = Ctx & {
  setTransform(a: number, b: number, c: number, d: number, e: number, f: number): void;
  clearRect(x: number, y: number, w: number, h: number): void;
  putImageData(image: ImageData, dx: number, dy: number): void;
  createImageData(w: number, h: number): ImageData;
};

/** The map's pixels at device resolution into `reuse.image` (kept between frames), put at the plot area. */
function putMap(ctx: PaintCtx, layout: PanelLayout, spec: PanelSpec, r: number, reuse: { image: ImageData | null }, originX: number, originY: number): void {
  const w = Math.max(1, Math.round(layout.plotWidth * r));
  const h = Math.max(1, Math.round(layout.plotHeight * r));
  let image = reuse.image;
  if (image === null || image.width !== w || image.height !== h) image = reuse.image = ctx.createImageData(w, h);
  rasterizeMap(image as ImageBuffer, { values: spec.values, nFreqs: spec.frequencies.length, nTimes: spec.times.length }, { colormap: spec.colormap, scale: spec.scale, edges: spec.edges });
  ctx.putImageData(image, Math.round((originX + layout.left) * r), Math.round((originY + layout.top) * r));
}

function axesOf(spec: PanelSpec, scales: PanelScales) {
  const nf = spec.frequencies.length;
  const nt = spec.times.length;
  return {
    title: spec.title,
    time: scales.time,
    frequency: scales.frequency,
    frequencyLog: spec.spacing === 'log',
    timeEnds: [spec.times[0], spec.times[nt - 1]] as [number, number],
    frequencyEnds: [spec.frequencies[0], spec.frequencies[nf - 1]] as [number, number],
  };
}

/**
 * Paints one panel at `pixelRatio` device pixels per CSS pixel, offset by (`originX`, `originY`) CSS pixels: the
 * map image at device resolution (so cells stay sharp), then axes and the colour bar. `reuse` lets the caller keep
 * one ImageData between frames.
 */
export function paintPanel(
  ctx: PaintCtx,
  layout: PanelLayout,
  spec: PanelSpec,
  pixelRatio: number,
  reuse: { image: ImageData | null } = { image: null },
  originX = 0,
  originY = 0,
): PanelScales {
  const r = pixelRatio;
  ctx.setTransform(r, 0, 0, r, originX * r, originY * r);
  ctx.fillStyle = FOAM;
  ctx.fillRect(0, 0, layout.width, layout.height);
  putMap(ctx, layout, spec, r, reuse, originX, originY);
  const scales = panelScales(layout, spec.times, spec.frequencies, spec.spacing);
  if (spec.outline) drawMaskOutline(ctx, layout, spec.outline, spec.frequencies.length, spec.times.length);
  if (spec.baseline) drawBaselineBand(ctx, layout, scales.time, spec.baseline.start, spec.baseline.end);
  drawAxes(ctx, layout, axesOf(spec, scales));
  drawColourBar(ctx, layout, spec.colormap, spec.scale, spec.unit);
  return scales;
}

/**
 * The live panel in two layers. `paintPanelFrame`: what stays while the values change (background, frame, ticks,
 * labels, title), painted once per size and title into a canvas the island keeps. `paintPanelValues`: the map,
 * its outline, the event line and the colour bar over a copy of that frame, on every new picture. Together they
 * give paintPanel's pixels (the map now lies over the frame line's inside edge, which it does not reach).
 */
export function paintPanelFrame(ctx: PaintCtx, layout: PanelLayout, spec: PanelSpec, pixelRatio: number): void {
  const r = pixelRatio;
  ctx.setTransform(r, 0, 0, r, 0, 0);
  ctx.fillStyle = FOAM;
  ctx.fillRect(0, 0, layout.width, layout.height);
  drawAxes(ctx, layout, axesOf(spec, panelScales(layout, spec.times, spec.frequencies, spec.spacing)));
}

/** See `paintPanelFrame`: the layer that changes with the values, painted over the frame's copy. */
export function paintPanelValues(ctx: PaintCtx, layout: PanelLayout, spec: PanelSpec, pixelRatio: number, reuse: { image: ImageData | null }): void {
  const r = pixelRatio;
  ctx.setTransform(r, 0, 0, r, 0, 0);
  putMap(ctx, layout, spec, r, reuse, 0, 0);
  const scales = panelScales(layout, spec.times, spec.frequencies, spec.spacing);
  if (spec.outline) drawMaskOutline(ctx, layout, spec.outline, spec.frequencies.length, spec.times.length);
  drawEventLine(ctx, layout, scales.time);
  drawColourBar(ctx, layout, spec.colormap, spec.scale, spec.unit);
}
