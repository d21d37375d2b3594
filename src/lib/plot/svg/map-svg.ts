import { EXPORT_CAUTION, EXPORT_PANEL, paintMapsFigure } from '../maps-figure';
import { paintPanel, type PanelSpec } from '../panel';
import type { PanelLayout } from '../figure';
import type { SvgFont } from './fonts';
import { SvgContext } from './svg-context';

export interface MapSvgOptions {
  fonts?: SvgFont[];
  /**
   * Raster pixels per CSS pixel of the embedded heat map. The map is a raster by nature (up to 40 × 1536 cells; as
   * rects it would be tens of thousands of elements that editors crawl through), so it goes in as the very pixels
   * the canvas paints (edge hatching included) at this scale; axes, ticks, labels and the colour bar stay vector.
   * The figure's default is the PNG export's scale (2: 1280 raster pixels across a 640 px panel, about 380 dpi
   * at a journal's 85 mm column), so SVG and PNG show the same pixels.
   */
  rasterScale?: number;
}

/** The exported figure of the two maps (the PNG export's picture) as SVG. */
export function mapsFigureSvg(raw: PanelSpec, normalized: PanelSpec, caption: string, options: MapSvgOptions = {}): Promise<string> {
  const { width, height, header } = EXPORT_PANEL;
  const r = options.rasterScale ?? EXPORT_PANEL.scale;
  const ctx = new SvgContext(2 * width, height + header, r);
  paintMapsFigure(ctx, raw, normalized, caption, r);
  return ctx.toSvg({ fonts: options.fonts, title: caption, description: EXPORT_CAUTION });
}

/** One map panel (as MapPanel paints it on screen) as SVG, `layout` in CSS pixels. */
export function mapPanelSvg(layout: PanelLayout, spec: PanelSpec, options: MapSvgOptions = {}): Promise<string> {
  const r = options.rasterScale ?? EXPORT_PANEL.scale;
  const ctx = new SvgContext(layout.width, layout.height, r);
  paintPanel(ctx, layout, spec, r);
  return ctx.toSvg({ fonts: options.fonts, title: spec.title, description: EXPORT_CAUTION });
}
