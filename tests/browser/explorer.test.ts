import { execFileSync } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser, Page } from 'playwright-core';
import { artifactsDir, launchBrowser, downloadFrom } from '../helpers/browser';
import { bandWindowMean } from '../helpers/band-cells';
import { runRecipe, type AnalysisResult } from '../../src/lib/analysis/run-recipe';
import { loadDemo } from '../../src/components/explorer/test-hooks';
import { readMapCell, recordProgress, progressSeen, loadDemoInWorkspace } from '../helpers/workspace';
import { useWorkspace } from '../../src/lib/client/workspace/store';

// The demo recording: 60 s of the invented Harbour Lights scenario, three channels, generated from its seed in the
// page (through the ?testhooks hook) and here in Node, so both sides analyse the same samples.
const DEMO = { seconds: 60, channels: ['Fz', 'Cz', 'Pz'], epochStart: -0.5, epochEnd: 1.5 };

let browser: Browser;
let close: () => Promise<void>;
let page: Page;


/** The recipe as the Maps screen exports it (the current view's baseline, method and scope). */
async function exportedRecipe() {
  const current = await page.getByRole('tab', { selected: true }).textContent();
  await page.getByRole('tab', { name: 'Maps' }).click();
  const recipe = JSON.parse((await download('export-recipe')).bytes.toString('utf8'));
  await page.getByRole('tab', { name: current ?? 'Maps' }).click();
  return recipe;
}

const download = (testId: string) => downloadFrom(page, testId, artifactsDir);

/** The core's result for a recipe in Node, on the same demo recording and the same epoch decisions. */
function nodeResult(recipe: unknown): AnalysisResult {
  loadDemo(DEMO);
  const recording = useWorkspace.getState().analysisRecording()!;
  return runRecipe(recording, recipe);
}

const nearest = (xs: number[], v: number) => xs.reduce((best, x, i) => (Math.abs(x - v) < Math.abs(xs[best] - v) ? i : best), 0);

