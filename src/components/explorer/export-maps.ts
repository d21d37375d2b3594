import { divergingColormap, sequentialColormap } from '../../lib/plot/colormap';
import { FOAM, INK, SANS, panelLayout } from '../../lib/plot/figure';
import { paintPanel, type PanelSpec } from '../../lib/plot/panel';

/** Size of the exported picture of the two maps, CSS pixels (the PNG is 2× this). */
export const EXPORT_PANEL = { width: 640, height: 340, header: 36, scale: 2 } as const;

/** Printed on every exported picture, which may travel further than the app (research caution). */
export const EXPORT_CAUTION = 'Research output from Tidemark, not a medical device: not for diagnosis or treatment.';

/** Both maps side by side with axes, colour bars and the baseline band, as a PNG blob. */
export async function renderMapsPng(raw: PanelSpec, normalized: PanelSpec, caption: string): Promise<Blob> {
  const { width, height, header, scale } = EXPORT_PANEL;
  const canvas = document.createElement('canvas');
  canvas.width = 2 * width * scale;
  canvas.height = (height + header) * scale;
  const ctx = canvas.getContext('2d')!;
  ctx.setTransform(scale, 0, 0, scale, 0, 0);
  ctx.fillStyle = FOAM;
  ctx.fillRect(0, 0, 2 * width, height + header);
  ctx.fillStyle = INK;
  ctx.font = SANS;
  ctx.fillText(caption, 16, 22);
  ctx.textAlign = 'right';
  ctx.font = SANS.replace('600 12px', '400 11px');
  ctx.fillText(EXPORT_CAUTION, 2 * width - 16, 22);
  ctx.textAlign = 'left';
  ctx.font = SANS;
  const layout = panelLayout(width, height);
  paintPanel(ctx, layout, raw, scale, { image: null }, 0, header);
  paintPanel(ctx, layout, normalized, scale, { image: null }, width, header);
  return new Promise((resolve, reject) => canvas.toBlob((b) => (b ? resolve(b) : reject(new Error('the browser could not encode the PNG'))), 'image/png'));
}

export { divergingColormap, sequentialColormap };
