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

// Scenario of our own: the "Lantern Quay" listening task, 200 Hz. The EDF+ carries "chirp" annotations; the
// task's BIDS events file (kept beside it, as BIDS datasets do) adds "bell" events with a response_time column.
const EDF_NAME = 'sub-lq04_task-lantern_eeg.edf';
const EVENTS_NAME = 'sub-lq04_task-lantern_events.tsv';
const fsHz = 200;
const seconds = 50;

let browser: Browser;
let close: () => Promise<void>;
let page: Page;
let edf: Uint8Array;
let events: string;
const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'tidemark-events-'));

async function dropFiles(files: { name: string; data: Uint8Array }[]) {
  await page.getByTestId('drop-zone').waitFor();
  await page.evaluate((list) => {
    const transfer = new DataTransfer();
    for (const { name, b64 } of list) {
      const binary = atob(b64);
      const buf = new Uint8Array(binary.length);
      for (let i = 0; i < binary.length; i++) buf[i] = binary.charCodeAt(i);
      transfer.items.add(new File([buf], name));
    }
    const zone = document.querySelector('[data-testid="drop-zone"]')!;
    for (const type of ['dragenter', 'dragover', 'drop']) zone.dispatchEvent(new DragEvent(type, { bubbles: true, cancelable: true, dataTransfer: transfer }));
  }, files.map((f) => ({ name: f.name, b64: Buffer.from(f.data).toString('base64') })));
}

async function tally(): Promise<Record<string, number>> {
  const rows = await page.getByTestId('condition-tally').locator('tbody tr').evaluateAll((trs) => trs.map((r) => [...r.querySelectorAll('td')].map((td) => td.textContent ?? '')));
  return Object.fromEntries(rows.map((c) => [c[0], Number(c[1])]));
}

const download = async (testId: string): Promise<Buffer> => (await downloadFrom(page, testId, dir)).bytes;

