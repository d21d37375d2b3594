// One analyst's whole visit, through the screens only (no test hooks): sign in, open the study's workspace, open
// a demo recording, make conditions, run a reduced decomposition, and read the lamp-watch theta increase at Fz off
// the normalized map's cursor readout. The effect is the one the demo generator documents in demo-data/cohort.json
// (the invented Harbour Lights scenario). Throughout, no request may carry the recording's header patient field,
// its file name or anything the size of sample data.
import fs from 'node:fs';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser, BrowserContext, Page, Request } from 'playwright-core';
import { artifactsDir, launchBrowser } from '../helpers/browser';
import { DEMO_PATIENT_FIELD, type CohortParameters } from '../../src/lib/demo/cohort';
import { frequencyGrid } from '../../src/lib/analysis/frequency-grid';
import { openWorkspace, readMapCell, recordProgress, progressSeen } from '../helpers/workspace';

const CHANNELS = ['Fz', 'Cz', 'Pz'];

interface Seen {
  method: string;
  url: string;
  headers: Record<string, string>;
  body: Buffer | null;
}

let browser: Browser;
let close: () => Promise<void>;
let context: BrowserContext;
let page: Page;
const seen: Seen[] = [];
const pending: Promise<void>[] = [];
const cohort = JSON.parse(fs.readFileSync(path.resolve('demo-data', 'cohort.json'), 'utf8')) as CohortParameters;

beforeAll(async () => {
  ({ browser, close } = await launchBrowser());
  fs.mkdirSync(artifactsDir, { recursive: true });
  context = await browser.newContext({ viewport: { width: 1400, height: 1000 }, acceptDownloads: true });
  const take = (r: Request) => {
    const add = (headers: Record<string, string>) => void seen.push({ method: r.method(), url: r.url(), headers, body: r.postDataBuffer() });
    pending.push(r.allHeaders().then(add, () => add(r.headers())));
  };
  context.on('request', take);
  page = await context.newPage();
});
afterAll(() => close());

/** Index of the grid value nearest v. */
const nearest = (xs: ArrayLike<number>, v: number) => {
  let best = 0;
  for (let i = 1; i < xs.length; i++) if (Math.abs(xs[i] - v) < Math.abs(xs[best] - v)) best = i;
  return best;
};


