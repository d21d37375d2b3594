// The Maps screen as a person sees it at 1440 × 900 and 1100 × 800 (issue 13 item 1, issue 14 items 1–4): wide maps,
// warnings beside them, a clean exported recipe, phase consistency with Rayleigh marks, induced power with the
// evoked trace under the maps, channel groups and the shared-baseline contrast. Numbers are checked against the
// core run in Node on the same demo recording and against formulas written out here.
import fs from 'node:fs';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser, Locator, Page } from 'playwright-core';
import { artifactsDir, launchBrowser, downloadFrom } from '../helpers/browser';
import { bandWindowMean } from '../helpers/band-cells';
import { runRecipe, type AnalysisResult } from '../../src/lib/analysis/run-recipe';
import { demoRecording } from '../../src/components/explorer/test-hooks';
import { readMapCell, loadDemoInWorkspace } from '../helpers/workspace';

// The invented Harbour Lights demo (60 s, three channels), generated from its seed in the page and here in Node.
const DEMO = { seconds: 60, channels: ['Fz', 'Cz', 'Pz'], epochStart: -0.5, epochEnd: 1.5 };

let browser: Browser;
let close: () => Promise<void>;
let page: Page;

const download = (testId: string) => downloadFrom(page, testId, artifactsDir);
const exported = async () => JSON.parse((await download('export-recipe')).bytes.toString('utf8'));

/** The core on the whole demo recording in Node: the recipe carries the conditions and rejection, as in the page. */
function nodeResult(recipe: unknown): AnalysisResult {
  return runRecipe(demoRecording(DEMO).recording, recipe);
}

const nearest = (xs: number[], v: number) => xs.reduce((best, x, i) => (Math.abs(x - v) < Math.abs(xs[best] - v) ? i : best), 0);

/** The plot rectangle of a map canvas in page pixels (its data-plot-* attributes are CSS pixels inside it). */
async function plotArea(canvas: Locator) {
  const box = (await canvas.boundingBox())!;
  const n = async (a: string) => Number(await canvas.getAttribute(a));
  return { x: box.x + (await n('data-plot-left')), y: box.y + (await n('data-plot-top')), width: await n('data-plot-width'), height: await n('data-plot-height') };
}

const intersects = (a: { x: number; y: number; width: number; height: number }, b: { x: number; y: number; width: number; height: number }) =>
  a.x < b.x + b.width && b.x < a.x + a.width && a.y < b.y + b.height && b.y < a.y + a.height;

/**
 * Rayleigh's test p, written out from Zar (Biostatistical Analysis, 4th ed., 1999, eq. 27.4, after Greenwood &
 * Durand 1955; from memory): p ≈ exp(√(1 + 4n + 4(n² − R²)) − (1 + 2n)), R = n·r.
 */
const rayleighP = (n: number, r: number) => Math.exp(Math.sqrt(1 + 4 * n + 4 * (n * n - n * n * r * r)) - (1 + 2 * n));

beforeAll(async () => {
  ({ browser, close } = await launchBrowser());
  fs.mkdirSync(artifactsDir, { recursive: true });
  const context = await browser.newContext({ viewport: { width: 1440, height: 900 }, acceptDownloads: true });
  page = await context.newPage();
  const loaded = await loadDemoInWorkspace(page, DEMO);
  expect(loaded.settingsError).toBeNull();
});
afterAll(() => close());