beforeAll(async () => {
  ({ browser, close } = await launchBrowser());
  fs.mkdirSync(artifactsDir, { recursive: true });
  const context = await browser.newContext({ viewport: { width: 1500, height: 1000 }, acceptDownloads: true });
  page = await context.newPage();
  const loaded = await loadDemoInWorkspace(page, DEMO);
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
    await recordProgress(page);
    await page.getByTestId('recipe-run').click();
    await page.waitForFunction(() => document.querySelector('[data-testid="recipe-status"]')?.getAttribute('data-status') === 'done', undefined, { timeout: 60_000 });
    // The finished run moves on to Maps, which hides the Recipe panel: its bars are read hidden or not.
    const bars = page.getByTestId('recipe-progress').getByRole('progressbar', { includeHidden: true });
    expect(await bars.count()).toBe(3);
    for (let i = 0; i < 3; i++) expect(Number(await bars.nth(i).getAttribute('data-fraction'))).toBe(1);
    const seen = await progressSeen(page);
    expect(seen.some((f) => f > 0 && f < 1)).toBe(true);
    await page.screenshot({ path: path.join(artifactsDir, 'explorer-recipe.png'), fullPage: true });
  });

  it('validates the recipe against the recording with a message naming the field, cancels a run, and recalls a cached one', async () => {
    // A finished run moved on to the Maps screen; come back to the recipe.
    await expect.poll(() => page.getByRole('tab', { name: 'Maps' }).getAttribute('aria-selected')).toBe('true');
    await page.getByRole('tab', { name: 'Recipe' }).click();
    const fmax = await page.getByTestId('recipe-fmax').inputValue();
    await page.getByTestId('recipe-fmax').fill('300');
    // 500 Hz sampling: Nyquist is 250 Hz (Nyquist–Shannon), so 300 Hz must be refused before any work starts.
    await expect.poll(() => page.getByRole('alert').allTextContents()).toContainEqual(expect.stringContaining('Nyquist'));
    expect(await page.getByTestId('recipe-run').isDisabled()).toBe(true);
    await page.getByTestId('recipe-fmax').fill(fmax);
    await page.getByTestId('recipe-fcount').fill('60');
    await page.getByTestId('recipe-run').click();
    // The button re-renders with each progress report; dispatching the click does not wait for it to hold still.
    await page.getByTestId('recipe-cancel').dispatchEvent('click');
    await page.waitForFunction(() => document.querySelector('[data-testid="recipe-status"]')?.getAttribute('data-status') === 'cancelled');
    await page.getByTestId('recipe-fcount').fill('16');
    expect(await page.getByTestId('recipe-run').textContent()).toContain('Shown on Maps');
    await page.getByTestId('recipe-run').click();
    await page.waitForFunction(() => document.querySelector('[data-testid="recipe-status"]')?.textContent?.includes('From the cache'));
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
    const before = await readMapCell(page, fi, ti);
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
    await expect.poll(async () => Number(await page.getByTestId('baseline-start').inputValue())).toBeGreaterThan(recipe.baseline.start);
    const start = Number(await page.getByTestId('baseline-start').inputValue());
    const after = await readMapCell(page, fi, ti);
    expect(after.normalized).not.toBeCloseTo(before.normalized, 6);
    const moved = await download('export-recipe');
    recipe = JSON.parse(moved.bytes.toString('utf8'));
    expect(recipe.baseline.start).toBeCloseTo(start, 9);
    result = nodeResult(recipe);
    expect(after.normalized).toBeCloseTo(result.conditions['lamp-watch'].normalized[0][fi][ti], 9);
    const marks = await page.evaluate(() => performance.getEntriesByName('tidemark:renormalize', 'measure').length);
    expect(marks).toBeGreaterThan(0);
  });

  it('shows the value the command line computes for the exported recipe (CSV samples + BIDS events)', async () => {
    // The same kept epochs as the page: the Source store's analysis recording, written as a CSV of samples and a
    // BIDS events TSV (onset, duration, trial_type), then `npm run analyze` on them with the exported recipe.
    loadDemo(DEMO);
    const rec = useWorkspace.getState().analysisRecording()!;
    const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'tidemark-cli-'));
    const lines = [rec.channelNames.join(',')];
    for (let i = 0; i < rec.data[0].length; i++) lines.push(rec.data.map((x) => String(x[i])).join(','));
    fs.writeFileSync(path.join(dir, 'demo.csv'), lines.join('\n') + '\n');
    fs.writeFileSync(path.join(dir, 'events.tsv'), ['onset\tduration\ttrial_type', ...rec.events.map((e) => `${e.onsetSeconds}\t${e.durationSeconds}\t${e.label}`)].join('\n') + '\n');
    const exported = await download('export-recipe');
    fs.writeFileSync(path.join(dir, 'recipe.json'), exported.bytes);
    const tsx = path.resolve('node_modules', '.bin', 'tsx');
    execFileSync(tsx, ['src/cli/analyze.ts', path.join(dir, 'demo.csv'), '--rate', '500', '--events', path.join(dir, 'events.tsv'), '--recipe', path.join(dir, 'recipe.json'), '--out', path.join(dir, 'result.json')], { stdio: 'pipe' });
    const cli = JSON.parse(fs.readFileSync(path.join(dir, 'result.json'), 'utf8')) as AnalysisResult;
    const fi = nearest(cli.frequencies, 6);
    const ti = nearest(cli.times, 0.4);
    const cell = await readMapCell(page, fi, ti);
    expect(cell.normalized).toBeCloseTo(cli.conditions['lamp-watch'].normalized[0][fi][ti], 9);
    fs.rmSync(dir, { recursive: true, force: true });
  });

  it('moves the baseline one sample per arrow key and 50 ms with shift', async () => {
    const start0 = Number(await page.getByTestId('baseline-start').inputValue());
    await page.getByTestId('map-normalized-baseline').focus();
    const start = async () => Number(await page.getByTestId('baseline-start').inputValue());
    await page.keyboard.press('ArrowLeft');
    await expect.poll(async () => Math.abs((await start()) - (start0 - 1 / 500))).toBeLessThan(1e-9);
    await page.keyboard.press('Shift+ArrowLeft');
    await expect.poll(async () => Math.abs((await start()) - (start0 - 1 / 500 - 0.05))).toBeLessThan(1e-9);
  });

  it('warns on the map when the baseline reaches past the event or holds one sample for a z-score', async () => {
    const start = await page.getByTestId('baseline-start').inputValue();
    const end = await page.getByTestId('baseline-end').inputValue();
    const warnings = page.getByTestId('map-normalized-warnings');
    const text = async () => ((await warnings.count()) === 0 ? '' : ((await warnings.textContent()) ?? ''));
    await page.getByTestId('baseline-start').fill('-0.4');
    await page.getByTestId('baseline-end').fill('-0.2');
    await expect.poll(text).not.toContain('past the event');
    await page.getByTestId('baseline-end').fill('0.1');
    await expect.poll(text).toContain('reaches past the event at 0 s');
    await page.getByTestId('baseline-end').fill('-0.4');
    await page.getByText('z-score', { exact: true }).click();
    await expect.poll(text).toContain('a z-score needs at least 2');
    await page.getByText('dB', { exact: true }).click();
    await expect.poll(text).not.toContain('z-score');
    await page.getByTestId('baseline-end').fill(end);
    await page.getByTestId('baseline-start').fill(start);
    await expect.poll(async () => Math.abs(Number(await page.getByTestId('baseline-end').inputValue()) - Number(end))).toBeLessThan(1e-9);
    await expect.poll(async () => Math.abs(Number(await page.getByTestId('baseline-start').inputValue()) - Number(start))).toBeLessThan(1e-9);
  });

  it('switches methods instantly and keeps matching the core', async () => {
    const fi = nearest(result.frequencies, 6);
    const ti = nearest(result.times, 0.4);
    for (const [method, label, unit] of [['percent-change', 'percent change', '%'], ['z-score', 'z-score', ' z'], ['power-ratio', 'power ratio', '×']] as const) {
      await page.getByText(label, { exact: true }).click();
      const cell = await readMapCell(page, fi, ti);
      expect(cell.text).toContain(unit);
      const exported = JSON.parse((await download('export-recipe')).bytes.toString('utf8'));
      expect(exported.baseline.method).toBe(method);
      const r = nodeResult(exported);
      expect(cell.normalized).toBeCloseTo(r.conditions['lamp-watch'].normalized[0][fi][ti], 8);
    }
    await page.getByText('dB', { exact: true }).click();
  });

  it('draws a power ratio on a log scale centred on 1, and holds colour limits across channels when asked', async () => {
    const map = page.getByTestId('map-normalized');
    const limits = async () => [await map.getAttribute('data-scale-kind'), Number(await map.getAttribute('data-scale-low')), Number(await map.getAttribute('data-scale-high'))] as const;
    await page.getByText('power ratio', { exact: true }).click();
    await expect.poll(async () => (await limits())[0]).toBe('log');
    const [, lo, hi] = await limits();
    expect(lo * hi).toBeCloseTo(1, 12); // [1/m, m]: the centre of the colour bar is a ratio of 1
    await page.getByText('dB', { exact: true }).click();
    await expect.poll(async () => (await limits())[0]).toBe('linear');
    const fz = await limits();
    await page.getByTestId('hold-limits').check();
    await page.getByTestId('maps-channel').selectOption('Pz');
    await expect.poll(async () => (await page.getByTestId('map-normalized').getAttribute('aria-label')) ?? '').toContain('Pz');
    expect(await limits()).toEqual(fz);
    await page.getByTestId('hold-limits').uncheck();
    await expect.poll(async () => (await limits())[2]).not.toBe(fz[2]);
    await page.getByTestId('maps-channel').selectOption('Fz');
  });

  it('z-scores with the spread across trials when asked, as the core does', async () => {
    const fi = nearest(result.frequencies, 6);
    const ti = nearest(result.times, 0.4);
    await page.getByText('z-score', { exact: true }).click();
    await page.getByText('across trials', { exact: true }).click();
    const cell = await readMapCell(page, fi, ti, { textContains: ' z' });
    const exported = JSON.parse((await download('export-recipe')).bytes.toString('utf8'));
    expect(exported.baseline).toMatchObject({ method: 'z-score', spread: 'trials' });
    const expected = nodeResult(exported).conditions['lamp-watch'].normalized[0][fi][ti];
    // live maps come from single trials held as Float32: agreement to ~1e-6 relative
    expect(Math.abs(cell.normalized - expected)).toBeLessThan(1e-4 * Math.max(1, Math.abs(expected)));
    await page.getByText('over baseline time', { exact: true }).click();
    await page.getByText('dB', { exact: true }).click();
  });

  it('draws the difference map A − B in the chosen unit', async () => {
    const fi = nearest(result.frequencies, 20);
    const ti = nearest(result.times, 0.5);
    await page.getByTestId('maps-compare').selectOption('oar-pull');
    const cell = await readMapCell(page, fi, ti);
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
    const cell = await readMapCell(page, fi, ti);
    const exported = JSON.parse((await download('export-recipe')).bytes.toString('utf8'));
    expect(exported.baseline.scope).toBe('trial');
    const r = nodeResult(exported);
    // Trial power is held as Float32 for the live view, the core sums Float64: agreement to ~1e-6 relative.
    const expected = r.conditions['lamp-watch'].normalized[0][fi][ti];
    expect(Math.abs(cell.normalized - expected)).toBeLessThan(1e-4 * Math.max(1, Math.abs(expected)));
    await page.getByText('trial average', { exact: true }).click();
  });

  it('single-trial scope in percent change (from the trials\' coarse samples) matches the core\'s trial scope, also after a baseline move', async () => {
    await page.getByText('single trial', { exact: true }).click();
    await page.getByText('percent change', { exact: true }).click();
    const fi = nearest(result.frequencies, 6);
    const ti = nearest(result.times, 0.4);
    for (const move of [false, true]) {
      if (move) await page.getByTestId('map-normalized-baseline').press('ArrowRight');
      const cell = await readMapCell(page, fi, ti);
      const exported = JSON.parse((await download('export-recipe')).bytes.toString('utf8'));
      expect(exported.baseline).toMatchObject({ scope: 'trial', method: 'percent-change' });
      const expected = nodeResult(exported).conditions['lamp-watch'].normalized[0][fi][ti];
      // Float32 trial rows and coarse samples against the core's Float64 sums: ~1e-6 relative.
      expect(Math.abs(cell.normalized - expected), `baseline ${JSON.stringify(exported.baseline)}`).toBeLessThan(1e-4 * Math.max(1, Math.abs(expected)));
    }
    await page.getByTestId('map-normalized-baseline').press('ArrowLeft');
    await page.getByText('dB', { exact: true }).click();
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

describe('the spectrum and band screens', () => {
  it('draws the aperiodic fit of the recipe spectrum (kept epochs by default), equal to the core fit in Node, with a draggable range', async () => {
    const { welchPsd } = await import('../../src/lib/analysis/welch');
    const { fitAperiodic } = await import('../../src/lib/analysis/aperiodic');
    const { planRecipe } = await import('../../src/lib/analysis/run-recipe');
    await page.getByRole('tab', { name: 'Spectrum' }).click();
    await page.getByTestId('fit-readout').waitFor({ timeout: 30_000 });
    const recipe = await exportedRecipe();
    loadDemo(DEMO);
    const recording = useWorkspace.getState().analysisRecording()!;
    const plan = planRecipe(recording, recipe);
    // spectrum.source "epochs" (the browser's default): Welch over the kept epochs, as analyzeChannel computes it for the CLI.
    const fz = welchPsd(recording.data[recording.channelNames.indexOf('Fz')], 500, plan.spectrum.segmentSamples, plan.spectrum.overlapSamples, plan.spectrum.spans);
    expect(recipe.spectrum.source).toBe('epochs');
    expect(plan.spectrum.spans.length).toBe(2 * plan.epochStarts.reduce((n, s) => n + s.length, 0));
    const { channel: _fz, ...coreFit } = nodeResult(recipe).aperiodic.find((a) => a.channel === 'Fz')!;
    expect(fitAperiodic(fz.frequencies, fz.psd, [2, 40], 'power-law')).toEqual(coreFit);
    const expectFit = async (range: [number, number]) => {
      const expected = fitAperiodic(fz.frequencies, fz.psd, range, 'power-law');
      await page.waitForFunction((e) => Math.abs(Number(document.querySelector('[data-testid="fit-readout"]')?.getAttribute('data-exponent')) - e) < 1e-9, expected.exponent);
      return expected.exponent;
    };
    const before = await expectFit([2, 40]);
    // Drag the fit range's start handle to the right with the pointer.
    const handle = (await page.getByTestId('fit-range-low').boundingBox())!;
    await page.mouse.move(handle.x + handle.width / 2, handle.y + handle.height / 2);
    await page.mouse.down();
    // Far enough (to about 5 Hz) that the fit loses several low bins, not only one the robust fit may leave out.
    for (let i = 1; i <= 10; i++) await page.mouse.move(handle.x + handle.width / 2 + 30 * i, handle.y + handle.height / 2);
    await page.mouse.up();
    await expect.poll(async () => Number(await page.getByTestId('fit-low').inputValue())).toBeGreaterThan(2);
    const low = Number(await page.getByTestId('fit-low').inputValue());
    const after = await expectFit([low, 40]);
    expect(after).not.toBeCloseTo(before, 6);
    expect(await page.getByTestId('scalp-exponent').locator('circle').count()).toBeGreaterThanOrEqual(3);
    // The fit table sorts by exponent when its header is pressed (keyboard: it is a button).
    await page.getByTestId('fit-table').getByRole('button', { name: /^exponent/ }).press('Enter');
    const exponents = (await page.getByTestId('fit-table').locator('tbody tr td:nth-child(2)').allTextContents()).map(Number);
    expect(exponents).toHaveLength(DEMO.channels.length);
    expect([...exponents].sort((x, y) => x - y)).toEqual(exponents);
    expect(await page.getByTestId('fit-table').locator('th[aria-sort="ascending"]').count()).toBe(1);

    const csv = (await download('export-fits')).bytes.toString('utf8').trim().split(/\r?\n/);
    expect(csv[0]).toBe('channel,exponent,offset,knee,knee_hz,r2,rmse,r2_kept,points,excluded,peaks,fit_low_hz,fit_high_hz,model,trials');
    expect(csv).toHaveLength(1 + DEMO.channels.length);
    expect(Number(csv.find((l) => l.startsWith('Fz,'))!.split(',')[1])).toBeCloseTo(after, 9);

    // Fits per condition, from the run: each equals the fit of Welch over that condition's kept epochs alone, computed
    // here from the plan's spans (the same core functions, called independently of the worker pool).
    const byCondition = nodeResult(recipe).aperiodicByCondition!;
    expect(Object.keys(byCondition).sort()).toEqual([...plan.labels].sort());
    for (const [c, label] of plan.labels.entries()) {
      const own = welchPsd(recording.data[recording.channelNames.indexOf('Fz')], 500, plan.spectrum.segmentSamples, plan.spectrum.overlapSamples, plan.spectrum.conditionSpans![c]);
      const expected = fitAperiodic(own.frequencies, own.psd, [2, 40], 'power-law').exponent;
      expect(byCondition[label].find((f) => f.channel === 'Fz')!.exponent).toBe(expected);
      const shown = await page.getByTestId(`condition-fit-Fz-${label}`).getAttribute('data-exponent');
      expect(Number(shown)).toBe(expected);
    }
    await page.screenshot({ path: path.join(artifactsDir, 'explorer-spectrum.png'), fullPage: true });
  });

  it('summarises band × window means per channel and condition, matching the core map averaged by hand', async () => {
    await page.getByRole('tab', { name: 'Bands' }).click();
    await page.getByTestId('band-plot').waitFor();
    const recipe = await exportedRecipe();
    const csv = (await download('export-bands')).bytes.toString('utf8').trim().split(/\r?\n/);
    expect(csv[0]).toBe('band,band_low_hz,band_high_hz,window,window_start_s,window_end_s,channel,condition,method,scope,baseline_start_s,baseline_end_s,value,unit,cells');
    // 4 default bands × 2 windows × 3 channels × 2 conditions.
    expect(csv).toHaveLength(1 + 4 * 2 * 3 * 2);
    // theta (4–8 Hz), early window (0.1–0.5 s), Fz, lamp-watch: the mean of the core's dB map over those cells,
    // leaving out edge-zone cells (closer than edgeSeconds to an epoch edge).
    const r = nodeResult({ ...recipe, baseline: { ...recipe.baseline, scope: 'average' } });
    const { mean, n } = bandWindowMean(r, 'lamp-watch', 0, [4, 8], [0.1, 0.5]);
    const line = csv.find((l) => l.startsWith('theta,') && l.includes(',early,') && l.includes(',Fz,lamp-watch,'))!;
    const cols = line.split(',');
    expect(Number(cols[12])).toBeCloseTo(mean, 9);
    expect(Number(cols[14])).toBe(n);
    await page.screenshot({ path: path.join(artifactsDir, 'explorer-bands.png'), fullPage: true });
  });

  it('stays readable at 200 % zoom: the maps reflow into one column without sideways scrolling', async () => {
    await page.setViewportSize({ width: 640, height: 900 });
    await page.getByRole('tab', { name: 'Maps' }).click();
    await page.getByTestId('map-normalized').waitFor();
    await page.waitForTimeout(300);
    const overflow = await page.evaluate(() => document.documentElement.scrollWidth - window.innerWidth);
    expect(overflow).toBeLessThanOrEqual(0);
    const raw = (await page.getByTestId('map-raw').boundingBox())!;
    const norm = (await page.getByTestId('map-normalized').boundingBox())!;
    expect(norm.y).toBeGreaterThan(raw.y + raw.height - 1);
    await page.screenshot({ path: path.join(artifactsDir, 'explorer-maps-200-percent.png'), fullPage: true });
    await page.setViewportSize({ width: 1500, height: 1000 });
  });
});
