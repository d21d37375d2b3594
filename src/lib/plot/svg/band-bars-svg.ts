import { formatTick } from '../axes';
import { bandChartLayout } from '../band-chart';
import { EXPORT_CAUTION } from '../maps-figure';
import { FOAM, INK, INK_SOFT } from '../figure';
import { fontFaceCss, type SvgFont } from './fonts';
import { escapeXml } from './svg-context';

/** One bar: the mean normalized value of a band in a window for a condition at a site (a channel or a group). */
export interface BandBarRow {
  band: { name: string; lowHz: number; highHz: number };
  window: { name: string; startSeconds: number; endSeconds: number };
  site: string;
  condition: string;
  value: number;
}

export interface BandBarsInput {
  /** The channels or groups in the chart, one chart each, top to bottom. */
  sites: readonly string[];
  rows: readonly BandBarRow[];
  bands: readonly BandBarRow['band'][];
  windows: readonly BandBarRow['window'][];
  labels: readonly string[];
  unit: string;
  /** The method's neutral value (0, or 1 for a ratio): bars grow up or down from it. */
  neutral: number;
  /** One colour per band, in order (repeated when there are more bands). */
  colours: readonly string[];
  /** Width of the figure, CSS pixels (default 640). */
  width?: number;
  fonts?: SvgFont[];
}

const MONO = '"JetBrains Mono Variable", ui-monospace, monospace';
const SANS = '"Inter Variable", ui-sans-serif, sans-serif';
const n = (x: number) => String(Math.round(x * 1000) / 1000);
const CHART_HEIGHT = 240;

/**
 * The Bands screen's grouped bars as a standalone SVG, from the same geometry the screen draws (`bandChartLayout`):
 * per site a chart with one group per window × condition and one bar per band from the neutral value, tick values,
 * the unit as an axis title, window and condition names, all as <text>; then the band legend the screen shows below
 * its charts (a figure must carry its own key) and the research caution.
 */
export function bandBarsSvg(input: BandBarsInput): string {
  const { sites, rows, bands, windows, labels, unit, neutral, colours } = input;
  const width = input.width ?? 640;
  const groups = windows.flatMap((w) => labels.map((l) => ({ w, l })));
  const sameBand = (a: BandBarRow['band'], b: BandBarRow['band']) => a.name === b.name && a.lowHz === b.lowHz && a.highHz === b.highHz;
  const text = (x: number, y: number, s: string, attrs = '', fill = INK) => `<text x="${n(x)}" y="${n(y)}" font-family="${escapeXml(MONO)}" font-size="10" fill="${fill}"${attrs}>${escapeXml(s)}</text>`;
  const out: string[] = [];
  sites.forEach((site, si) => {
    const mine = rows.filter((r) => r.site === site);
    const layout = bandChartLayout({ width, height: CHART_HEIGHT, groups: groups.length, bars: bands.length, values: mine.map((r) => r.value), neutral });
    const g: string[] = [];
    g.push(`<text x="${layout.left}" y="12" font-family="${escapeXml(SANS)}" font-size="12" font-weight="600" fill="${INK}">${escapeXml(site)}</text>`);
    for (const v of layout.ticks) {
      g.push(`<line x1="${n(layout.left - 4)}" x2="${n(layout.left)}" y1="${n(layout.y(v))}" y2="${n(layout.y(v))}" stroke="${INK}"/>`);
      g.push(text(layout.left - 6, layout.y(v) + 3, formatTick(v), ' text-anchor="end"'));
    }
    g.push(`<line x1="${layout.left}" x2="${layout.left}" y1="${layout.top}" y2="${layout.height - layout.bottom}" stroke="${INK}"/>`);
    g.push(`<line x1="${layout.left}" x2="${layout.width - layout.right}" y1="${n(layout.y(neutral))}" y2="${n(layout.y(neutral))}" stroke="${INK}"/>`);
    g.push(`<text transform="translate(14 ${n((layout.top + layout.height - layout.bottom) / 2)}) rotate(-90)" text-anchor="middle" font-family="${escapeXml(MONO)}" font-size="10" fill="${INK}">${escapeXml(`mean (${unit})`)}</text>`);
    groups.forEach((grp, gi) => {
      const bars: string[] = [];
      bands.forEach((b, bi) => {
        const r = mine.find((x) => sameBand(x.band, b) && x.window.name === grp.w.name && x.condition === grp.l);
        const has = r !== undefined && Number.isFinite(r.value);
        const v = has ? r.value : neutral;
        const h = Math.max(1, Math.abs(layout.y(v) - layout.y(neutral)));
        const tip = `${site} · ${b.name} · ${grp.w.name} · ${grp.l}: ${has ? `${r.value} ${unit}` : 'no value'}`;
        bars.push(`<rect x="${n(layout.barX(bi))}" y="${n(layout.y(Math.max(v, neutral)))}" width="${n(layout.barWidth)}" height="${n(h)}" fill="${escapeXml(colours[bi % colours.length])}"><title>${escapeXml(tip)}</title></rect>`);
      });
      bars.push(text(layout.groupWidth / 2, layout.height - layout.bottom + 16, grp.w.name, ' text-anchor="middle"'));
      bars.push(text(layout.groupWidth / 2, layout.height - layout.bottom + 30, grp.l, ' text-anchor="middle"', INK_SOFT));
      g.push(`<g transform="translate(${n(layout.groupX(gi))} 0)">${bars.join('')}</g>`);
    });
    out.push(`<g transform="translate(0 ${si * CHART_HEIGHT})">\n${g.join('\n')}\n</g>`);
  });
  const perRow = Math.max(1, Math.floor((width - 16) / 170));
  const legendY = sites.length * CHART_HEIGHT + 8;
  bands.forEach((b, i) => {
    const lx = 8 + (i % perRow) * 170;
    const ly = legendY + 22 * Math.floor(i / perRow);
    out.push(`<rect x="${lx}" y="${ly}" width="12" height="12" fill="${escapeXml(colours[i % colours.length])}"/>`);
    out.push(text(lx + 18, ly + 10, `${b.name} ${formatTick(b.lowHz)}–${formatTick(b.highHz)} Hz`));
  });
  const height = legendY + 22 * Math.ceil(bands.length / perRow) + 24;
  out.push(`<text x="8" y="${height - 8}" font-family="${escapeXml(SANS)}" font-size="10" fill="${INK_SOFT}">${escapeXml(EXPORT_CAUTION)}</text>`);
  const title = `Band means (${unit}): ${sites.join(', ')}`;
  const style = input.fonts !== undefined && input.fonts.length > 0 ? `<style>${fontFaceCss(input.fonts)}</style>` : '';
  return [
    `<?xml version="1.0" encoding="UTF-8"?>`,
    `<svg xmlns="http://www.w3.org/2000/svg" version="1.1" width="${width}" height="${height}" viewBox="0 0 ${width} ${height}">`,
    `<title>${escapeXml(title)}</title><desc>${escapeXml(EXPORT_CAUTION)}</desc>`,
    `<defs>${style}</defs>`,
    `<rect x="0" y="0" width="${width}" height="${height}" fill="${FOAM}"/>`,
    ...out,
    `</svg>`,
    '',
  ].join('\n');
}