describe('the Maps screen', () => {
  let recipe: Record<string, unknown> & { baseline: { start: number; end: number } };
  let result: AnalysisResult;

  it('runs a recipe with phase consistency and induced power, and the end of the run shows the maps', async () => {
    // One epoch rejected by hand, so the run reports a routine rejection count.
    await page.locator('[data-testid="epoch-row"][data-verdict="kept"]').first().getByRole('combobox').selectOption('reject');
    await page.getByRole('tab', { name: 'Recipe' }).click();
    await page.getByTestId('recipe-fcount').fill('14');
    await page.getByTestId('recipe-itpc').check();
    await page.getByText('epochs minus the evoked response (induced)').click();
    await page.getByTestId('recipe-run').click();
    await page.waitForFunction(() => document.querySelector('[data-testid="recipe-status"]')?.getAttribute('data-status') === 'done', undefined, { timeout: 90_000 });
    await expect.poll(() => page.getByRole('tab', { name: 'Maps' }).getAttribute('aria-selected')).toBe('true');
    await page.getByTestId('map-itpc').waitFor();
    recipe = await exported();
    expect(recipe.itpc).toBe(true);
    expect(recipe.trialPower).toBe('induced');
    result = nodeResult(recipe);
    expect(result.conditions['lamp-watch'].itpc).toBeDefined();
    expect(result.conditions['lamp-watch'].evoked).toBeDefined();
    expect(result.warnings.some((w) => /^rejection ".*": 1 of \d+ epochs rejected/.test(w))).toBe(true);
  });

  it('at 1440 × 900 draws the two maps side by side, each canvas at least 640 px wide, with a visible baseline band', async () => {
    const raw = (await page.getByTestId('map-raw').boundingBox())!;
    const norm = (await page.getByTestId('map-normalized').boundingBox())!;
    expect(raw.width).toBeGreaterThanOrEqual(640);
    expect(norm.width).toBeGreaterThanOrEqual(640);
    expect(Math.abs(raw.y - norm.y)).toBeLessThan(1);
    expect(norm.x).toBeGreaterThan(raw.x + raw.width);
    // The handles are drawn, not only hit areas: an ink tab at least 8 × 20 px on each edge of the band.
    for (const kind of ['start', 'end']) {
      const handle = page.getByTestId(`map-normalized-baseline-${kind}-handle`);
      const box = (await handle.boundingBox())!;
      expect(box.width).toBeGreaterThanOrEqual(8);
      expect(box.height).toBeGreaterThanOrEqual(20);
      expect(await handle.evaluate((el) => getComputedStyle(el).backgroundColor)).toBe('rgb(16, 40, 58)'); // ink #10283a
    }
    await page.screenshot({ path: path.join(artifactsDir, 'maps-1440x900.png'), fullPage: true });
  });

  it('puts baseline warnings beside the plots, never over a plot area, and routine rejection counts in a neutral colour', async () => {
    await page.getByTestId('baseline-end').fill('0.1');
    const warnings = page.getByTestId('map-normalized-warnings');
    await expect.poll(async () => ((await warnings.count()) === 0 ? '' : await warnings.textContent())).toContain('reaches past the event');
    const boxes = [await warnings.boundingBox(), ...(await Promise.all((await page.locator('[data-testid="run-warnings"], [data-testid="run-notices"]').all()).map((l) => l.boundingBox())))];
    for (const id of ['map-raw', 'map-normalized', 'map-itpc']) {
      const area = await plotArea(page.getByTestId(id));
      for (const box of boxes) expect(intersects(box!, area), `${id} and a warning box`).toBe(false);
    }
    await page.screenshot({ path: path.join(artifactsDir, 'maps-1440x900-warning.png'), fullPage: true });
    await page.getByTestId('baseline-end').fill(String(recipe.baseline.end));
    await expect.poll(async () => ((await warnings.count()) === 0 ? '' : await warnings.textContent())).not.toContain('reaches past the event');
    // The demo's artefacts make the default rules reject some epochs (cohort.ts): their count is routine, not coral.
    const notices = page.getByTestId('run-notices');
    expect(await notices.textContent()).toMatch(/epochs rejected/);
    expect(await notices.evaluate((el) => getComputedStyle(el).color)).toBe('rgb(59, 83, 102)'); // ink-soft #3b5366
  });

  it('exports the recipe with grid values as plain decimals (no float noise) after the band moves by whole samples', async () => {
    await page.getByTestId('map-normalized-baseline').focus();
    for (let i = 0; i < 16; i++) await page.keyboard.press('ArrowRight');
    await expect.poll(async () => Number(await page.getByTestId('baseline-start').inputValue())).toBeGreaterThan(recipe.baseline.start);
    const text = (await download('export-recipe')).bytes.toString('utf8');
    // Every number in the file has at most 12 significant digits (float noise shows as 16–17, e.g. -0.46799999999999997).
    const numbers = text.match(/-?\d+\.\d+(e-?\d+)?/g) ?? [];
    expect(numbers.length).toBeGreaterThan(3);
    for (const n of numbers) expect(n.replace(/^-?0\.0*|[-.]|e.*$/g, '').length, n).toBeLessThanOrEqual(12);
    const moved = JSON.parse(text);
    // 16 samples at 500 Hz = 32 ms later than the default start, written as the decimal a person would type.
    expect(moved.baseline.start).toBe(Number((recipe.baseline.start + 0.032).toFixed(3)));
    // The download took the focus: give it back to the band, then return to the run's baseline.
    await page.getByTestId('map-normalized-baseline').focus();
    for (let i = 0; i < 16; i++) await page.keyboard.press('ArrowLeft');
    await expect.poll(async () => Number(await page.getByTestId('baseline-start').inputValue())).toBe(recipe.baseline.start);
  });

  it('draws ITPC on its own 0–1 scale, outlining exactly the cells where Rayleigh’s p < 0.05', async () => {
    const map = page.getByTestId('map-itpc');
    expect([await map.getAttribute('data-scale-low'), await map.getAttribute('data-scale-high')]).toEqual(['0', '1']);
    const itpc = result.conditions['lamp-watch'].itpc![0];
    const n = result.conditions['lamp-watch'].trials;
    const expected = itpc.flat().filter((r) => rayleighP(n, r) < 0.05).length;
    // Not vacuous: the demo's ~6 Hz burst after each lamp-watch cue is phase-locked somewhere, and not everywhere.
    expect(expected).toBeGreaterThan(0);
    expect(expected).toBeLessThan(itpc.flat().length);
    expect(Number(await map.getAttribute('data-outlined'))).toBe(expected);
    const fi = nearest(result.frequencies, 6);
    const ti = nearest(result.times, 0.2);
    const cell = await readMapCell(page, fi, ti);
    const shown = Number(await page.getByTestId('map-readout').getAttribute('data-itpc'));
    expect(shown).toBeCloseTo(itpc[fi][ti], 12);
    // Induced power: the shown raw and normalized values are the core's induced ones.
    expect(cell.raw).toBeCloseTo(result.conditions['lamp-watch'].power[0][fi][ti], 6);
    expect(cell.normalized).toBeCloseTo(result.conditions['lamp-watch'].normalized[0][fi][ti], 9);
  });

  it('draws the evoked response under the maps on the same time axis', async () => {
    const evoked = page.getByTestId('evoked-trace');
    const eBox = (await evoked.boundingBox())!;
    const nBox = (await page.getByTestId('map-normalized').boundingBox())!;
    const left = async (l: Locator) => Number(await l.getAttribute('data-plot-left'));
    const width = async (l: Locator) => Number(await l.getAttribute('data-plot-width'));
    expect(eBox.x + (await left(evoked))).toBeCloseTo(nBox.x + (await left(page.getByTestId('map-normalized'))), 3);
    expect(await width(evoked)).toBe(await width(page.getByTestId('map-normalized')));
    expect(eBox.y).toBeGreaterThan(nBox.y + nBox.height - 1);
  });

  it('explains the single-trial scope beside the map', async () => {
    await page.getByText('single trial', { exact: true }).click();
    await expect.poll(() => page.getByTestId('single-trial-note').textContent()).toContain('nearly uniform');
    await page.getByText('trial average', { exact: true }).click();
    await expect.poll(() => page.getByTestId('single-trial-note').count()).toBe(0);
  });

  it('at 1100 × 800 puts the maps one above the other', async () => {
    await page.setViewportSize({ width: 1100, height: 800 });
    await page.waitForTimeout(300);
    const raw = (await page.getByTestId('map-raw').boundingBox())!;
    const norm = (await page.getByTestId('map-normalized').boundingBox())!;
    expect(norm.y).toBeGreaterThan(raw.y + raw.height - 1);
    expect(await page.evaluate(() => document.documentElement.scrollWidth - window.innerWidth)).toBeLessThanOrEqual(0);
    await page.screenshot({ path: path.join(artifactsDir, 'maps-1100x800.png'), fullPage: true });
    await page.setViewportSize({ width: 1440, height: 900 });
  });
});

