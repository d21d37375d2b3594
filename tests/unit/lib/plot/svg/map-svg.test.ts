// The map panel as SVG: drawn by the canvas painter (paintPanel) on SvgContext, so its heat map must be the very
// raster the canvas gets, its ticks real <text>, its fonts embedded. A scenario of our own: a 2 s epoch of a
// made-up "lighthouse blink" cue, 12 log-spaced frequencies from 4 to 40 Hz.
import fs from 'node:fs';
import { createRequire } from 'node:module';
import { describe, expect, it } from 'vitest';
import { mapPanelSvg, mapsFigureSvg } from '../../../../../src/lib/plot/svg/map-svg';
import { LATIN_RANGE } from '../../../../../src/lib/plot/svg/fonts';
import { SvgContext, parseFont } from '../../../../../src/lib/plot/svg/svg-context';
import { panelLayout } from '../../../../../src/lib/plot/figure';
import { divergingColormap, sequentialColormap } from '../../../../../src/lib/plot/colormap';
import { edgeZones } from '../../../../../src/lib/plot/edge-zone';
import { rasterizeMap } from '../../../../../src/lib/plot/raster';
import type { PanelSpec } from '../../../../../src/lib/plot/panel';
import { decodePng } from '../../../../helpers/png-decode';

const fs_ = 50;
const times = Float64Array.from({ length: 101 }, (_, j) => -0.5 + j / fs_);
const frequencies = Float64Array.from({ length: 12 }, (_, i) => 4 * Math.pow(10, i / 11));
const values = Float64Array.from({ length: 12 * 101 }, (_, k) => Math.sin(k / 37) * 3);
const edges = edgeZones(Float64Array.from(frequencies, (f) => 3 * (5 / (2 * Math.PI * f))), fs_, times.length);
const spec: PanelSpec = {
  title: 'Lighthouse blink · dB · Oz',
  unit: 'dB',
  values,
  times,
  frequencies,
  spacing: 'log',
  edges,
  colormap: divergingColormap(),
  scale: { domain: [-3, 3], kind: 'linear' },
  baseline: { start: -0.4, end: -0.1 },
};

const texts = (svg: string) => [...svg.matchAll(/<text\b[^>]*>([^<]*)<\/text>/g)].map((m) => m[1]);
const dataUrls = (svg: string) => [...svg.matchAll(/xlink:href="data:image\/png;base64,([^"]+)"/g)].map((m) => Buffer.from(m[1], 'base64'));

describe('mapPanelSvg', () => {
  const layout = panelLayout(480, 300);

  it('embeds the raster the canvas paints, pixel for pixel, at the plot rectangle', async () => {
    for (const r of [1, 2]) {
      const svg = await mapPanelSvg(layout, spec, { rasterScale: r });
      const [png] = dataUrls(svg);
      const image = decodePng(new Uint8Array(png));
      const w = Math.round(layout.plotWidth * r);
      const h = Math.round(layout.plotHeight * r);
      expect([image.width, image.height]).toEqual([w, h]);
      const expected = { width: w, height: h, data: new Uint8ClampedArray(4 * w * h) };
      rasterizeMap(expected, { values, nFreqs: 12, nTimes: 101 }, { colormap: spec.colormap, scale: spec.scale, edges });
      expect(Buffer.from(image.data).equals(Buffer.from(expected.data)), `raster at ${r}×`).toBe(true);
      expect(svg).toContain(`<image x="${layout.left}" y="${layout.top}" width="${layout.plotWidth}" height="${layout.plotHeight}"`);
    }
  });

  it('writes tick labels and axis titles as <text>: 0.5 s steps over the epoch, 5/10/20 Hz on the log axis', async () => {
    const t = texts(await mapPanelSvg(layout, spec));
    // Ticks at "nice" 1-2-5 steps are common practice for plot axes; 4-40 Hz on a log axis shows 5, 10, 20.
    for (const label of ['-0.5', '0', '0.5', '1', '1.5', '5', '10', '20', 'time (s)', 'frequency (Hz)', 'dB', spec.title]) expect(t).toContain(label);
    // The colour bar's limits and centre.
    for (const label of ['-3', '0', '3']) expect(t).toContain(label);
  });

  it('puts canvas "top" and "middle" text on its alphabetic baseline, shifted by the em box (no dominant-baseline)', async () => {
    const svg = await mapPanelSvg(layout, spec);
    const bottom = layout.top + layout.plotHeight;
    // Time ticks: textBaseline "top" at bottom + 6; JetBrains Mono's em-box ascent is 1020/1320 em (its OS/2 table).
    const y = Number(/<text x="[\d.]+" y="([\d.]+)"[^>]*>0\.5<\/text>/.exec(svg)![1]);
    expect(y).toBeCloseTo(bottom + 6 + (1020 / 1320) * 11, 2);
    expect(svg).not.toContain('dominant-baseline');
  });

  it('rotates the frequency title with a transform and keeps the dashed event line at 0 s', async () => {
    const svg = await mapPanelSvg(layout, spec);
    expect(svg).toMatch(/<text transform="matrix\(0 -1 1 0 12 [\d.]+\)"[^>]*>frequency \(Hz\)<\/text>/);
    expect(svg).toMatch(/stroke-dasharray="3 3"/);
    expect(svg).toMatch(/<linearGradient id="g\d+" gradientUnits="userSpaceOnUse"/);
  });

  it('embeds the fonts it is given as base64 @font-face rules', async () => {
    const require = createRequire(import.meta.url);
    const file = require.resolve('@fontsource-variable/jetbrains-mono/files/jetbrains-mono-latin-wght-normal.woff2');
    const dataUrl = `data:font/woff2;base64,${fs.readFileSync(file).toString('base64')}`;
    const svg = await mapPanelSvg(layout, spec, { fonts: [{ family: 'JetBrains Mono Variable', weight: '100 800', dataUrl, unicodeRange: LATIN_RANGE }] });
    expect(svg).toContain(`@font-face{font-family:'JetBrains Mono Variable';font-style:normal;font-weight:100 800;src:url(${dataUrl}) format('woff2');`);
    expect(svg).toMatch(/font-family="&quot;JetBrains Mono Variable&quot;, ui-monospace, monospace"/);
  });
});

