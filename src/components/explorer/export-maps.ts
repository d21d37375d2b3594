import { divergingColormap, sequentialColormap } from '../../lib/plot/colormap';
import { EXPORT_CAUTION, EXPORT_PANEL, paintMapsFigure } from '../../lib/plot/maps-figure';
import type { PanelSpec } from '../../lib/plot/panel';

export { EXPORT_CAUTION, EXPORT_PANEL };

/** Both maps side by side with axes, colour bars and the baseline band, as a PNG blob. */
export async function renderMapsPng(raw: PanelSpec, normalized: PanelSpec, caption: string): Promise<Blob> {
  const { width, height, header, scale } = EXPORT_PANEL;
  const canvas = document.createElement('canvas');
  canvas.width = 2 * width * scale;
  canvas.height = (height + header) * scale;
  paintMapsFigure(canvas.getContext('2d')!, raw, normalized, caption, scale);
  return new Promise((resolve, reject) => canvas.toBlob((b) => (b ? resolve(b) : reject(new Error('the browser could not encode the PNG'))), 'image/png'));
}

export { divergingColormap, sequentialColormap };