describe('channel groups and contrasts on the Maps screen', () => {
  it('saves an edited group in the recipe and draws the mean of its channels’ normalized maps', async () => {
    await page.getByRole('tab', { name: 'Recipe' }).click();
    // Defaults from the 10-20 names: Fz is frontal midline, Pz parietal midline (channel-groups.ts).
    await expect.poll(() => page.getByTestId('recipe-group-name').evaluateAll((els) => els.map((e) => (e as HTMLInputElement).value))).toEqual(['frontal midline', 'parietal midline']);
    await page.getByTestId('recipe-group-add').click();
    await page.getByTestId('recipe-group-name').nth(2).fill('midline');
    await page.getByTestId('recipe-group-channels').nth(2).fill('Fz, Cz, Xz');
    // A channel the run does not analyse: named with its group and place, and the run waits.
    await expect.poll(() => page.getByTestId('recipe-groups-error').allTextContents()).toContainEqual(expect.stringMatching(/midline.*Xz|Xz.*midline/));
    expect(await page.getByTestId('recipe-run').isDisabled()).toBe(true);
    await page.getByTestId('recipe-groups').scrollIntoViewIfNeeded();
    await page.screenshot({ path: path.join(artifactsDir, 'maps-recipe-groups-1440x900.png') });
    await page.getByTestId('recipe-group-channels').nth(2).fill('Fz, Cz, Pz');
    await expect.poll(() => page.getByTestId('recipe-groups-error').count()).toBe(0);
    expect(await page.getByTestId('recipe-run').textContent()).toBe('Show with these channel groups');
    // Groups do not change the decomposition: the kept one is shown at once with the new groups.
    await page.getByTestId('recipe-run').click();
    await expect.poll(() => page.getByRole('tab', { name: 'Maps' }).getAttribute('aria-selected')).toBe('true');
    await page.getByTestId('maps-channel').selectOption('group:midline');
    await expect.poll(async () => (await page.getByTestId('map-normalized').getAttribute('aria-label')) ?? '').toContain('midline');
    const recipe = await exported();
    expect(recipe.channelGroups).toEqual({ 'frontal midline': ['Fz'], 'parietal midline': ['Pz'], midline: ['Fz', 'Cz', 'Pz'] });
    const r = nodeResult(recipe);
    const fi = nearest(r.frequencies, 6);
    const ti = nearest(r.times, 0.4);
    const cell = await readMapCell(page, fi, ti);
    const lamp = r.conditions['lamp-watch'];
    expect(cell.normalized).toBeCloseTo((lamp.normalized[0][fi][ti]! + lamp.normalized[1][fi][ti]! + lamp.normalized[2][fi][ti]!) / 3, 9);
    expect(cell.raw).toBeCloseTo((lamp.power[0][fi][ti] + lamp.power[1][fi][ti] + lamp.power[2][fi][ti]) / 3, 6);
    await page.screenshot({ path: path.join(artifactsDir, 'maps-group-1440x900.png'), fullPage: true });
    await page.getByTestId('maps-channel').selectOption('Fz');
  });

  it('contrasts A − B against a shared baseline in percent change, as the formula gives from the core’s power', async () => {
    await page.getByText('percent change', { exact: true }).click();
    await page.getByTestId('maps-compare').selectOption('oar-pull');
    await page.getByText('shared baseline', { exact: true }).click();
    await expect.poll(async () => (await page.getByTestId('map-normalized').getAttribute('aria-label')) ?? '').toContain('shared baseline');
    const recipe = await exported();
    const r = nodeResult(recipe);
    const fi = nearest(r.frequencies, 20);
    const ti = nearest(r.times, 0.5);
    const cell = await readMapCell(page, fi, ti);
    // Shared baseline (DEVELOPERS.md, "Recipe extensions"): B = (B_A + B_B)/2 per frequency, B_X the mean power over
    // the baseline's grid points; percent change 100·(P − B)/B (analysis contract), so A − B = 100·(P_A − P_B)/B.
    const first = Math.round((recipe.baseline.start - r.times[0]) * 500);
    const last = Math.round((recipe.baseline.end - r.times[0]) * 500);
    const mean = (row: number[]) => row.slice(first, last + 1).reduce((s, v) => s + v, 0) / (last - first + 1);
    const pa = r.conditions['lamp-watch'].power[0][fi];
    const pb = r.conditions['oar-pull'].power[0][fi];
    const shared = (mean(pa) + mean(pb)) / 2;
    expect(cell.normalized).toBeCloseTo((100 * (pa[ti] - pb[ti])) / shared, 8);
    // The own-baseline contrast differs wherever the two baselines differ.
    const own = (100 * (pa[ti] - mean(pa))) / mean(pa) - (100 * (pb[ti] - mean(pb))) / mean(pb);
    expect(Math.abs(own - cell.normalized)).toBeGreaterThan(1e-6);
    const low = Number(await page.getByTestId('map-normalized').getAttribute('data-scale-low'));
    const high = Number(await page.getByTestId('map-normalized').getAttribute('data-scale-high'));
    expect(low).toBeCloseTo(-high, 12);
    await page.screenshot({ path: path.join(artifactsDir, 'maps-contrast-1440x900.png'), fullPage: true });
  });

  it('exports per-trial band × window values whose mean over trials is the core’s single-trial-scope band value', async () => {
    await page.getByTestId('maps-compare').selectOption('');
    const recipe = await exported();
    expect(recipe.baseline.method).toBe('percent-change');
    const csv = (await download('export-trial-values')).bytes.toString('utf8').trim().split(/\r?\n/);
    expect(csv[0]).toBe('channel,condition,trial,event_onset_s,band,band_low_hz,band_high_hz,window,window_start_s,window_end_s,method,baseline_start_s,baseline_end_s,value,unit');
    // Trial scope of the same recipe in Node: with a linear method the mean of the per-trial values is the band
    // value of the trial-scope map (summary.ts says so; here checked by averaging the map's cells by hand).
    const r = nodeResult({ ...recipe, baseline: { ...recipe.baseline, scope: 'trial' } });
    const trials = r.conditions['lamp-watch'].trials + r.conditions['oar-pull'].trials;
    // Default bands theta, alpha, beta, gamma × windows early, late (view.ts).
    expect(csv).toHaveLength(1 + trials * 4 * 2);
    const rows = csv.slice(1).map((l) => l.split(','));
    const theta = rows.filter((c) => c[0] === 'Fz' && c[1] === 'lamp-watch' && c[4] === 'theta' && c[7] === 'early');
    expect(theta).toHaveLength(r.conditions['lamp-watch'].trials);
    expect(new Set(theta.map((c) => c[3])).size).toBe(theta.length); // one row per epoch, told apart by onset
    const shown = theta.reduce((sum, c) => sum + Number(c[13]), 0) / theta.length;
    const { mean, n } = bandWindowMean(r, 'lamp-watch', 0, [4, 8], [0.1, 0.5]);
    expect(n).toBeGreaterThan(0);
    // Single trials are held as Float32 in the worker: agreement to about 1e-6 relative.
    expect(Math.abs(shown - mean)).toBeLessThan(1e-4 * Math.max(1, Math.abs(mean)));
    expect(theta.every((c) => c[10] === 'percent-change' && c[14] === '%')).toBe(true);
  });
});