beforeAll(async () => {
  const normal = seededNormal(64);
  const n = fsHz * seconds;
  const eeg = () => Float64Array.from({ length: n }, () => 8 * normal());
  edf = writeEdf({
    start: { year: 2025, month: 9, day: 9, hour: 10, minute: 0, second: 0 },
    recordDurationSeconds: 1,
    signals: ['EEG Fz', 'EEG Cz'].map((label) => ({ label, physicalDimension: 'uV', physicalMin: -200, physicalMax: 200, samplesPerRecord: fsHz, samples: eeg() })),
    annotations: Array.from({ length: 10 }, (_, k) => ({ onsetSeconds: 4 + 4 * k, texts: ['chirp'] })),
  });
  events = 'onset\tduration\ttrial_type\tresponse_time\n' + Array.from({ length: 10 }, (_, k) => `${6 + 4 * k}\t0.1\tbell\t${(0.5 + 0.07 * k).toFixed(2)}`).join('\n') + '\n';
  fs.writeFileSync(path.join(dir, EDF_NAME), edf);
  fs.writeFileSync(path.join(dir, EVENTS_NAME), events);
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

describe('an EDF paired with a BIDS events file', () => {
  it('reads both when they are dropped together: the annotations and the events file’s events', async () => {
    await dropFiles([{ name: EDF_NAME, data: edf }, { name: EVENTS_NAME, data: new TextEncoder().encode(events) }]);
    await page.getByTestId('condition-tally').waitFor({ timeout: 30_000 });
    await expect.poll(tally).toEqual({ chirp: 10, bell: 10 });
  });

  it('pairs an events file chosen on its own with the EDF already open', async () => {
    await dropFile(page, EDF_NAME, edf);
    await expect.poll(tally).toEqual({ chirp: 10 });
    await page.getByLabel('Choose a recording file…').setInputFiles({ name: EVENTS_NAME, mimeType: 'text/tab-separated-values', buffer: Buffer.from(events) });
    await expect.poll(tally).toEqual({ chirp: 10, bell: 10 });
  });

  it('gives the command line, with --events, the same epochs and values', async () => {
    await page.getByRole('tab', { name: 'Recipe' }).click();
    await page.getByTestId('recipe-fcount').fill('5');
    await page.getByTestId('recipe-run').click();
    await page.waitForFunction(() => document.querySelector('[data-testid="recipe-status"]')?.getAttribute('data-status') === 'done', undefined, { timeout: 90_000 });
    await page.getByRole('tab', { name: 'Maps' }).click();
    await page.getByTestId('map-normalized').waitFor();
    const recipe = JSON.parse((await download('export-recipe')).toString('utf8'));
    const recipeFile = path.join(dir, 'recipe.json');
    fs.writeFileSync(recipeFile, JSON.stringify(recipe));
    const out = path.join(dir, 'result.json');
    execFileSync(process.execPath, ['--import', 'tsx', 'src/cli/analyze.ts', path.join(dir, EDF_NAME), '--events', path.join(dir, EVENTS_NAME), '--recipe', recipeFile, '--out', out], { stdio: 'pipe' });
    const result = JSON.parse(fs.readFileSync(out, 'utf8')) as AnalysisResult;
    expect(result.conditions.bell.trials).toBe(10);
    expect(result.conditions.chirp.trials).toBe(10);
    const condition = await page.getByTestId('maps-condition').inputValue();
    const ci = result.channels.indexOf(await page.getByTestId('maps-channel').inputValue());
    const cell = await readMapCell(page, 2, 250);
    expect(cell.normalized).toBeCloseTo(result.conditions[condition].normalized[ci][2][250], 9);
    await page.screenshot({ path: path.join(artifactsDir, 'events-pairing.png'), fullPage: true });
  });

  it('chooses events by a column and locks epochs to the response, and the command line follows the recipe', async () => {
    await page.getByRole('tab', { name: 'Source' }).click();
    const panel = page.getByTestId('event-table-panel');
    // response_time is 0.5 + 0.07·k s for the bell at 6 + 4k s: below 0.8 s for k = 0 … 4 (by hand)
    await panel.getByLabel('Keep rows where').fill('response_time < 0.8');
    await panel.getByLabel('Lock epochs to').selectOption('response_time');
    await page.getByTestId('event-table-apply').click();
    await expect.poll(tally).toEqual({ chirp: 10, bell: 5 });
    // a column the file lacks is named, and the events stay as they were
    await panel.getByLabel('Keep rows where').fill('reaction < 1');
    await page.getByTestId('event-table-apply').click();
    expect(await page.getByTestId('event-table-problem').textContent()).toContain('eventTable.where[0] names column "reaction"');
    expect(await tally()).toEqual({ chirp: 10, bell: 5 });
    await panel.getByLabel('Keep rows where').fill('response_time < 0.8');
    await page.getByTestId('event-table-apply').click();

    await page.getByRole('tab', { name: 'Recipe' }).click();
    await page.getByTestId('recipe-run').click();
    await page.waitForFunction(() => document.querySelector('[data-testid="recipe-status"]')?.getAttribute('data-status') === 'done', undefined, { timeout: 90_000 });
    await page.getByRole('tab', { name: 'Maps' }).click();
    await page.getByTestId('map-normalized').waitFor();
    const recipe = JSON.parse((await download('export-recipe')).toString('utf8'));
    expect(recipe.eventTable).toEqual({ where: ['response_time < 0.8'], shiftBy: 'response_time' });
    const recipeFile = path.join(dir, 'recipe-locked.json');
    fs.writeFileSync(recipeFile, JSON.stringify(recipe));
    const out = path.join(dir, 'result-locked.json');
    execFileSync(process.execPath, ['--import', 'tsx', 'src/cli/analyze.ts', path.join(dir, EDF_NAME), '--events', path.join(dir, EVENTS_NAME), '--recipe', recipeFile, '--out', out], { stdio: 'pipe' });
    const result = JSON.parse(fs.readFileSync(out, 'utf8')) as AnalysisResult;
    expect(result.conditions.bell.trials).toBe(5);
    await page.getByTestId('maps-condition').selectOption('bell');
    const ci = result.channels.indexOf(await page.getByTestId('maps-channel').inputValue());
    const cell = await readMapCell(page, 2, 250);
    expect(cell.normalized).toBeCloseTo(result.conditions.bell.normalized[ci][2][250], 9);
  });
});

