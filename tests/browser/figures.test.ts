// Figures and text for a paper (issue 14, item 5), on one decomposition of the demo recording (the invented Harbour
// Lights scenario): the maps as SVG, the full matrix as CSV, and the methods paragraph on the Maps screen.
import fs from 'node:fs';
import path from 'node:path';
import Papa from 'papaparse';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser, BrowserContext, Page } from 'playwright-core';
import { artifactsDir, downloadFrom, launchBrowser } from '../helpers/browser';
import { loadDemoInWorkspace } from '../helpers/workspace';
import { loadDemo } from '../../src/components/explorer/test-hooks';
import { useWorkspace } from '../../src/lib/client/workspace/store';
import { runRecipe, type AnalysisResult } from '../../src/lib/analysis/run-recipe';
import { methodsNumber } from '../../src/lib/analysis/methods-text';

const DEMO = { seconds: 60, channels: ['Fz', 'Cz', 'Pz'], epochStart: -0.5, epochEnd: 1.5 };

let browser: Browser;
let close: () => Promise<void>;
let context: BrowserContext;
let page: Page;
let recipe: Record<string, unknown> & { baseline: { start: number; end: number } };
let result: AnalysisResult;

const download = (testId: string) => downloadFrom(page, testId, artifactsDir);

/** The core's result for a recipe in Node, on the same demo recording and epoch decisions as the page. */
function nodeResult(r: unknown): AnalysisResult {
  loadDemo(DEMO);
  return runRecipe(useWorkspace.getState().analysisRecording()!, r);
}

/**
 * Draws a raster (PNG data URL) and an SVG onto two canvases of the raster's size in `blank` (a page with no app
 * code) and returns the fraction of pixels whose every channel is within 8/255; writes the SVG as drawn and a diff
 * (red: beyond the tolerance) to test-artifacts/<name>-*.png.
 */
async function samePicture(blank: Page, rasterSrc: string, svg: string, name: string) {
  const c = await blank.evaluate(
    async ({ rasterSrc, svgB64 }) => {
      const load = async (src: string) => {
        const img = new Image();
        img.src = src;
        await img.decode();
        return img;
      };
      const a = await load(rasterSrc);
      const b = await load(`data:image/svg+xml;base64,${svgB64}`);
      // Embedded faces load asynchronously inside the SVG image: let them arrive before drawing it.
      await new Promise((r) => setTimeout(r, 500));
      const w = a.naturalWidth;
      const h = a.naturalHeight;
      const draw = (img: HTMLImageElement) => {
        const c = document.createElement('canvas');
        c.width = w;
        c.height = h;
        const ctx = c.getContext('2d')!;
        ctx.drawImage(img, 0, 0, w, h);
        return { c, data: ctx.getImageData(0, 0, w, h).data };
      };
      const pa = draw(a);
      const pb = draw(b);
      const diff = document.createElement('canvas');
      diff.width = w;
      diff.height = h;
      const dctx = diff.getContext('2d')!;
      const out = dctx.createImageData(w, h);
      let same = 0;
      for (let i = 0; i < pa.data.length; i += 4) {
        const d = Math.max(Math.abs(pa.data[i] - pb.data[i]), Math.abs(pa.data[i + 1] - pb.data[i + 1]), Math.abs(pa.data[i + 2] - pb.data[i + 2]));
        if (d <= 8) same++;
        out.data[i] = d > 8 ? 255 : pa.data[i] / 3;
        out.data[i + 1] = d > 8 ? 0 : pa.data[i + 1] / 3;
        out.data[i + 2] = d > 8 ? 0 : pa.data[i + 2] / 3;
        out.data[i + 3] = 255;
      }
      dctx.putImageData(out, 0, 0);
      return { w, h, fraction: same / (w * h), svgShot: pb.c.toDataURL('image/png'), diffShot: diff.toDataURL('image/png') };
    },
    { rasterSrc, svgB64: Buffer.from(svg, 'utf8').toString('base64') },
  );
  fs.writeFileSync(path.join(artifactsDir, `${name}-svg.png`), Buffer.from(c.svgShot.split(',')[1], 'base64'));
  fs.writeFileSync(path.join(artifactsDir, `${name}-diff.png`), Buffer.from(c.diffShot.split(',')[1], 'base64'));
  console.log(`${name}: ${(100 * c.fraction).toFixed(3)} % of ${c.w} × ${c.h} pixels within 8/255 of the canvas`);
  return c;
}