describe('mapsFigureSvg', () => {
  it('is the PNG export’s figure: two panels side by side under the caption and the research caution', async () => {
    const raw: PanelSpec = { ...spec, title: 'Raw power · Oz', unit: 'µV²', values: values.map((v) => 10 + v), colormap: sequentialColormap(), scale: { domain: [7, 13], kind: 'log' } };
    const svg = await mapsFigureSvg(raw, spec, 'Oz · baseline −0.4 to −0.1 s · <test & "caption">', { rasterScale: 1 });
    expect(svg).toMatch(/^<\?xml version="1.0" encoding="UTF-8"\?>\n<svg xmlns="http:\/\/www.w3.org\/2000\/svg"[^>]* width="1280" height="376" viewBox="0 0 1280 376">/);
    expect(dataUrls(svg)).toHaveLength(2);
    const panel = panelLayout(640, 340);
    expect(svg).toContain(`<image x="${panel.left}" y="${36 + panel.top}"`);
    expect(svg).toContain(`<image x="${640 + panel.left}" y="${36 + panel.top}"`);
    const t = texts(svg);
    expect(t).toContain('Oz · baseline −0.4 to −0.1 s · &lt;test &amp; &quot;caption&quot;&gt;');
    expect(t.some((s) => s.includes('not a medical device'))).toBe(true);
  });
});

describe('SvgContext', () => {
  it('reads the painters’ font strings', () => {
    expect(parseFont('600 12px "Inter Variable", ui-sans-serif, sans-serif')).toEqual({ weight: '600', size: 12, family: '"Inter Variable", ui-sans-serif, sans-serif' });
    expect(parseFont('11px "JetBrains Mono Variable", monospace')).toEqual({ weight: '400', size: 11, family: '"JetBrains Mono Variable", monospace' });
  });

  it('maps a device-pixel transform back to CSS pixels and clips series to the plot area', async () => {
    const ctx = new SvgContext(100, 50, 2);
    ctx.setTransform(2, 0, 0, 2, 0, 0);
    ctx.lineWidth = 1.5;
    ctx.beginPath();
    ctx.rect(10, 10, 80, 30);
    ctx.clip();
    ctx.globalAlpha = 0.5;
    ctx.beginPath();
    ctx.moveTo(0, 0);
    ctx.lineTo(100, 50);
    ctx.stroke();
    ctx.beginPath();
    ctx.arc(50, 25, 10, 0, 2 * Math.PI);
    ctx.fill();
    const svg = await ctx.toSvg();
    expect(svg).toContain('<clipPath id="c1"><path d="M10 10L90 10L90 40L10 40Z"/></clipPath>');
    expect(svg).toContain('<path d="M0 0L100 50" fill="none" stroke="#000000" stroke-width="1.5" opacity="0.5" clip-path="url(#c1)"/>');
    expect(svg).toContain('<path d="M60 25A10 10 0 0 1 40 25A10 10 0 0 1 60 25"');
  });
});
