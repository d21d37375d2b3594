// The Source screen as a person meets it (issue 13, item 4): numbered steps that fold, a storage meter that reads
// right, an overview drawn at the pixel width, hand decisions that stay in view, and an epoch window form whose
// button does not cover its fields. Screenshots at 1440 × 900 and 1100 × 800 in test-artifacts/.
import fs from 'node:fs';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser, Page } from 'playwright-core';
import { artifactsDir, launchBrowser } from '../helpers/browser';
import { describeCohort, writeSubjectEdf } from '../../src/lib/demo/cohort';
import { dropFile, openWorkspace } from '../helpers/workspace';

let browser: Browser;
let close: () => Promise<void>;
// One subject of the invented Harbour Lights scenario (demo generator), 60 s: 32 channels, events and artifacts.
let bytes: Uint8Array;

beforeAll(async () => {
  ({ browser, close } = await launchBrowser());
  fs.mkdirSync(artifactsDir, { recursive: true });
  bytes = writeSubjectEdf(describeCohort({ subjects: 1, seconds: 60 }).subjects[0]);
});
afterAll(() => close());

async function openSource(width: number, height: number): Promise<Page> {
  const context = await browser.newContext({ viewport: { width, height } });
  const page = await context.newPage();
  await openWorkspace(page, 'analyst');
  await dropFile(page, 'tm-layout-check-91.edf', bytes);
  await page.getByTestId('recording-details').waitFor({ timeout: 60_000 });
  await page.getByTestId('epoch-table').waitFor({ timeout: 60_000 });
  await page.getByTestId('storage-meter').waitFor();
  return page;
}

