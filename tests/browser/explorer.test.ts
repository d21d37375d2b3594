import fs from 'node:fs';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser, Page } from 'playwright-core';
import { appUrl, artifactsDir, launchBrowser } from '../helpers/browser';
import { DEMO_PEOPLE } from '../../src/db/seed';
import { runRecipe, type AnalysisResult } from '../../src/lib/analysis/run-recipe';
import { loadDemo } from '../../src/components/explorer/test-hooks';
import { useSourceStore } from '../../src/stores/source';

// The demo recording: 60 s of the invented Harbour Lights scenario, three channels, generated from its seed in the
// page (through the ?testhooks hook) and here in Node, so both sides analyse the same samples.
const DEMO = { seconds: 60, channels: ['Fz', 'Cz', 'Pz'], tmin: -0.5, tmax: 1.5 };

let browser: Browser;
let close: () => Promise<void>;
let page: Page;

/** The readout's numbers after pointing at the centre of map cell (f, t). */
async function readCell(fi: number, ti: number) {
  const canvas = page.getByTestId('map-normalized');
  const box = (await canvas.boundingBox())!;
  const attr = async (n: string) => Number(await canvas.getAttribute(n));
  const [left, top, w, h, nt, nf] = await Promise.all(['data-plot-left', 'data-plot-top', 'data-plot-width', 'data-plot-height', 'data-times', 'data-frequencies'].map(attr));
  await page.mouse.move(box.x + left + ((ti + 0.5) * w) / nt, box.y + top + ((nf - 1 - fi + 0.5) * h) / nf);
  const readout = page.getByTestId('map-readout');
  await page.waitForFunction(() => document.querySelector('[data-testid="map-readout"]')?.getAttribute('data-fresh') === 'yes');
  return {
    time: Number(await readout.getAttribute('data-time')),
    frequency: Number(await readout.getAttribute('data-frequency')),
    raw: Number(await readout.getAttribute('data-raw')),
    normalized: Number(await readout.getAttribute('data-normalized')),
    text: (await readout.textContent()) ?? '',
  };
}

async function download(testId: string): Promise<{ name: string; bytes: Buffer }> {
  const [dl] = await Promise.all([page.waitForEvent('download'), page.getByTestId(testId).click()]);
  const file = path.join(artifactsDir, dl.suggestedFilename());
  await dl.saveAs(file);
  return { name: dl.suggestedFilename(), bytes: fs.readFileSync(file) };
}

/** The core's result for a recipe in Node, on the same demo recording and the same epoch decisions. */
function nodeResult(recipe: unknown): AnalysisResult {
  loadDemo(DEMO);
  const recording = useSourceStore.getState().analysisRecording()!;
  return runRecipe(recording, recipe);
}

const nearest = (xs: number[], v: number) => xs.reduce((best, x, i) => (Math.abs(x - v) < Math.abs(xs[best] - v) ? i : best), 0);

