import { execFileSync } from 'node:child_process';
import { createHash } from 'node:crypto';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser, Page } from 'playwright-core';
import { artifactsDir, launchBrowser, downloadFrom } from '../helpers/browser';
import { describeCohort, writeSubjectEdf, type SubjectParameters } from '../../src/lib/demo/cohort';
import type { AnalysisResult } from '../../src/lib/analysis/run-recipe';
import { openWorkspace, dropFile, readMapCell } from '../helpers/workspace';

// A small recording from the demo generator (the invented Harbour Lights scenario): 1 subject, 60 s, 32 channels,
// opened in the page by drag and drop and given to the command line as the same file.
const FILE_NAME = 'tm-roundtrip-71.edf';

let browser: Browser;
let close: () => Promise<void>;
let page: Page;
let subject: SubjectParameters;
let bytes: Uint8Array;
const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'tidemark-roundtrip-'));

const download = async (testId: string): Promise<Buffer> => (await downloadFrom(page, testId, dir)).bytes;


const nearest = (xs: number[], v: number) => xs.reduce((best, x, i) => (Math.abs(x - v) < Math.abs(xs[best] - v) ? i : best), 0);

function analyze(recipeFile: string): AnalysisResult {
  const out = path.join(dir, 'result.json');
  execFileSync(process.execPath, ['--import', 'tsx', 'src/cli/analyze.ts', path.join(dir, FILE_NAME), '--recipe', recipeFile, '--out', out], { stdio: 'pipe' });
  return JSON.parse(fs.readFileSync(out, 'utf8')) as AnalysisResult;
}

beforeAll(async () => {
  ({ browser, close } = await launchBrowser());
  fs.mkdirSync(artifactsDir, { recursive: true });
  subject = describeCohort({ subjects: 1, seconds: 60 }).subjects[0];
  bytes = writeSubjectEdf(subject);
  fs.writeFileSync(path.join(dir, FILE_NAME), bytes);
  const context = await browser.newContext({ viewport: { width: 1500, height: 1000 }, acceptDownloads: true });
  page = await context.newPage();
  await openWorkspace(page);
  await dropFile(page, FILE_NAME, bytes);
  await page.getByTestId('recording-details').waitFor({ timeout: 30_000 });
});
afterAll(async () => {
  await close();
  fs.rmSync(dir, { recursive: true, force: true });
});

