import { execFileSync } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser, Page } from 'playwright-core';
import { artifactsDir, launchBrowser, downloadFrom } from '../helpers/browser';
import { seededNormal } from '../helpers/seeded-random';
import { openWorkspace, dropFile } from '../helpers/workspace';
import { writeEdf } from '../../src/lib/formats';
import type { AnalysisResult } from '../../src/lib/analysis/run-recipe';

// Scenario of our own: a "tide-gauge drill" at 100 Hz, three EEG channels plus a pulse sensor ("Pleth", in "%")
// and a breathing belt ("Resp", in "arb"), all at the EEG's rate, so both take part unless the person decides.
const FILE_NAME = 'tm-units-drill-81.edf';
const fsHz = 100;
const seconds = 40;

let browser: Browser;
let close: () => Promise<void>;
let page: Page;
let bytes: Uint8Array;
const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'tidemark-units-'));

/** Byte offset of signal i's physical dimension: 256 fixed bytes, then 16 + 80 bytes per signal, 8 each (Kemp et al., 1992). */
function dimensionOffset(signalIndex: number): number {
  const ns = Number(new TextDecoder('latin1').decode(bytes.subarray(252, 256)).trim());
  return 256 + (16 + 80) * ns + 8 * signalIndex;
}

const download = async (testId: string): Promise<Buffer> => (await downloadFrom(page, testId, dir)).bytes;

