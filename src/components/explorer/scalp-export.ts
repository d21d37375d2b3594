import { EXPORT_CAUTION } from '../../lib/plot/maps-figure';
import { HEAD_RADIUS } from '../../lib/plot/scalp-map';
import { fontFaceCss } from '../../lib/plot/svg/fonts';
import { escapeXml } from '../../lib/plot/svg/svg-context';
import { figureFonts } from './figure-fonts';
import { downloadSvg } from './download-figure';
import { fileSafe } from './download';

/**
 * The scalp map as shown, as a standalone SVG: the figure's own vector layer (head outline, electrodes, labels,
 * colour bar, ticks and unit as <text>) serialized as it is, with the interpolated disc underneath as the very
 * raster the screen paints (its canvas, a PNG data URL, at [−R, R]² of the view), caption lines, the caution and the
 * fonts embedded. Made from the drawn figure rather than redrawn, so the two cannot differ.
 */
export function scalpFigureSvg(vector: SVGSVGElement, disc: HTMLCanvasElement, captions: string[], fonts: Parameters<typeof fontFaceCss>[0]): string {
  const [x, y, w, h] = (vector.getAttribute('viewBox') ?? '-150 -125 300 290').split(/\s+/).map(Number);
  const extra = 12 + 9 * captions.length;
  const serializer = new XMLSerializer();
  const layer = Array.from(vector.childNodes, (n) => serializer.serializeToString(n)).join('');
  const R = HEAD_RADIUS;
  return [
    `<?xml version="1.0" encoding="UTF-8"?>`,
    `<svg xmlns="http://www.w3.org/2000/svg" xmlns:xlink="http://www.w3.org/1999/xlink" version="1.1" width="${2 * w}" height="${2 * (h + extra)}" viewBox="${x} ${y} ${w} ${h + extra}">`,
    `<title>${escapeXml(captions[0] ?? 'Scalp map')}</title><desc>${escapeXml(EXPORT_CAUTION)}</desc>`,
    `<defs><style>${fontFaceCss(fonts)}</style></defs>`,
    `<rect x="${x}" y="${y}" width="${w}" height="${h + extra}" fill="#fffdf8"/>`,
    `<image x="${-R}" y="${-R}" width="${2 * R}" height="${2 * R}" preserveAspectRatio="none" xlink:href="${disc.toDataURL('image/png')}"/>`,
    layer,
    ...[...captions, EXPORT_CAUTION].map((line, i) => `<text x="${x + 6}" y="${y + h + 10 + 9 * i}" font-family="&quot;Inter Variable&quot;, ui-sans-serif, sans-serif" font-size="${i < captions.length ? 7 : 6}" fill="#3b5366">${escapeXml(line)}</text>`),
    `</svg>`,
    '',
  ].join('\n');
}

/** Downloads the scalp figure inside `figure` (its <svg> and <canvas>) as SVG. */
export async function downloadScalpSvg(figure: HTMLElement | null, captions: string[], fileName: string): Promise<void> {
  const vector = figure?.querySelector('svg');
  const disc = figure?.querySelector('canvas');
  if (!vector || !disc) throw new Error('the scalp map is not drawn yet');
  downloadSvg(scalpFigureSvg(vector, disc, captions, await figureFonts()), `${fileSafe(fileName)}.svg`);
}