beforeAll(async () => {
  ({ browser, close } = await launchBrowser());
  fs.mkdirSync(artifactsDir, { recursive: true });
  const context = await browser.newContext({ viewport: { width: 1500, height: 1000 }, acceptDownloads: true });
  page = await context.newPage();
  const analyst = DEMO_PEOPLE.find((p) => p.role === 'analyst')!;
  await page.goto(`${appUrl}/sign-in`);
  await page.getByLabel('E-mail').fill(analyst.email);
  await page.getByLabel('Password').fill(analyst.password);
  await page.getByRole('button', { name: 'Sign in' }).click();
  await page.waitForURL(/\/teams\//);
  await page.getByRole('link', { name: 'Harbour-bell anticipation' }).first().click();
  await page.waitForURL(/\/studies\//);
  await page.goto(`${page.url().replace(/\/$/, '')}/workspace?testhooks`);
  await page.waitForFunction(() => window.__tidemark !== undefined);
  const loaded = await page.evaluate((demo) => window.__tidemark!.loadDemo(demo), DEMO);
  expect(loaded.settingsError).toBeNull();
  expect(loaded.kept).toBeGreaterThan(10);
});
afterAll(() => close());

describe('the explorer on a demo recording', () => {
  let recipe: { baseline: { start: number; end: number; method: string; scope: string } } & Record<string, unknown>;
  let result: AnalysisResult;

  it('runs a decomposition from the Recipe panel with a progress bar per channel', async () => {
    await page.getByRole('tab', { name: 'Recipe' }).click();
    await page.getByTestId('recipe-fcount').fill('16');
    // Record every progress value the bars show while the run goes.
    await page.evaluate(() => {
      const seen: number[] = ((window as unknown as { __fractions: number[] }).__fractions = []);
      new MutationObserver((records) => {
        for (const r of records) {
          const v = (r.target as Element).getAttribute?.('data-fraction');
          if (v !== null && v !== undefined) seen.push(Number(v));
        }
      }).observe(document.body, { subtree: true, attributes: true, attributeFilter: ['data-fraction'], childList: true });
    });
    await page.getByTestId('recipe-run').click();
    await page.waitForFunction(() => document.querySelector('[data-testid="recipe-status"]')?.getAttribute('data-status') === 'done', undefined, { timeout: 60_000 });
    const bars = page.getByTestId('recipe-progress').locator('progress');
    expect(await bars.count()).toBe(3);
    for (let i = 0; i < 3; i++) expect(Number(await bars.nth(i).getAttribute('data-fraction'))).toBe(1);
    const seen = await page.evaluate(() => (window as unknown as { __fractions: number[] }).__fractions);
    expect(seen.some((f) => f > 0 && f < 1)).toBe(true);
    await page.screenshot({ path: path.join(artifactsDir, 'explorer-recipe.png'), fullPage: true });
  });

  it('shows the normalized value under the cursor equal to the core run in Node, and a dragged baseline changes it', async () => {
    await page.getByRole('tab', { name: 'Maps' }).click();
    await page.getByTestId('map-normalized').waitFor();
    // Cell near 6 Hz and 0.4 s after the lamp-watch cue (where the demo's theta burst sits).
    const exported = await download('export-recipe');
    recipe = JSON.parse(exported.bytes.toString('utf8'));
    result = nodeResult(recipe);
    const fi = nearest(result.frequencies, 6);
    const ti = nearest(result.times, 0.4);
    const before = await readCell(fi, ti);
    expect(before.frequency).toBeCloseTo(result.frequencies[fi], 9);
    expect(before.time).toBeCloseTo(result.times[ti], 9);
    const cond = result.conditions['lamp-watch'];
    expect(before.raw).toBeCloseTo(cond.power[0][fi][ti], 6);
    expect(before.normalized).toBeCloseTo(cond.normalized[0][fi][ti], 9);
    expect(before.text).toContain('dB');

    // Drag the band's body 60 px to the right with the pointer.
    const band = page.getByTestId('map-normalized-baseline');
    const b = (await band.boundingBox())!;
    await page.mouse.move(b.x + b.width / 2, b.y + 20);
    await page.mouse.down();
    for (let i = 1; i <= 6; i++) await page.mouse.move(b.x + b.width / 2 + 10 * i, b.y + 20);
    await page.mouse.up();
    const start = Number(await page.getByTestId('baseline-start').inputValue());
    expect(start).toBeGreaterThan(recipe.baseline.start);
    const after = await readCell(fi, ti);
    expect(after.normalized).not.toBeCloseTo(before.normalized, 6);
    const moved = await download('export-recipe');
    recipe = JSON.parse(moved.bytes.toString('utf8'));
    expect(recipe.baseline.start).toBe(start);
    result = nodeResult(recipe);
    expect(after.normalized).toBeCloseTo(result.conditions['lamp-watch'].normalized[0][fi][ti], 9);
    const marks = await page.evaluate(() => performance.getEntriesByName('tidemark:renormalize', 'measure').length);
    expect(marks).toBeGreaterThan(0);
  });

  it('moves the baseline one sample per arrow key and 50 ms with shift', async () => {
    const start0 = Number(await page.getByTestId('baseline-start').inputValue());
    await page.getByTestId('map-normalized-baseline').focus();
    await page.keyboard.press('ArrowLeft');
    expect(Number(await page.getByTestId('baseline-start').inputValue())).toBeCloseTo(start0 - 1 / 500, 9);
    await page.keyboard.press('Shift+ArrowLeft');
    expect(Number(await page.getByTestId('baseline-start').inputValue())).toBeCloseTo(start0 - 1 / 500 - 0.05, 9);
  });

  it('switches methods instantly and keeps matching the core', async () => {
    const fi = nearest(result.frequencies, 6);
    const ti = nearest(result.times, 0.4);
    for (const [method, label, unit] of [['percent', 'percent', '%'], ['zscore', 'z-score', ' z'], ['ratio', 'ratio', '×']] as const) {
      await page.getByText(label, { exact: true }).click();
      const cell = await readCell(fi, ti);
      expect(cell.text).toContain(unit);
      const exported = JSON.parse((await download('export-recipe')).bytes.toString('utf8'));
      expect(exported.baseline.method).toBe(method);
      const r = nodeResult(exported);
      expect(cell.normalized).toBeCloseTo(r.conditions['lamp-watch'].normalized[0][fi][ti], 8);
    }
    await page.getByText('dB', { exact: true }).click();
  });

  it('draws the difference map A − B in the chosen unit', async () => {
    const fi = nearest(result.frequencies, 20);
    const ti = nearest(result.times, 0.5);
    await page.getByTestId('maps-compare').selectOption('oar-pull');
    const cell = await readCell(fi, ti);
    const exported = JSON.parse((await download('export-recipe')).bytes.toString('utf8'));
    const r = nodeResult(exported);
    const expected = r.conditions['lamp-watch'].normalized[0][fi][ti] - r.conditions['oar-pull'].normalized[0][fi][ti];
    expect(cell.normalized).toBeCloseTo(expected, 9);
    expect(cell.raw).toBeCloseTo(r.conditions['lamp-watch'].power[0][fi][ti] - r.conditions['oar-pull'].power[0][fi][ti], 6);
    await page.screenshot({ path: path.join(artifactsDir, 'explorer-difference.png'), fullPage: true });
    await page.getByTestId('maps-compare').selectOption('');
  });

  it('single-trial scope matches the core\'s trial scope', async () => {
    await page.getByText('single trial', { exact: true }).click();
    const fi = nearest(result.frequencies, 6);
    const ti = nearest(result.times, 0.4);
    await page.waitForFunction(() => document.querySelector('[data-testid="map-normalized"]') !== null, undefined, { timeout: 30_000 });
    const cell = await readCell(fi, ti);
    const exported = JSON.parse((await download('export-recipe')).bytes.toString('utf8'));
    expect(exported.baseline.scope).toBe('trial');
    const r = nodeResult(exported);
    // Trial power is held as Float32 for the live view, the core sums Float64: agreement to ~1e-6 relative.
    const expected = r.conditions['lamp-watch'].normalized[0][fi][ti];
    expect(Math.abs(cell.normalized - expected)).toBeLessThan(1e-4 * Math.max(1, Math.abs(expected)));
    await page.getByText('trial average', { exact: true }).click();
  });

  it('exports a PNG of both maps with axes and colour bars (size read from the PNG IHDR chunk)', async () => {
    const png = await download('export-png');
    // PNG signature, then the IHDR chunk: length, "IHDR", width and height as big-endian 32-bit (PNG spec, ISO/IEC 15948 §11.2.2).
    expect([...png.bytes.subarray(0, 8)]).toEqual([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a]);
    expect(png.bytes.subarray(12, 16).toString('latin1')).toBe('IHDR');
    expect(png.bytes.readUInt32BE(16)).toBe(2 * 640 * 2);
    expect(png.bytes.readUInt32BE(20)).toBe((340 + 36) * 2);
    expect(png.bytes.length).toBeGreaterThan(20_000);
  });
});
