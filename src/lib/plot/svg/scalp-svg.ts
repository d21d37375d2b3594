import { interpolateCividis } from 'd3-scale-chromatic';
import { EXPORT_CAUTION } from '../maps-figure';
import { FOAM, INK, INK_SOFT } from '../figure';
import { scalpPosition } from '../scalp-positions';
import { fontFaceCss, type SvgFont } from './fonts';
import { escapeXml } from './svg-context';

export interface ScalpSvgInput {
  title: string;
  unit: string;
  values: readonly { channel: string; value: number | null }[];
  fonts?: SvgFont[];
}

const MONO = '"JetBrains Mono Variable", ui-monospace, monospace';
const SANS = '"Inter Variable", ui-sans-serif, sans-serif';
const n = (x: number) => String(Math.round(x * 1000) / 1000);

/**
 * The scalp map (ScalpMap's drawing: top view, nose up, electrodes at their 10-20 / 10-10 positions as discs on
 * cividis between the smallest and largest value, names beside them, a colour bar with its limits) as a standalone
 * SVG with a title, the unplaced channels listed and the research caution.
 */
export function scalpMapSvg(input: ScalpSvgInput): string {
  const placed = input.values.map((v) => ({ ...v, pos: scalpPosition(v.channel) }));
  const finite = placed.filter((p) => p.value !== null && Number.isFinite(p.value)).map((p) => p.value as number);
  const lo = finite.length > 0 ? Math.min(...finite) : 0;
  const hi = finite.length > 0 ? Math.max(...finite) : 1;
  const t = (v: number) => (hi > lo ? (v - lo) / (hi - lo) : 0.5);
  const R = 100;
  const unplaced = placed.filter((p) => p.pos === null).map((p) => p.channel);
  const text = (x: number, y: number, s: string, size: number, attrs = '') => `<text x="${n(x)}" y="${n(y)}" font-family="${escapeXml(MONO)}" font-size="${size}" fill="${INK}"${attrs}>${escapeXml(s)}</text>`;
  const out: string[] = [];
  out.push(`<rect x="-150" y="-165" width="300" height="330" fill="${FOAM}"/>`);
  out.push(`<text x="-142" y="-148" font-family="${escapeXml(SANS)}" font-size="10" font-weight="600" fill="${INK}">${escapeXml(`${input.title} (${input.unit})`)}</text>`);
  out.push(`<circle cx="0" cy="0" r="${R}" fill="${FOAM}" stroke="${INK}" stroke-width="1.5"/>`);
  out.push(`<path d="M -12 ${-R + 1} L 0 ${-R - 14} L 12 ${-R + 1}" fill="none" stroke="${INK}" stroke-width="1.5"/>`);
  out.push(`<path d="M ${-R} -14 q -10 14 0 28" fill="none" stroke="${INK}" stroke-width="1.5"/>`);
  out.push(`<path d="M ${R} -14 q 10 14 0 28" fill="none" stroke="${INK}" stroke-width="1.5"/>`);
  out.push(`<line x1="${-R}" x2="${R}" y1="0" y2="0" stroke="#c9b896" stroke-width="0.75" stroke-dasharray="2 3"/>`);
  for (const p of placed) {
    if (p.pos === null) continue;
    const x = (p.pos.x * R) / 1.25;
    const y = (-p.pos.y * R) / 1.25;
    const has = p.value !== null && Number.isFinite(p.value);
    out.push(`<circle cx="${n(x)}" cy="${n(y)}" r="7" fill="${has ? interpolateCividis(t(p.value as number)) : '#e9e0cf'}" stroke="${INK}" stroke-width="0.75"><title>${escapeXml(`${p.channel}: ${has ? `${p.value} ${input.unit}` : 'no value'}`)}</title></circle>`);
    out.push(text(x, y + 17, p.channel, 7, ' text-anchor="middle"'));
  }
  const stops = [0, 0.25, 0.5, 0.75, 1].map((s) => `<stop offset="${s}" stop-color="${interpolateCividis(s)}"/>`).join('');
  out.push(`<rect x="-60" y="118" width="120" height="6" fill="url(#scalp-bar)" stroke="${INK}" stroke-width="0.5"/>`);
  out.push(text(-64, 124, lo.toFixed(2), 8, ' text-anchor="end"'));
  out.push(text(64, 124, hi.toFixed(2), 8));
  if (unplaced.length > 0) out.push(`<text x="-142" y="142" font-family="${escapeXml(SANS)}" font-size="7" fill="${INK_SOFT}">${escapeXml(`not a 10-20 name, not drawn: ${unplaced.join(', ')}`)}</text>`);
  out.push(`<text x="-142" y="158" font-family="${escapeXml(SANS)}" font-size="6" fill="${INK_SOFT}">${escapeXml(EXPORT_CAUTION)}</text>`);
  const style = input.fonts !== undefined && input.fonts.length > 0 ? `<style>${fontFaceCss(input.fonts)}</style>` : '';
  return [
    `<?xml version="1.0" encoding="UTF-8"?>`,
    // 300 × 330 user units drawn at 2 CSS px each: the small type (7 px names) stays legible at 100 %.
    `<svg xmlns="http://www.w3.org/2000/svg" version="1.1" width="600" height="660" viewBox="-150 -165 300 330">`,
    `<title>${escapeXml(input.title)}</title><desc>${escapeXml(EXPORT_CAUTION)}</desc>`,
    `<defs>${style}<linearGradient id="scalp-bar" x1="0" x2="1" y1="0" y2="0">${stops}</linearGradient></defs>`,
    ...out,
    `</svg>`,
    '',
  ].join('\n');
}