describe('the Source screen', () => {
  for (const [width, height] of [
    [1440, 900],
    [1100, 800],
  ] as const) {
    it(`shows its steps, a readable storage meter and an unobstructed window form at ${width} × ${height}`, async () => {
      const page = await openSource(width, height);
      await page.screenshot({ path: path.join(artifactsDir, `source-${width}x${height}.png`) });
      await page.screenshot({ path: path.join(artifactsDir, `source-${width}x${height}-full.png`), fullPage: true });

      // The step strip names the recording, the events and the epochs with their numbers, at the top of the screen.
      const strip = page.getByTestId('source-steps');
      const stripText = (await strip.textContent()) ?? '';
      expect(stripText).toMatch(/32 channels · 500 Hz/);
      expect(stripText).toMatch(/\d+ events · \d+ conditions?/);
      expect(stripText).toMatch(/\d+ epochs · \d+ kept · \d+ rejected/);
      expect((await strip.boundingBox())!.y).toBeLessThan(height);

      // A handful of kilobytes in a quota of gigabytes is a sliver of a bar, with the numbers beside it.
      const meter = page.getByTestId('storage-meter');
      const fill = Number(await meter.getAttribute('data-fill-percent'));
      const usage = await page.evaluate(() => navigator.storage.estimate());
      expect(usage.quota!).toBeGreaterThan(0);
      expect(fill).toBeLessThan(5);
      expect(await meter.textContent()).toMatch(/Storage used: .+ of .+ this browser allows \(.+ %\)/);
      const bar = await meter.getByRole('meter').boundingBox();
      const filled = await meter.getByRole('meter').locator('div').boundingBox();
      expect(filled!.width).toBeLessThan(bar!.width * 0.05);

      // "Apply window" sits beside the epoch-end field, not over it.
      const form = page.getByRole('form', { name: 'Epoch window' });
      const end = (await form.getByLabel('Epoch end (s)').boundingBox())!;
      const apply = (await form.getByRole('button', { name: 'Apply window' }).boundingBox())!;
      const start = (await form.getByLabel('Epoch start (s)').boundingBox())!;
      const overlaps = (a: typeof end, b: typeof end) => a.x < b.x + b.width && b.x < a.x + a.width && a.y < b.y + b.height && b.y < a.y + a.height;
      expect(overlaps(apply, end)).toBe(false);
      expect(overlaps(start, end)).toBe(false);

      // The overview canvas has one device pixel per column of its box (the envelope is computed at that width).
      const canvas = page.locator('canvas[aria-label^="Overview of"]');
      const drawn = await canvas.evaluate((c: HTMLCanvasElement) => ({ width: c.width, css: c.getBoundingClientRect().width, ratio: window.devicePixelRatio }));
      expect(Math.abs(drawn.width - Math.round(drawn.css * drawn.ratio))).toBeLessThanOrEqual(2);

      // As it opens (Channels folded for a recording of one channel type): how far down the epochs start.
      const measured = await page.evaluate(() => ({
        pageHeight: document.documentElement.scrollHeight,
        epochsTop: Math.round(document.querySelector('details[data-step="epochs"]')!.getBoundingClientRect().top + window.scrollY),
      }));
      fs.appendFileSync(path.join(artifactsDir, 'source-heights.txt'), `${width}x${height}: page ${measured.pageHeight} px, epochs step at ${measured.epochsTop} px\n`);
      expect(await page.locator('details[data-step="channels"][open]').count()).toBe(0);
      expect(measured.epochsTop).toBeLessThan(2_000);
      // Before the steps this page was 4,049 px tall at 1440 × 900 (measured here); now under 3,000 px.
      expect(measured.pageHeight).toBeLessThan(3_000);

      // Folding every step leaves the titles and digests: the whole screen fits in about one window.
      await page.getByTestId('fold-all').click();
      await expect.poll(() => page.locator('details[data-step][open]').count()).toBe(0);
      const tall = await page.evaluate(() => document.documentElement.scrollHeight);
      expect(tall).toBeLessThan(3_000);
      await page.screenshot({ path: path.join(artifactsDir, `source-${width}x${height}-folded.png`), fullPage: true });
      // A step's link in the strip opens that step again.
      await page.getByTestId('source-steps').getByRole('link', { name: /Epochs over the recording/ }).click();
      await expect.poll(() => page.locator('details[data-step="epochs"][open]').count()).toBe(1);
      await page.context().close();
    });
  }

  it('keeps a row decided by hand in view, marked, under the "rejected only" filter', async () => {
    const page = await openSource(1440, 900);
    await page.getByLabel('Show epochs').selectOption('rejected');
    const rejected = page.locator('[data-testid="epoch-row"][data-verdict="rejected"]');
    const before = await rejected.count();
    expect(before).toBeGreaterThan(0);
    const first = rejected.first();
    const index = await first.getAttribute('data-event-index');
    await first.getByRole('combobox').selectOption('keep');
    const row = page.locator(`[data-testid="epoch-row"][data-event-index="${index}"]`);
    await expect.poll(() => row.getAttribute('data-verdict')).toBe('kept');
    expect(await row.isVisible()).toBe(true);
    expect(await row.getByTestId('by-hand-marker').textContent()).toBe('overridden by hand');
    expect(await page.getByText(/1 of them kept by hand and shown/).count()).toBe(1);
    await row.scrollIntoViewIfNeeded();
    await page.screenshot({ path: path.join(artifactsDir, 'source-kept-by-hand.png') });
    await page.context().close();
  });

  it('refuses a second draft for the same subject and recording in plain words, linking the session that exists', async () => {
    const page = await openSource(1440, 900);
    const code = `TM-L${Date.now().toString().slice(-6)}`;
    await page.getByLabel('Subject code').fill(code);
    await page.getByRole('button', { name: 'Create analysis session' }).click();
    await page.getByTestId('session-created').waitFor();
    await page.getByRole('button', { name: 'Create analysis session' }).click();
    const problem = page.getByTestId('session-problem');
    await expect.poll(() => problem.textContent()).toContain(`Subject ${code} already has an analysis session for this recording`);
    // The code is random digits, so "409" may be part of it: only a status number standing alone counts.
    expect(await problem.textContent()).not.toMatch(/\b[a-z]+[A-Za-z]*:[a-z][A-Za-z]*\b|\b409\b|session_exists/);
    await page.getByTestId('existing-session-link').click();
    await page.waitForURL(/\/teams\/[0-9a-f-]+\/studies\/[0-9a-f-]+\/sessions\/[0-9a-f-]+$/);
    expect(await page.locator('main').textContent()).toContain(code);
    await page.context().close();
  });
});
