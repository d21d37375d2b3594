import { execFileSync } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser, Page } from 'playwright-core';
import { artifactsDir, launchBrowser, downloadFrom } from '../helpers/browser';
import { seededNormal } from '../helpers/seeded-random';
import { openWorkspace, dropFile, readMapCell } from '../helpers/workspace';
import { writeEdf } from '../../src/lib/formats';
import type { AnalysisResult } from '../../src/lib/analysis/run-recipe';

// Scenario of our own: the "Tern Point nap study", 200 Hz: three EEG electrodes, an eye, a heart and a chin muscle
// channel. The heart channel carries 1 mV R-waves once a second, so the 150 µV rule would reject every epoch on it.
const FILE_NAME = 'tern-point-nap-07.edf';
const fsHz = 200;
const seconds = 60;

let browser: Browser;
let close: () => Promise<void>;
let page: Page;
let bytes: Uint8Array;
const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'tidemark-channels-'));

const download = async (testId: string): Promise<Buffer> => (await downloadFrom(page, testId, dir)).bytes;

const row = (name: string) => page.locator(`[data-testid="channel-row"][data-channel="${name}"]`);

beforeAll(async () => {
  const normal = seededNormal(57);
  const n = fsHz * seconds;
  const eeg = () => Float64Array.from({ length: n }, () => 8 * normal());
  const ecg = Float64Array.from({ length: n }, (_, i) => (i % fsHz < 6 ? 1000 : 0) + 5 * normal());
  const signal = (label: string, samples: Float64Array) => ({ label, physicalDimension: 'uV', physicalMin: -2000, physicalMax: 2000, samplesPerRecord: fsHz, samples });
  bytes = writeEdf({
    start: { year: 2025, month: 6, day: 2, hour: 13, minute: 0, second: 0 },
    recordDurationSeconds: 1,
    signals: [signal('EEG C3', eeg()), signal('EEG Cz', eeg()), signal('EEG C4', eeg()), signal('EOG LOC', eeg()), signal('ECG II', ecg), signal('EMG Chin', eeg())],
    annotations: Array.from({ length: 12 }, (_, k) => ({ onsetSeconds: 4 + 4 * k, texts: ['chirp'] })),
  });
  fs.writeFileSync(path.join(dir, FILE_NAME), bytes);
  ({ browser, close } = await launchBrowser());
  fs.mkdirSync(artifactsDir, { recursive: true });
  const context = await browser.newContext({ viewport: { width: 1400, height: 1000 }, acceptDownloads: true });
  page = await context.newPage();
  await openWorkspace(page);
});
afterAll(async () => {
  await close();
  fs.rmSync(dir, { recursive: true, force: true });
});