describe('a recipe exported from the page reproduces the page on the command line', () => {
  const tally: Record<string, number> = {};
  let rescued: number;
  let dropped: number;
  let recipe: Record<string, any>;
  let result: AnalysisResult;

  it('takes the Source screen’s conditions, rejection settings and manual decisions into the exported recipe', async () => {
    // Two distinct labels, so the recording opens with one condition per label.
    expect(await page.getByTestId('condition').count()).toBe(2);
    // Peak-to-peak rule raised to 200 µV: the generator's step and spike artifacts (≥ 250 µV, cohort.ts) stay rejected.
    const p2p = page.getByLabel('Reject above (µV); 150 µV is a common rule of thumb');
    await p2p.fill('200');
    await p2p.press('Enter');
    const artifact = subject.artifacts.find((a) => a.kind !== 'flat') ?? subject.artifacts[0];
    rescued = artifact.eventIndex;
    const row = (i: number) => page.locator(`[data-testid="epoch-row"][data-event-index="${i}"]`);
    expect(await row(rescued).getAttribute('data-verdict')).toBe('rejected');
    await page.getByLabel(`Decision for event ${rescued + 1}`).selectOption('keep');
    expect(await row(rescued).getAttribute('data-verdict')).toBe('kept');
    // And one clean epoch of the other condition rejected by hand.
    const other = subject.events[rescued].label === 'lamp-watch' ? 'oar-pull' : 'lamp-watch';
    dropped = subject.events.findIndex((e, i) => e.label === other && !subject.artifacts.some((a) => a.eventIndex === i) && i > 2);
    await page.getByLabel(`Decision for event ${dropped + 1}`).selectOption('reject');
    expect(await row(dropped).getAttribute('data-verdict')).toBe('rejected');
    const cells = await page.getByTestId('condition-tally').locator('tbody tr').evaluateAll((rows) => rows.map((r) => [...r.querySelectorAll('td')].map((td) => td.textContent ?? '')));
    for (const c of cells) tally[c[0]] = Number(c[2]);
    expect(Object.keys(tally).sort()).toEqual(['lamp-watch', 'oar-pull']);

    // A light recipe: two channels, 12 frequencies.
    await page.getByRole('tab', { name: 'Recipe' }).click();
    await page.getByTestId('recipe-all-channels').uncheck();
    await page.getByTestId('recipe-channel-Cz').check();
    await page.getByTestId('recipe-fcount').fill('12');
    await page.getByTestId('recipe-run').click();
    await page.waitForFunction(() => document.querySelector('[data-testid="recipe-status"]')?.getAttribute('data-status') === 'done', undefined, { timeout: 90_000 });

    await page.getByRole('tab', { name: 'Maps' }).click();
    await page.getByTestId('map-normalized').waitFor();
    recipe = JSON.parse((await download('export-recipe')).toString('utf8'));
    expect(recipe.conditions).toEqual({ 'lamp-watch': ['lamp-watch'], 'oar-pull': ['oar-pull'] });
    expect(recipe.rejection).toMatchObject({ peakToPeakMicrovolts: 200, flatMicrovolts: 0.5, scope: 'any' });
    const key = (i: number) => `${i}@${subject.events[i].onsetSeconds}:${subject.events[i].label}`;
    expect(recipe.rejection.overrides).toEqual({ [key(rescued)]: 'keep', [key(dropped)]: 'reject' });
    // The fingerprint is the SHA-256 of the file's bytes (FIPS 180-4, computed here by node:crypto).
    expect(recipe.recording).toEqual({ fingerprint: createHash('sha256').update(bytes).digest('hex') });
    expect(recipe.baseline).toEqual({ start: -0.5, end: -0.2, method: 'decibel', scope: 'average' });
    expect(recipe.format).toBe(2);
    expect(recipe.epochs).toMatchObject({ start: -1, end: 2 });
    expect(recipe.aperiodic.model).toBe('power-law');
    expect(recipe.spectrum.source).toBe('epochs'); // the kept epochs by default
    fs.writeFileSync(path.join(dir, 'recipe.json'), JSON.stringify(recipe));
    result = analyze(path.join(dir, 'recipe.json'));
    expect(result.warnings.filter((w) => w.startsWith('recording.fingerprint'))).toEqual([]);
  });

  it('gives the same trials per condition as the Source screen and the Maps screen', async () => {
    for (const name of ['lamp-watch', 'oar-pull']) {
      expect(result.conditions[name].trials, name).toBe(tally[name]);
      const option = await page.getByTestId('maps-condition').locator(`option[value="${name}"]`).textContent();
      expect(option).toContain(`(${tally[name]} trials)`);
    }
    const rescuedCondition = subject.events[rescued].label;
    expect(result.warnings).toContainEqual(expect.stringMatching(new RegExp(`^rejection "${rescuedCondition}": .*1 kept by hand against the rules`)));
    expect(result.warnings).toContainEqual(expect.stringMatching(new RegExp(`^rejection "${subject.events[dropped].label}": .*1 of them by hand`)));
  });

  it('shows the normalized value the command line computes', async () => {
    const fi = nearest(result.frequencies, 6);
    const ti = nearest(result.times, 0.4);
    const cell = await readMapCell(page, fi, ti);
    expect(cell.frequency).toBeCloseTo(result.frequencies[fi], 9);
    expect(cell.time).toBeCloseTo(result.times[ti], 9);
    const ci = result.channels.indexOf(await page.getByTestId('maps-channel').inputValue());
    const condition = await page.getByTestId('maps-condition').inputValue();
    expect(cell.normalized).toBeCloseTo(result.conditions[condition].normalized[ci][fi][ti], 9);
  });

  it('shows the time and frequency resolution of each frequency on the Recipe screen, as the Result reports it', async () => {
    await page.getByRole('tab', { name: 'Recipe' }).click();
    await page.getByTestId('resolution').locator('summary').click();
    const rows = await page.getByTestId('resolution-row').evaluateAll((els) => els.map((e) => [Number(e.getAttribute('data-frequency')), Number(e.getAttribute('data-time-fwhm')), Number(e.getAttribute('data-frequency-fwhm'))]));
    expect(rows.length).toBe(result.frequencies.length);
    rows.forEach(([f, t, s], i) => {
      expect(f).toBeCloseTo(result.frequencies[i], 12);
      expect(t).toBeCloseTo(result.temporalFwhmSeconds[i], 12);
      expect(s).toBeCloseTo(result.spectralFwhmHz[i], 12);
    });
    await page.getByTestId('resolution').screenshot({ path: path.join(artifactsDir, 'recipe-resolution.png') });
  });

  it('shows the aperiodic fit table the command line writes', async () => {
    await page.getByRole('tab', { name: 'Spectrum' }).click();
    await page.getByTestId('fit-row').first().waitFor({ timeout: 30_000 });
    const rows = await page.getByTestId('fit-row').evaluateAll((els) => els.map((e) => ({ channel: e.getAttribute('data-channel'), exponent: Number(e.getAttribute('data-exponent')), offset: Number(e.getAttribute('data-offset')), r2: Number(e.getAttribute('data-r2')), rmse: Number(e.getAttribute('data-rmse')) })));
    expect(rows.map((r) => r.channel).sort()).toEqual([...result.channels].sort());
    for (const r of rows) {
      const cli = result.aperiodic.find((a) => a.channel === r.channel)!;
      for (const k of ['exponent', 'offset', 'r2', 'rmse'] as const) expect(r[k], `${r.channel} ${k}`).toBeCloseTo(cli[k], 9);
    }
    await page.screenshot({ path: path.join(artifactsDir, 'recipe-roundtrip-spectrum.png'), fullPage: true });
  });

  it('loads a recipe JSON on the Recipe screen, refusing a bad one by field without losing anything', async () => {
    await page.getByRole('tab', { name: 'Source' }).click();
    const p2p = page.getByLabel('Reject above (µV); 150 µV is a common rule of thumb');
    await p2p.fill('300');
    await p2p.press('Enter');
    await page.getByRole('tab', { name: 'Recipe' }).click();
    const bad = { ...recipe, rejection: { ...recipe.rejection, peakToPeakMicrovolts: -1 } };
    await page.getByTestId('load-recipe-file').setInputFiles({ name: 'bad.json', mimeType: 'application/json', buffer: Buffer.from(JSON.stringify(bad)) });
    await expect.poll(() => page.getByTestId('load-recipe-message').textContent()).toContain('rejection.peakToPeakMicrovolts must be greater than 0');
    expect(await page.getByTestId('load-recipe-message').textContent()).toContain('nothing was changed');
    await page.getByRole('tab', { name: 'Source' }).click();
    expect(await p2p.inputValue()).toBe('300');
    await page.getByRole('tab', { name: 'Recipe' }).click();
    await page.getByTestId('load-recipe-file').setInputFiles({ name: 'recipe.json', mimeType: 'application/json', buffer: Buffer.from(JSON.stringify(recipe)) });
    await expect.poll(() => page.getByTestId('load-recipe-message').textContent()).toContain('Loaded recipe.json');
    expect(await page.getByTestId('recipe-fcount').inputValue()).toBe('12');
    // Back to the exported recipe's rules: the cached run of that recipe is recognised.
    expect(await page.getByTestId('recipe-run').textContent()).toMatch(/Shown on Maps|already computed/);
    await page.getByRole('tab', { name: 'Source' }).click();
    await expect.poll(() => p2p.inputValue()).toBe('200');
    expect(await page.locator(`[data-testid="epoch-row"][data-event-index="${rescued}"]`).getAttribute('data-verdict')).toBe('kept');
  });

  it('loads the same recipe written in format 1 with a visible note that it was upgraded (analysis contract)', async () => {
    await page.getByRole('tab', { name: 'Recipe' }).click();
    const { format: _format, ...rest } = recipe;
    const old = { ...rest, epochs: { events: recipe.epochs.events, tmin: recipe.epochs.start, tmax: recipe.epochs.end }, baseline: { ...recipe.baseline, method: 'zscore' }, aperiodic: { range: recipe.aperiodic.range, mode: 'knee' } };
    await page.getByTestId('load-recipe-file').setInputFiles({ name: 'old.json', mimeType: 'application/json', buffer: Buffer.from(JSON.stringify(old)) });
    await expect.poll(() => page.getByTestId('load-recipe-message').textContent()).toContain('Loaded old.json');
    expect(await page.getByTestId('load-recipe-message').textContent()).toMatch(/This recipe is in format 1 .*upgraded/);
    expect(await page.getByTestId('recipe-epoch-start').inputValue()).toBe(String(recipe.epochs.start));
    expect(await page.getByLabel('power law with knee').isChecked()).toBe(true);
  });
});
