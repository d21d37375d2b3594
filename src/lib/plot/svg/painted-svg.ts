import { EXPORT_CAUTION } from '../maps-figure';
import { FOAM, type Ctx } from '../figure';
import type { SvgFont } from './fonts';
import { SvgContext } from './svg-context';

/** What a canvas painter may ask of its context when it is exported: the shared Ctx plus clipping. */
export type PaintCtx = Ctx & { clip(): void };

/**
 * Any canvas painter's picture as SVG: a `width` × `height` CSS-pixel figure on the plots' foam background, painted
 * by `paint` exactly as it paints a canvas (CanvasPlot's line plots: spectra, the power above the aperiodic line).
 */
export function paintedSvg(width: number, height: number, paint: (ctx: PaintCtx) => void, options: { fonts?: SvgFont[]; title?: string } = {}): Promise<string> {
  const ctx = new SvgContext(width, height, 1);
  ctx.fillStyle = FOAM;
  ctx.fillRect(0, 0, width, height);
  paint(ctx);
  return ctx.toSvg({ fonts: options.fonts, title: options.title, description: EXPORT_CAUTION });
}