describe('channel types on the Source screen', () => {
  it('shows each channel with the type read from its EDF+ label, and the ECG channel rejects no epoch', async () => {
    await dropFile(page, FILE_NAME, bytes);
    await page.getByTestId('channels-table').waitFor({ timeout: 30_000 });
    const types = await page.getByTestId('channel-row').evaluateAll((rows) => rows.map((r) => [r.getAttribute('data-channel'), r.getAttribute('data-type')]));
    expect(types).toEqual([['C3', 'eeg'], ['Cz', 'eeg'], ['C4', 'eeg'], ['LOC', 'eog'], ['II', 'ecg'], ['Chin', 'emg']]);
    expect(await page.getByTestId('channels-summary').textContent()).toMatch(/^3 of 6 channels/);
    const tally = page.getByTestId('condition-tally').locator('tbody tr').first();
    await expect.poll(async () => (await tally.locator('td').nth(2).textContent()) ?? '').toBe('12');
    await page.getByTestId('channels-panel').screenshot({ path: path.join(artifactsDir, 'channels-panel.png') });
  });

  it('rejects on the heart channel once it is called EEG, and takes it back when the type is restored', async () => {
    const tally = page.getByTestId('condition-tally').locator('tbody tr').first();
    await row('II').getByLabel('Type of II').selectOption('eeg');
    await expect.poll(async () => (await tally.locator('td').nth(3).textContent()) ?? '').toBe('12');
    await row('II').getByLabel('Type of II').selectOption('ecg');
    await expect.poll(async () => (await tally.locator('td').nth(3).textContent()) ?? '').toBe('0');
  });

  it('writes a bad channel and a changed type into the recipe, and the command line gives the same channels', async () => {
    await row('Cz').getByLabel('Cz is bad').check();
    await row('Chin').getByLabel('Type of Chin').selectOption('eeg');
    await page.getByRole('tab', { name: 'Recipe' }).click();
    await page.getByTestId('recipe-fcount').fill('5');
    expect(await page.getByTestId('recipe-channel-Cz').count()).toBe(0);
    await page.getByTestId('recipe-run').click();
    await page.waitForFunction(() => document.querySelector('[data-testid="recipe-status"]')?.getAttribute('data-status') === 'done', undefined, { timeout: 90_000 });
    await page.getByRole('tab', { name: 'Maps' }).click();
    await page.getByTestId('map-normalized').waitFor();
    const recipe = JSON.parse((await download('export-recipe')).toString('utf8'));
    expect(recipe.signals).toEqual({ types: { Chin: 'eeg' }, bad: ['Cz'] });
    const recipeFile = path.join(dir, 'recipe.json');
    fs.writeFileSync(recipeFile, JSON.stringify(recipe));
    const out = path.join(dir, 'result.json');
    execFileSync(process.execPath, ['--import', 'tsx', 'src/cli/analyze.ts', path.join(dir, FILE_NAME), '--recipe', recipeFile, '--out', out], { stdio: 'pipe' });
    const result = JSON.parse(fs.readFileSync(out, 'utf8')) as AnalysisResult;
    expect(result.channels).toEqual(['C3', 'C4', 'Chin']);
    expect(result.channelTypes).toEqual(['eeg', 'eeg', 'eeg']);
    // The channels, not the channel groups the same choice offers below them.
    const shown = await page.getByTestId('maps-channel').locator('optgroup[label="Channels"] option').allTextContents();
    expect(shown.map((t) => t.trim())).toEqual(['C3', 'C4', 'Chin']);
  });

  it('names the reference field when a chosen reference channel is marked bad, and keeps the choice', async () => {
    await page.getByRole('tab', { name: 'Source' }).click();
    const panel = page.getByTestId('reference-panel');
    await panel.getByLabel('Mean of chosen channels').check();
    await panel.getByLabel('Reference channels').selectOption(['C4']);
    await row('C4').getByLabel('C4 is bad').check();
    await page.getByTestId('channels-problem').waitFor();
    expect(await page.getByTestId('channels-problem').textContent()).toContain('reference.channels[0] "C4" is marked bad');
    await row('C4').getByLabel('C4 is bad').uncheck();
    await expect.poll(() => page.getByTestId('channels-problem').count()).toBe(0);
    expect(await panel.getByLabel('Mean of chosen channels').isChecked()).toBe(true);
    expect(await panel.getByLabel('Reference channels').inputValue()).toBe('C4');
  });

  it('runs with a common average reference, and the command line gives the value the page shows', async () => {
    await page.getByTestId('reference-panel').getByLabel('Common average').check();
    await page.getByRole('tab', { name: 'Recipe' }).click();
    await page.getByTestId('recipe-run').click();
    await page.waitForFunction(() => document.querySelector('[data-testid="recipe-status"]')?.getAttribute('data-status') === 'done', undefined, { timeout: 90_000 });
    await page.getByRole('tab', { name: 'Maps' }).click();
    await page.getByTestId('map-normalized').waitFor();
    const recipe = JSON.parse((await download('export-recipe')).toString('utf8'));
    expect(recipe.reference).toEqual({ kind: 'common-average' });
    const recipeFile = path.join(dir, 'recipe-average.json');
    fs.writeFileSync(recipeFile, JSON.stringify(recipe));
    const out = path.join(dir, 'result-average.json');
    execFileSync(process.execPath, ['--import', 'tsx', 'src/cli/analyze.ts', path.join(dir, FILE_NAME), '--recipe', recipeFile, '--out', out], { stdio: 'pipe' });
    const result = JSON.parse(fs.readFileSync(out, 'utf8')) as AnalysisResult;
    const ci = result.channels.indexOf(await page.getByTestId('maps-channel').inputValue());
    const cell = await readMapCell(page, 2, 300);
    expect(cell.normalized).toBeCloseTo(result.conditions.chirp.normalized[ci][2][300], 9);
  });

  it('filters with a zero-phase high-pass and notch, refuses a notch past Nyquist by field, and matches the command line', async () => {
    await page.getByRole('tab', { name: 'Source' }).click();
    const panel = page.getByTestId('filters-panel');
    await panel.getByLabel('High-pass (Butterworth)').check();
    await panel.getByLabel('Line-noise notch').check();
    await panel.getByLabel('60 Hz').check();
    // 200 Hz sampling: 2 × 60 Hz = 120 Hz is past the 100 Hz Nyquist frequency
    await page.getByTestId('notch-harmonics').fill('2');
    await page.getByTestId('notch-harmonics').press('Enter');
    expect(await panel.textContent()).toContain('filters.notch.harmonics must be a whole number from 1 while 2 × 60 Hz stays below 100 Hz');
    expect(await page.getByTestId('notch-harmonics').getAttribute('aria-invalid')).toBe('true');
    await page.getByTestId('highpass-cutoff').fill('1');
    await page.getByTestId('highpass-cutoff').press('Enter');
    await page.getByRole('tab', { name: 'Recipe' }).click();
    await page.getByTestId('recipe-run').click();
    await page.waitForFunction(() => document.querySelector('[data-testid="recipe-status"]')?.getAttribute('data-status') === 'done', undefined, { timeout: 90_000 });
    await page.getByRole('tab', { name: 'Maps' }).click();
    await page.getByTestId('map-normalized').waitFor();
    const recipe = JSON.parse((await download('export-recipe')).toString('utf8'));
    expect(recipe.filters).toEqual({ highPass: { cutoffHz: 1, order: 4 }, notch: { lineHz: 60, harmonics: 1, q: 30 } });
    const recipeFile = path.join(dir, 'recipe-filters.json');
    fs.writeFileSync(recipeFile, JSON.stringify(recipe));
    const out = path.join(dir, 'result-filters.json');
    execFileSync(process.execPath, ['--import', 'tsx', 'src/cli/analyze.ts', path.join(dir, FILE_NAME), '--recipe', recipeFile, '--out', out], { stdio: 'pipe' });
    const result = JSON.parse(fs.readFileSync(out, 'utf8')) as AnalysisResult;
    const ci = result.channels.indexOf(await page.getByTestId('maps-channel').inputValue());
    const cell = await readMapCell(page, 3, 250);
    expect(cell.normalized).toBeCloseTo(result.conditions.chirp.normalized[ci][3][250], 9);
    await page.getByRole('tab', { name: 'Source' }).click();
    await page.getByTestId('channels-panel').screenshot({ path: path.join(artifactsDir, 'channels-reference-filters.png') });
  });
});

