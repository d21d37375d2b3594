// A large recording is on the Source screen as soon as it is decoded; its SHA-256 fingerprint, the key of the saved
// workspace and the library copy, follows from its own worker. Here the demo build's hook holds the fingerprint of a
// demo cohort file (the invented Harbour Lights scenario) for as long as the test likes, as a 500 MB file's hashing
// would: the header, events and overview are shown before it, an edit made meanwhile is saved once it arrives and
// is back after a reload, and a saved workspace found after new edits is offered instead of replacing them.
// The digest is checked against Node's crypto (FIPS 180-4). Timing belongs to `npm run bench:large`.
import { createHash } from 'node:crypto';
import fs from 'node:fs';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser, Page } from 'playwright-core';
import { artifactsDir, launchBrowser } from '../helpers/browser';
import { openDemoRecording, openWorkspace } from '../helpers/workspace';

let browser: Browser;
let close: () => Promise<void>;

beforeAll(async () => {
  ({ browser, close } = await launchBrowser());
  fs.mkdirSync(artifactsDir, { recursive: true });
});
afterAll(async () => {
  await close();
});

/** From now on every EDF opened in this page is shown before its fingerprint, which waits for `release`. */
async function holdFingerprints(page: Page) {
  await page.waitForFunction(() => window.__tidemark !== undefined);
  await page.evaluate(() => window.__tidemark!.fingerprints.holdFrom(0));
}

const release = (page: Page) => page.evaluate(() => window.__tidemark!.fingerprints.release());

/** The Decision select of the epoch of event `index` (0-based). */
const decision = (page: Page, index: number) => page.getByLabel(`Decision for event ${index + 1}`, { exact: true });

const overrides = (page: Page) => page.evaluate(() => window.__tidemark!.stores.workspace.getState().rejection.overrides);

describe('a recording shown before its fingerprint is known', () => {
  it('shows header, events and overview first; an edit made meanwhile is saved when the fingerprint arrives and is back after a reload', async () => {
    const context = await browser.newContext({ viewport: { width: 1440, height: 900 } });
    const page = await context.newPage();
    await openWorkspace(page, 'analyst', '?testhooks');
    await holdFingerprints(page);
    const file = await openDemoRecording(page);
    const digest = createHash('sha256').update(fs.readFileSync(path.resolve('demo-data', file))).digest('hex');

    // Header, events (the proposed conditions) and the overview trace are there; the fingerprint is not.
    const details = page.getByTestId('recording-details');
    expect(await details.textContent()).toContain('32 channels at 500 Hz');
    await page.getByTestId('condition').first().waitFor();
    await page.locator('canvas[aria-label^="Overview of"]').waitFor();
    await page.getByTestId('fingerprint-pending').waitFor();
    expect(await page.getByTestId('fingerprint').count()).toBe(0);
    expect(await page.getByTestId('saved-line').getAttribute('data-waiting')).toBe('fingerprint');
    expect(await page.getByTestId('library-entry').count()).toBe(0);
    await page.screenshot({ path: path.join(artifactsDir, 'late-fingerprint-pending.png') });
    await details.screenshot({ path: path.join(artifactsDir, 'late-fingerprint-details.png') });

    // An edit while the fingerprint is unknown: it waits (nothing can be saved without the key).
    const first = Number(await page.getByTestId('epoch-row').first().getAttribute('data-event-index'));
    await decision(page, first).selectOption('reject');
    await page.waitForTimeout(1000);
    expect(await page.getByTestId('saved-line').getAttribute('data-saved-at')).toBe('');

    // The fingerprint arrives: Node's SHA-256 of the same file, then the waiting edit is saved and the file kept.
    await release(page);
    await page.getByTestId('fingerprint').waitFor();
    expect(await page.getByTestId('fingerprint').textContent()).toBe(digest);
    await page.waitForFunction(() => (document.querySelector('[data-testid="saved-line"]')?.getAttribute('data-saved-at') ?? '') !== '');
    const saved = (await page.getByTestId('saved-line').getAttribute('data-saved-at'))!;
    await page.getByTestId('library-entry').first().waitFor();
    expect(await decision(page, first).inputValue()).toBe('reject');

    // Reload, and open the same file with its fingerprint late again: before it arrives nothing is restored …
    await page.reload();
    await holdFingerprints(page);
    await openDemoRecording(page, file);
    await page.getByTestId('fingerprint-pending').waitFor();
    expect(await overrides(page)).toEqual({});
    // … and when it does, the edit is back with the time it was saved.
    await release(page);
    await page.getByTestId('restored-line').waitFor();
    expect(await page.getByTestId('restored-line').locator('time').getAttribute('datetime')).toBe(saved);
    expect(await decision(page, first).inputValue()).toBe('reject');
    expect(Object.values(await overrides(page))).toEqual(['reject']);
    await context.close();
  }, 180_000);

  it('work saved earlier, found only after new edits, is offered and replaces nothing unasked', async () => {
    const context = await browser.newContext({ viewport: { width: 1440, height: 900 } });
    const page = await context.newPage();
    await openWorkspace(page, 'analyst', '?testhooks');
    // Earlier work on the file, saved under its fingerprint (known at once here).
    const file = await openDemoRecording(page);
    const [a, b] = await Promise.all([0, 1].map(async (k) => Number(await page.getByTestId('epoch-row').nth(k).getAttribute('data-event-index'))));
    await decision(page, a).selectOption('reject');
    await page.waitForFunction(() => (document.querySelector('[data-testid="saved-line"]')?.getAttribute('data-saved-at') ?? '') !== '');
    const earlier = (await page.getByTestId('saved-line').getAttribute('data-saved-at'))!;

    // Opened again after a reload with the fingerprint late, and edited before it arrives.
    await page.reload();
    await holdFingerprints(page);
    await openDemoRecording(page, file);
    await page.getByTestId('fingerprint-pending').waitFor();
    await decision(page, b).selectOption('keep');
    await release(page);
    await page.getByTestId('saved-offer').waitFor();
    expect(await page.getByTestId('saved-offer').locator('time').getAttribute('datetime')).toBe(earlier);
    // The edit made meanwhile stays and is what is kept now.
    expect(Object.values(await overrides(page))).toEqual(['keep']);
    expect(await decision(page, b).inputValue()).toBe('keep');
    await page.waitForFunction((e) => {
      const at = document.querySelector('[data-testid="saved-line"]')?.getAttribute('data-saved-at') ?? '';
      return at !== '' && at !== e;
    }, earlier);
    await page.screenshot({ path: path.join(artifactsDir, 'late-fingerprint-offer.png') });

    // Taking the offer puts the earlier work in place; Undo returns to the edit made meanwhile.
    await page.getByTestId('take-offer').click();
    expect(await page.getByTestId('saved-offer').count()).toBe(0);
    expect(await decision(page, a).inputValue()).toBe('reject');
    expect(await decision(page, b).inputValue()).toBe('rules');
    await page.getByTestId('undo').click();
    expect(await decision(page, a).inputValue()).toBe('rules');
    expect(await decision(page, b).inputValue()).toBe('keep');
    await context.close();
  }, 180_000);
});