beforeAll(async () => {
  const normal = seededNormal(33);
  const n = fsHz * seconds;
  const eeg = () => Float64Array.from({ length: n }, () => 6 * normal());
  bytes = writeEdf({
    start: { year: 2024, month: 6, day: 3, hour: 8, minute: 30, second: 0 },
    recordDurationSeconds: 1,
    signals: [
      { label: 'EEG Fz', physicalDimension: 'uV', physicalMin: -200, physicalMax: 200, samplesPerRecord: fsHz, samples: eeg() },
      { label: 'EEG Cz', physicalDimension: 'uV', physicalMin: -200, physicalMax: 200, samplesPerRecord: fsHz, samples: eeg() },
      { label: 'EEG Pz', physicalDimension: 'uV', physicalMin: -200, physicalMax: 200, samplesPerRecord: fsHz, samples: eeg() },
      { label: 'Pleth', physicalDimension: '%', physicalMin: 0, physicalMax: 100, samplesPerRecord: fsHz, samples: Float64Array.from({ length: n }, (_, i) => 50 + 20 * Math.sin((2 * Math.PI * 1.2 * i) / fsHz)) },
      { label: 'Resp', physicalDimension: 'arb', physicalMin: -10, physicalMax: 10, samplesPerRecord: fsHz, samples: Float64Array.from({ length: n }, (_, i) => 5 * Math.sin((2 * Math.PI * 0.25 * i) / fsHz)) },
    ],
    annotations: Array.from({ length: 14 }, (_, k) => ({ onsetSeconds: 3 + 2.5 * k, texts: ['bell'] })),
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

async function expectUnitProblem(signal: string, signalIndex: number, unit: string) {
  const problem = page.getByTestId('intake-problem');
  await problem.waitFor({ timeout: 30_000 });
  const text = await problem.textContent();
  expect(text).toContain(`physical dimension of signal "${signal}" at byte ${dimensionOffset(signalIndex)}: unit "${unit}"`);
  expect(text).toContain('Byte offset');
  await page.getByTestId('unit-choice').waitFor();
  expect(await page.getByTestId('unit-choice').textContent()).toContain(signal);
}

describe('a signal in a unit Tidemark does not know', () => {
  it('is named with its byte offset, and can be left out; the next one is then asked about', async () => {
    await dropFile(page, FILE_NAME, bytes);
    await expectUnitProblem('Pleth', 3, '%');
    await page.getByTestId('intake-problem').screenshot({ path: path.join(artifactsDir, 'units-problem.png') });
    await page.getByTestId('unit-leave-out').check();
    await page.getByTestId('unit-reopen').click();
    // Reading again reveals the next unknown unit.
    await page.getByText('physical dimension of signal "Resp"').waitFor({ timeout: 30_000 });
    await expectUnitProblem('Resp', 4, 'arb');
    await page.getByTestId('unit-leave-out').check();
    await page.getByTestId('unit-reopen').click();

    const details = page.getByTestId('recording-details');
    await details.waitFor({ timeout: 30_000 });
    expect(await page.getByTestId('intake-problem').count()).toBe(0);
    expect(await page.getByTestId('reading-choices').textContent()).toBe('Pleth left out · Resp left out');
    expect(await details.textContent()).toContain('3 channels at 100 Hz');
    expect(await details.textContent()).toContain('Fz, Cz, Pz');
    await page.screenshot({ path: path.join(artifactsDir, 'units-left-out.png'), fullPage: true });
  });

  it('can be read as µV × a factor; a bad factor is refused, and the open recording stays while the new drop waits', async () => {
    await dropFile(page, FILE_NAME, bytes);
    await expectUnitProblem('Pleth', 3, '%');
    // The recording opened before is still there while the new drop waits for a decision.
    expect(await page.getByTestId('reading-choices').textContent()).toBe('Pleth left out · Resp left out');

    await page.getByTestId('unit-map').check();
    for (const bad of ['0', '-2', 'abc', '']) {
      await page.getByTestId('unit-factor').fill(bad);
      await page.getByTestId('unit-reopen').click();
      await page.getByTestId('unit-factor-error').waitFor();
      expect(await page.getByTestId('unit-factor-error').textContent(), bad).toMatch(bad === '0' || bad === '-2' ? /greater than 0/ : /as a number/);
    }
    await page.getByTestId('unit-factor').fill('2.5');
    await page.getByTestId('unit-reopen').click();
    await page.getByText('physical dimension of signal "Resp"').waitFor({ timeout: 30_000 });
    await page.getByTestId('unit-leave-out').check();
    await page.getByTestId('unit-reopen').click();

    await page.getByTestId('reading-choices').getByText('Pleth × 2.5 µV').waitFor({ timeout: 30_000 });
    expect(await page.getByTestId('reading-choices').textContent()).toBe('Resp left out · Pleth × 2.5 µV (unit “%”)');
    const details = page.getByTestId('recording-details');
    expect(await details.textContent()).toContain('4 channels at 100 Hz');
    expect(await details.textContent()).toContain('Fz, Cz, Pz, Pleth');
    await page.screenshot({ path: path.join(artifactsDir, 'units-mapped.png'), fullPage: true });
  });

  it('keeps the choice with the library entry, so reopening from the library reads the file the same way', async () => {
    const entries = page.getByTestId('library-entry');
    expect(await entries.count()).toBe(1);
    await page.getByRole('button', { name: `Reopen ${FILE_NAME}` }).click();
    // The origin changes from "your file" only once the reopened recording is in place.
    await page.getByTestId('recording-details').getByText('this browser’s library').waitFor({ timeout: 30_000 });
    expect(await page.getByTestId('intake-problem').count()).toBe(0);
    expect(await page.getByTestId('reading-choices').textContent()).toBe('Resp left out · Pleth × 2.5 µV (unit “%”)');
  });

  it('writes the choice into the exported recipe, and the command line reproduces the page with it', async () => {
    await page.getByRole('tab', { name: 'Recipe' }).click();
    await page.getByTestId('recipe-fcount').fill('6');
    await page.getByTestId('recipe-run').click();
    await page.waitForFunction(() => document.querySelector('[data-testid="recipe-status"]')?.getAttribute('data-status') === 'done', undefined, { timeout: 90_000 });
    await page.getByRole('tab', { name: 'Maps' }).click();
    await page.getByTestId('map-normalized').waitFor();
    const recipe = JSON.parse((await download('export-recipe')).toString('utf8'));
    expect(recipe.recording.units).toEqual({ '%': 2.5 });
    expect(recipe.recording.exclude).toEqual(['Resp']);
    const recipeFile = path.join(dir, 'recipe.json');
    fs.writeFileSync(recipeFile, JSON.stringify(recipe));
    const out = path.join(dir, 'result.json');
    execFileSync(process.execPath, ['--import', 'tsx', 'src/cli/analyze.ts', path.join(dir, FILE_NAME), '--recipe', recipeFile, '--out', out], { stdio: 'pipe' });
    const result = JSON.parse(fs.readFileSync(out, 'utf8')) as AnalysisResult;
    // Pleth is read (× 2.5) but typed "other" from its label, so only the EEG channels are analysed by default.
    expect(result.channels).toEqual(['Fz', 'Cz', 'Pz']);
    expect(await page.locator('[data-testid="channel-row"][data-channel="Pleth"]').getAttribute('data-type')).toBe('other');
    expect(result.warnings.filter((w) => w.startsWith('recording.'))).toEqual([]);
  });
});