describe('an analyst’s journey from sign-in to a time-frequency map', () => {
  let fileName = '';
  let patientShown = '';

  it('signs in, opens the study workspace and a demo recording from the Demo cohort picker', async () => {
    await openWorkspace(page, 'analyst');

    const picker = page.getByLabel(/Demo cohort/);
    await picker.waitFor();
    fileName = await picker.inputValue();
    expect(cohort.subjects.map((s) => s.fileName)).toContain(fileName);
    await page.getByRole('button', { name: 'Open demo recording' }).click();
    await page.getByTestId('recording-details').waitFor({ timeout: 60_000 });
    // The header's patient field is shown on this device only; it is the generator's marker string.
    patientShown = (await page.getByTestId('patient-field').textContent()) ?? '';
    expect(patientShown).toBe(DEMO_PATIENT_FIELD);
  });

  it('makes one condition per label (lamp-watch, oar-pull) unless the workspace already did', async () => {
    const conditions = page.getByTestId('condition');
    if ((await conditions.count()) === 0) await page.getByRole('button', { name: 'One condition per remaining label' }).click();
    await expect.poll(async () => (await conditions.allTextContents()).join(' ')).toMatch(/lamp-watch[\s\S]*oar-pull|oar-pull[\s\S]*lamp-watch/);
    expect(await conditions.count()).toBe(2);
  });

  it('runs the decomposition on Fz, Cz and Pz with a progress bar per channel that fills up', async () => {
    await page.getByRole('tab', { name: 'Recipe' }).click();
    await page.getByTestId('recipe-screen').waitFor();
    // Reduce the run to three channels: leave "all channels", pick the three, drop the one the screen pre-picks.
    const all = page.getByTestId('recipe-all-channels');
    if (await all.isChecked()) await all.uncheck();
    for (const name of CHANNELS) {
      const box = page.getByTestId(`recipe-channel-${name}`);
      if (!(await box.isChecked())) await box.check();
    }
    const names = await page.locator('[data-testid^="recipe-channel-"]').evaluateAll((els) => els.filter((e) => (e as HTMLInputElement).checked).map((e) => e.getAttribute('data-testid')!.slice('recipe-channel-'.length)));
    for (const name of names) if (!CHANNELS.includes(name)) await page.getByTestId(`recipe-channel-${name}`).uncheck();
    await expect
      .poll(() => page.locator('[data-testid^="recipe-channel-"]').evaluateAll((els) => els.filter((e) => (e as HTMLInputElement).checked).length))
      .toBe(3);

    await recordProgress(page);
    await page.getByTestId('recipe-run').click();
    const bars = page.getByTestId('recipe-progress').getByRole('progressbar');
    await bars.first().waitFor();
    await page.waitForFunction(() => document.querySelector('[data-testid="recipe-status"]')?.getAttribute('data-status') === 'done', undefined, { timeout: 60_000 });
    expect(await bars.count()).toBe(3);
    for (let i = 0; i < 3; i++) {
      expect(Number(await bars.nth(i).getAttribute('data-fraction'))).toBe(1);
      expect(await bars.nth(i).getAttribute('aria-valuenow')).toBe('100');
    }
    const seenFractions = await progressSeen(page);
    expect(seenFractions.some((f) => f > 0 && f < 1)).toBe(true);
  });

  it('shows the lamp-watch increase near the generator’s theta frequency at Fz as positive dB, 0.2–0.6 s after the cue', async () => {
    const subject = cohort.subjects.find((s) => s.fileName === fileName)!;
    const theta = subject.theta;
    expect(theta.label).toBe('lamp-watch');
    expect(theta.centre).toBe('Fz');
    await page.getByRole('tab', { name: 'Maps' }).click();
    await page.getByTestId('map-normalized').waitFor();
    await page.getByTestId('maps-channel').selectOption('Fz');
    await page.getByTestId('maps-condition').selectOption(theta.label);
    await page.getByRole('radio', { name: 'dB', exact: true }).check({ force: true });

    // The grid of this run, from the recipe the screen exports (a download, not a request).
    const [download] = await Promise.all([page.waitForEvent('download'), page.getByTestId('export-recipe').click()]);
    const recipePath = path.join(artifactsDir, 'journey-recipe.json');
    await download.saveAs(recipePath);
    const recipe = JSON.parse(fs.readFileSync(recipePath, 'utf8'));
    expect(recipe.channels).toEqual(CHANNELS);
    expect(recipe.baseline.method).toBe('decibel');
    const frequencies = frequencyGrid(recipe.frequencies);
    const fs_ = subject.sampleRateHz;
    const times = Array.from({ length: Math.round((recipe.epochs.end - recipe.epochs.start) * fs_) + 1 }, (_, j) => recipe.epochs.start + j / fs_);

    // The burst's Hann envelope peaks at latency + duration/2 after the cue (cohort.ts), 0.4 s for this scenario.
    const peak = theta.latencySeconds + theta.durationSeconds / 2;
    expect(peak).toBeGreaterThanOrEqual(0.2);
    expect(peak).toBeLessThanOrEqual(0.6);
    const fi = nearest(frequencies, theta.frequencyHz);
    const ti = nearest(times, peak);
    const lamp = await readMapCell(page, fi, ti, { textContains: 'normalized' });
    expect(lamp.time).toBeGreaterThanOrEqual(0.2);
    expect(lamp.time).toBeLessThanOrEqual(0.6);
    expect(Math.abs(lamp.frequency - theta.frequencyHz)).toBeLessThan(0.1 * theta.frequencyHz);
    expect(lamp.text).toContain('dB');
    // "about +6 dB" per DEVELOPERS.md; a clear positive value is what a person sees.
    expect(lamp.normalized).toBeGreaterThan(1);
    await page.screenshot({ path: path.join(artifactsDir, 'maps.png'), fullPage: true });

    // The same cell after oar-pull cues (no theta burst in the scenario) stays well below it.
    await page.getByTestId('maps-condition').selectOption('oar-pull');
    const oar = await readMapCell(page, fi, ti, { textContains: 'normalized' });
    expect(oar.frequency).toBe(lamp.frequency);
    expect(oar.normalized).toBeLessThan(lamp.normalized - 1);
  });

  it('sent nothing identifying or sample-sized in any request of the visit', async () => {
    await Promise.all(pending);
    expect(seen.length).toBeGreaterThan(5);
    const forbidden = [DEMO_PATIENT_FIELD, patientShown, fileName];
    // The one request allowed to name the file is the app fetching its own demo data: a GET without a body.
    const demoFetch = seen.filter((r) => new URL(r.url).pathname === `/demo/${fileName}`);
    expect(demoFetch.map((r) => [r.method, r.body?.length ?? 0])).toEqual([['GET', 0]]);
    for (const r of seen) {
      if (demoFetch.includes(r)) continue;
      const where = `${r.method} ${r.url}`;
      const headerText = Object.entries(r.headers).map(([k, v]) => `${k}: ${v}`).join('\n');
      const body = r.body?.toString('latin1') ?? '';
      for (const s of forbidden) {
        expect(decodeURIComponent(r.url).includes(s), `${where} URL carries "${s}"`).toBe(false);
        expect(headerText.includes(s), `${where} headers carry "${s}"`).toBe(false);
        expect(body.includes(s), `${where} body carries "${s}"`).toBe(false);
      }
      expect(r.body?.length ?? 0, `${where} body size`).toBeLessThanOrEqual(4096);
    }
  });

  it('moves between the workspace screens with the arrow keys (WAI-ARIA tabs pattern)', async () => {
    await page.getByRole('tab', { name: 'Maps' }).click();
    await page.keyboard.press('ArrowRight');
    expect(await page.getByRole('tab', { name: 'Spectrum' }).getAttribute('aria-selected')).toBe('true');
    expect(await page.evaluate(() => document.activeElement?.textContent)).toBe('Spectrum');
    await page.keyboard.press('Home');
    expect(await page.getByRole('tab', { name: 'Source' }).getAttribute('aria-selected')).toBe('true');
    await page.keyboard.press('ArrowLeft');
    expect(await page.getByRole('tab', { name: 'Outbound' }).getAttribute('aria-selected')).toBe('true');
    expect(await page.getByRole('tabpanel', { name: 'Outbound' }).isVisible()).toBe(true);
  });
});
