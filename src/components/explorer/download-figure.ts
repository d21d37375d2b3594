import { bandBarsSvg, type BandBarsInput } from '../../lib/plot/svg/band-bars-svg';
import { downloadBlob, fileSafe } from './download';
import { figureFonts } from './figure-fonts';

/** An SVG document as a download (`image/svg+xml`, UTF-8). */
export function downloadSvg(svg: string, fileName: string): void {
  downloadBlob(new Blob([svg], { type: 'image/svg+xml;charset=utf-8' }), fileName);
}

/** A CSV text as a download (`text/csv`, UTF-8). */
export function downloadCsv(csv: string, fileName: string): void {
  downloadBlob(new Blob([csv], { type: 'text/csv;charset=utf-8' }), fileName);
}

/** The Bands screen's bars as an SVG download, fonts embedded. */
export async function downloadBandBarsSvg(input: Omit<BandBarsInput, 'fonts'>, fileName: string): Promise<void> {
  downloadSvg(bandBarsSvg({ ...input, fonts: await figureFonts() }), `${fileSafe(fileName)}.svg`);
}