/** Chromium's DOMParser (DOM Parsing and Serialization standard, independent of our writer) on an SVG text. */
async function parseSvg(blank: Page, text: string) {
  return blank.evaluate((t) => {
    const doc = new DOMParser().parseFromString(t, 'image/svg+xml');
    return {
      error: doc.getElementsByTagName('parsererror').length > 0 ? doc.getElementsByTagName('parsererror')[0].textContent : null,
      root: doc.documentElement.localName,
      ns: doc.documentElement.namespaceURI,
      texts: Array.from(doc.getElementsByTagName('text'), (e) => e.textContent ?? ''),
      images: Array.from(doc.getElementsByTagName('image'), (i) => (i.getAttribute('xlink:href') ?? '').slice(0, 22)),
      fontFaces: (doc.getElementsByTagName('style')[0]?.textContent ?? '').match(/@font-face\{font-family:'[^']+'/g) ?? [],
    };
  }, text);
}

beforeAll(async () => {
  ({ browser, close } = await launchBrowser());
  fs.mkdirSync(artifactsDir, { recursive: true });
  context = await browser.newContext({ viewport: { width: 1440, height: 900 }, acceptDownloads: true });
  await context.grantPermissions(['clipboard-read', 'clipboard-write']);
  page = await context.newPage();
  await loadDemoInWorkspace(page, DEMO);
  await page.getByRole('tab', { name: 'Recipe' }).click();
  await page.getByTestId('recipe-fcount').fill('16');
  await page.getByTestId('recipe-run').click();
  await page.waitForFunction(() => document.querySelector('[data-testid="recipe-status"]')?.getAttribute('data-status') === 'done', undefined, { timeout: 60_000 });
  await page.getByRole('tab', { name: 'Maps' }).click();
  await page.getByTestId('map-normalized').waitFor();
  recipe = JSON.parse((await download('export-recipe')).bytes.toString('utf8'));
  result = nodeResult(recipe);
});
afterAll(() => close());

describe('figures and text for a paper', () => {
  it('exports the maps as SVG: well-formed XML, every label the canvas paints as <text>, the same picture as the canvas', async () => {
    // Record every string the canvas painters write while the PNG export (a canvas) is drawn.
    await page.evaluate(() => {
      const seen: string[] = ((window as unknown as { __canvasTexts: string[] }).__canvasTexts = []);
      const original = CanvasRenderingContext2D.prototype.fillText;
      CanvasRenderingContext2D.prototype.fillText = function (text: string, x: number, y: number, maxWidth?: number) {
        seen.push(text);
        return maxWidth === undefined ? original.call(this, text, x, y) : original.call(this, text, x, y, maxWidth);
      };
    });
    const png = await download('export-png');
    const canvasTexts = await page.evaluate(() => (window as unknown as { __canvasTexts: string[] }).__canvasTexts);
    const svgFile = await download('export-svg');
    expect(svgFile.name).toMatch(/^maps-Fz-lamp-watch-decibel\.svg$/);
    const svg = svgFile.bytes.toString('utf8');

    // A page of its own, with no policy and no app code: Chromium's DOMParser (an XML parser independent of ours,
    // DOM Parsing and Serialization standard) reads the file; Chromium's image decoder draws both files.
    const blank = await context.newPage();
    const parsed = await parseSvg(blank, svg);
    expect(parsed.error).toBeNull();
    expect([parsed.root, parsed.ns]).toEqual(['svg', 'http://www.w3.org/2000/svg']);
    // Every string the canvas painted is a <text> of the SVG, as many times (tick labels, titles, units, caption).
    expect([...parsed.texts].sort()).toEqual([...canvasTexts].sort());
    // Time ticks at 1-2-5 steps over the −0.5 … 1.5 s epoch include 0 s and 1 s whatever the step (d3-array's tick
    // steps, common practice for axes); the axis titles and the colour bars' units.
    for (const label of ['0', '1', 'time (s)', 'frequency (Hz)', 'µV²', 'dB']) expect(parsed.texts).toContain(label);
    const numeric = parsed.texts.filter((t) => /^-?\d+(\.\d+)?$/.test(t));
    expect(numeric.length).toBeGreaterThanOrEqual(12);
    expect(parsed.images).toEqual(['data:image/png;base64,', 'data:image/png;base64,']);
    expect(parsed.fontFaces).toEqual(["@font-face{font-family:'JetBrains Mono Variable'", "@font-face{font-family:'Inter Variable'"]);

    // Same picture: both drawn onto canvases of the PNG's size (2560 × 752); a pixel matches when every channel is
    // within 8/255. Tolerance: at least 98 % of pixels (text antialiasing of SVG and canvas differs by a few %).
    const comparison = await samePicture(blank, `data:image/png;base64,${png.bytes.toString('base64')}`, svg, 'figures-maps');
    expect([comparison.w, comparison.h]).toEqual([2560, 752]);
    expect(comparison.fraction).toBeGreaterThanOrEqual(0.98);
    await blank.close();
  });

  it('exports the spectrum, the scalp map and the band bars as SVG that parse, with their labels as text', async () => {
    const blank = await context.newPage();
    await page.getByRole('tab', { name: 'Spectrum' }).click();
    const plot = page.getByTestId('spectrum-plot');
    await plot.waitFor();
    await page.getByTestId('fit-readout').waitFor();
    await page.screenshot({ path: path.join(artifactsDir, 'figures-spectrum-screen.png') });
    const spectrum = (await download('spectrum-plot-svg')).bytes.toString('utf8');
    const parsed = await parseSvg(blank, spectrum);
    expect(parsed.error).toBeNull();
    for (const label of ['frequency (Hz)', 'power (µV²/Hz)']) expect(parsed.texts).toContain(label);
    expect(parsed.fontFaces).toHaveLength(2);
    // The same picture as the live canvas (device pixel ratio 1 here), same 98 % / 8/255 tolerance as the maps.
    const live = await plot.evaluate((c: HTMLCanvasElement) => c.toDataURL('image/png'));
    const comparison = await samePicture(blank, live, spectrum, 'figures-spectrum');
    expect(comparison.fraction).toBeGreaterThanOrEqual(0.98);

    // The scalp map: its vector layer as drawn, the interpolated disc as an embedded PNG, the electrodes named.
    const scalp = await parseSvg(blank, (await download('scalp-exponent-svg')).bytes.toString('utf8'));
    expect(scalp.error).toBeNull();
    for (const label of DEMO.channels) expect(scalp.texts).toContain(label);
    expect(scalp.images).toEqual(['data:image/png;base64,']);

    await page.getByRole('tab', { name: 'Bands' }).click();
    await page.getByTestId('band-plot').waitFor();
    const bars = await parseSvg(blank, (await download('export-bands-svg')).bytes.toString('utf8'));
    expect(bars.error).toBeNull();
    for (const label of ['lamp-watch', 'oar-pull', 'mean (dB)', 'Fz']) expect(bars.texts).toContain(label);
    expect(bars.texts.some((t) => /Hz$/.test(t))).toBe(true);
    await page.screenshot({ path: path.join(artifactsDir, 'figures-bands.png'), fullPage: true });
    await page.getByRole('tab', { name: 'Maps' }).click();
    await blank.close();
  });

  it('exports the full time × frequency matrix of the raw and the normalized map as CSV, same numbers as the result', async () => {
    const label = 'lamp-watch';
    for (const which of ['raw', 'normalized'] as const) {
      await page.getByTestId('csv-map').selectOption(which);
      const file = await download('export-csv');
      expect(file.name).toBe(`maps-Fz-${label}-decibel-${which}.csv`);
      const text = file.bytes.toString('utf8');
      expect(text).toMatch(which === 'raw' ? /^# values in µV²;/m : /^# values in dB;/m);
      // papaparse: an RFC 4180 reader independent of our writer.
      const parsed = Papa.parse<string[]>(text, { comments: '#', skipEmptyLines: true });
      expect(parsed.errors).toEqual([]);
      const [header, ...rows] = parsed.data;
      expect(header.slice(1).map(Number)).toEqual(result.times);
      expect(rows.map((r) => Number(r[0]))).toEqual(result.frequencies);
      const expected = which === 'raw' ? result.conditions[label].power[0] : result.conditions[label].normalized[0];
      // The core in Node on the same samples and recipe: same numbers to 1e-9 relative (the explorer test's bound).
      for (let f = 0; f < rows.length; f++) {
        expect(rows[f]).toHaveLength(result.times.length + 1);
        for (let t = 0; t < result.times.length; t++) {
          const v = Number(rows[f][t + 1]);
          const e = expected[f][t];
          expect(Math.abs(v - e), `${which} f=${f} t=${t}`).toBeLessThanOrEqual(1e-9 * Math.max(1, Math.abs(e)));
        }
      }
      if (which === 'raw') {
        // And bit for bit the page's own result (the decomposition the map is painted from).
        const held = await page.evaluate(() => {
          const s = window.__tidemark!.stores.results.getState();
          return Array.from(s.cache[s.activeKey!].power[0][0]);
        });
        expect(rows.flatMap((r) => r.slice(1).map(Number))).toEqual(held);
      }
    }
  });

  it('shows the methods paragraph under the maps, naming every numeric recipe field, and copies it', async () => {
    const panel = page.getByTestId('methods-text');
    await panel.scrollIntoViewIfNeeded();
    const paragraph = (await page.getByTestId('methods-paragraph').textContent()) ?? '';
    const leaves = (x: unknown, at = ''): [string, number][] =>
      typeof x === 'number' ? [[at, x]] : Array.isArray(x) ? x.flatMap((v, i) => leaves(v, `${at}[${i}]`)) : x !== null && typeof x === 'object' ? Object.entries(x).flatMap(([k, v]) => leaves(v, at ? `${at}.${k}` : k)) : [];
    const numeric = leaves(recipe).filter(([p]) => p !== 'format');
    expect(numeric.length).toBeGreaterThan(10);
    for (const [at, value] of numeric) expect(paragraph, `${at} = ${value}`).toContain(at === 'spectrum.overlap' ? `${methodsNumber(value * 100)} %` : methodsNumber(value));
    // Resolution at both ends of the grid as the core in Node computes it (Cohen, 2019, NeuroImage 199:81–86), and
    // the trials kept per condition.
    const last = result.frequencies.length - 1;
    for (const v of [result.temporalFwhmSeconds[0], result.spectralFwhmHz[0], result.temporalFwhmSeconds[last], result.spectralFwhmHz[last]]) expect(paragraph).toContain(methodsNumber(v, 3));
    for (const [label, c] of Object.entries(result.conditions)) expect(paragraph).toContain(`${label}: ${c.trials} kept`);
    await page.getByTestId('methods-copy').click();
    await expect.poll(() => page.getByTestId('methods-status').textContent()).toContain('Copied');
    const copied = await page.evaluate(() => navigator.clipboard.readText());
    expect(copied.startsWith(paragraph)).toBe(true);
    expect(copied).toContain('Cohen, M. X. (2019)');
    await page.screenshot({ path: path.join(artifactsDir, 'figures-methods.png'), fullPage: true });
  });
});
