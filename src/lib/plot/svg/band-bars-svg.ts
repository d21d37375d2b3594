import { EXPORT_CAUTION } from '../maps-figure';
import { FOAM, INK, INK_SOFT } from '../figure';
import { fontFaceCss, type SvgFont } from './fonts';
import { escapeXml } from './svg-context';

/** One bar: the mean normalized value of a band in a window for a condition (the Bands screen's rows). */
export interface BandBarRow {
  band: { name: string; lowHz: number; highHz: number };
  window: { name: string; startSeconds: number; endSeconds: number };
  condition: string;
  value: number;
}

export interface BandBarsInput {
  title: string;
  rows: readonly BandBarRow[];
  bands: readonly BandBarRow['band'][];
  windows: readonly BandBarRow['window'][];
  labels: readonly string[];
  unit: string;
  /** The method's neutral value (0, or 1 for a ratio): bars grow up or down from it. */
  neutral: number;
  /** One colour per band, in order (repeated when there are more bands). */
  colours: readonly string[];
  fonts?: SvgFont[];
}

const MONO = '"JetBrains Mono Variable", ui-monospace, monospace';
const SANS = '"Inter Variable", ui-sans-serif, sans-serif';
const n = (x: number) => String(Math.round(x * 1000) / 1000);
const label = (v: number) => String(Number(v.toPrecision(3)));

/**
 * The Bands screen's grouped bars as a standalone SVG: one group per window × condition, one bar per band drawn
 * from the neutral value on a symmetric scale, value labels as <text>, and the band legend the screen shows below
 * the plot drawn in (a figure must carry its own key).
 */
export function bandBarsSvg(input: BandBarsInput): string {
  const { rows, bands, windows, labels, unit, neutral, colours } = input;
  const groups = windows.flatMap((w) => labels.map((l) => ({ w, l })));
  const groupWidth = bands.length * 18 + 24;
  // At least 460 px: room for the caution line at 10 px.
  const width = Math.max(460, groups.length * groupWidth + 70);
  const perRow = Math.max(1, Math.floor((width - 16) / 170));
  const head = 24;
  const plotHeight = 240;
  const top = head + 16;
  const bottom = head + plotHeight - 44;
  const left = 56;
  const legendY = head + plotHeight + 8;
  const height = legendY + 22 * Math.ceil(bands.length / perRow) + 24;
  const finite = rows.map((r) => r.value).filter(Number.isFinite);
  const m = Math.max(1e-9, ...finite.map((v) => Math.abs(v - neutral)));
  const y = (v: number) => top + ((neutral + m - v) / (2 * m)) * (bottom - top);
  const text = (x: number, yy: number, s: string, attrs = '') => `<text x="${n(x)}" y="${n(yy)}" font-family="${escapeXml(MONO)}" font-size="10" fill="${INK}"${attrs}>${escapeXml(s)}</text>`;
  const out: string[] = [];
  out.push(`<rect x="0" y="0" width="${width}" height="${height}" fill="${FOAM}"/>`);
  out.push(`<text x="8" y="16" font-family="${escapeXml(SANS)}" font-size="12" font-weight="600" fill="${INK}">${escapeXml(input.title)}</text>`);
  out.push(`<line x1="${left}" x2="${width - 10}" y1="${n(y(neutral))}" y2="${n(y(neutral))}" stroke="${INK}"/>`);
  for (const v of [neutral - m, neutral, neutral + m]) out.push(text(left - 6, y(v) + 3, label(v), ' text-anchor="end"'));
  out.push(text(8, top + 4, unit));
  groups.forEach((g, gi) => {
    const gx = left + 12 + gi * groupWidth;
    bands.forEach((b, bi) => {
      const r = rows.find((x) => x.band.name === b.name && x.band.lowHz === b.lowHz && x.window.name === g.w.name && x.condition === g.l);
      const v = r === undefined || !Number.isFinite(r.value) ? neutral : r.value;
      const h = Math.max(1, Math.abs(y(v) - y(neutral)));
      const tip = `${b.name} · ${g.w.name} · ${g.l}: ${r === undefined || !Number.isFinite(r.value) ? 'no value' : `${r.value} ${unit}`}`;
      out.push(`<rect x="${n(gx + bi * 18)}" y="${n(y(Math.max(v, neutral)))}" width="14" height="${n(h)}" fill="${escapeXml(colours[bi % colours.length])}"><title>${escapeXml(tip)}</title></rect>`);
    });
    const cx = gx + (bands.length * 18) / 2;
    out.push(text(cx, bottom + 16, g.w.name, ' text-anchor="middle"'));
    out.push(`<text x="${n(cx)}" y="${n(bottom + 30)}" font-family="${escapeXml(MONO)}" font-size="10" fill="${INK_SOFT}" text-anchor="middle">${escapeXml(g.l)}</text>`);
  });
  bands.forEach((b, i) => {
    const lx = 8 + (i % perRow) * 170;
    const ly = legendY + 22 * Math.floor(i / perRow);
    out.push(`<rect x="${lx}" y="${ly}" width="12" height="12" fill="${escapeXml(colours[i % colours.length])}"/>`);
    out.push(text(lx + 18, ly + 10, `${b.name} ${label(b.lowHz)}–${label(b.highHz)} Hz`));
  });
  out.push(`<text x="8" y="${height - 8}" font-family="${escapeXml(SANS)}" font-size="10" fill="${INK_SOFT}">${escapeXml(EXPORT_CAUTION)}</text>`);
  const style = input.fonts !== undefined && input.fonts.length > 0 ? `<style>${fontFaceCss(input.fonts)}</style>` : '';
  return [
    `<?xml version="1.0" encoding="UTF-8"?>`,
    `<svg xmlns="http://www.w3.org/2000/svg" version="1.1" width="${width}" height="${height}" viewBox="0 0 ${width} ${height}">`,
    `<title>${escapeXml(input.title)}</title><desc>${escapeXml(EXPORT_CAUTION)}</desc>`,
    `<defs>${style}</defs>`,
    ...out,
    `</svg>`,
    '',
  ].join('\n');
}
