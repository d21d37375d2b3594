import { FOAM, INK, SANS, panelLayout } from './figure';
import { paintPanel, type PanelSpec } from './panel';

/** Size of the exported picture of the two maps, CSS pixels (the PNG is `scale` × this). */
export const EXPORT_PANEL = { width: 640, height: 340, header: 36, scale: 2 } as const;

/** Printed on every exported picture, which may travel further than the app (research caution). */
export const EXPORT_CAUTION = 'Research output from Tidemark, not a medical device: not for diagnosis or treatment.';

type FigureCtx = Parameters<typeof paintPanel>[0];

/**
 * Both maps side by side with axes, colour bars and the baseline band, under a caption and the research caution:
 * the one painter of the exported figure, whether the context is a canvas (PNG) or an SvgContext (SVG).
 */
export function paintMapsFigure(ctx: FigureCtx, raw: PanelSpec, normalized: PanelSpec, caption: string, scale: number): void {
  const { width, height, header } = EXPORT_PANEL;
  ctx.setTransform(scale, 0, 0, scale, 0, 0);
  ctx.fillStyle = FOAM;
  ctx.fillRect(0, 0, 2 * width, height + header);
  ctx.fillStyle = INK;
  ctx.font = SANS;
  ctx.textAlign = 'left';
  ctx.textBaseline = 'alphabetic';
  ctx.fillText(caption, 16, 22);
  ctx.textAlign = 'right';
  ctx.font = SANS.replace('600 12px', '400 11px');
  ctx.fillText(EXPORT_CAUTION, 2 * width - 16, 22);
  ctx.textAlign = 'left';
  ctx.font = SANS;
  const layout = panelLayout(width, height);
  paintPanel(ctx, layout, raw, scale, { image: null }, 0, header);
  paintPanel(ctx, layout, normalized, scale, { image: null }, width, header);
}
