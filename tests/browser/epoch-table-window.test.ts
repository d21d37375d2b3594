// A long recording has hundreds or thousands of epochs: the Source screen's epoch table keeps only the rows in view
// (and a margin) in the page, yet every epoch stays reachable by scrolling and by Tab, and a decision on any of them
// is the store's. The recording is the invented Harbour Lights demo generated in the tab (15 min, 3 channels).
import fs from 'node:fs';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser } from 'playwright-core';
import { artifactsDir, launchBrowser } from '../helpers/browser';
import { loadDemoInWorkspace } from '../helpers/workspace';

let browser: Browser;
let close: () => Promise<void>;

beforeAll(async () => {
  ({ browser, close } = await launchBrowser());
  fs.mkdirSync(artifactsDir, { recursive: true });
});
afterAll(async () => {
  await close();
});

describe('the epoch table of a long recording', () => {
  it('holds only the rows in view, and every epoch is reachable by scrolling and by Tab', async () => {
    const page = await (await browser.newContext({ viewport: { width: 1440, height: 900 } })).newPage();
    const loaded = await loadDemoInWorkspace(page, { seconds: 900, channels: ['Fz', 'Cz', 'Pz'] });
    expect(loaded.decisions).toBeGreaterThan(300);
    const table = page.getByTestId('epoch-table');
    await table.waitFor();
    expect(Number(await table.getAttribute('aria-rowcount'))).toBe(loaded.decisions + 1);
    const rows = page.getByTestId('epoch-row');
    expect(await rows.count()).toBeLessThan(60);

    // Scrolled to the end: the last epoch is there, and deciding it by hand reaches the store.
    await table.evaluate((t) => {
      const box = t.parentElement!;
      box.scrollTop = box.scrollHeight;
    });
    const lastRow = page.locator(`[data-testid="epoch-row"][aria-rowindex="${loaded.decisions + 1}"]`);
    await lastRow.waitFor();
    const lastEvent = Number(await lastRow.getAttribute('data-event-index'));
    await page.getByLabel(`Decision for event ${lastEvent + 1}`, { exact: true }).selectOption('reject');
    const overrides = await page.evaluate(() => Object.values(window.__tidemark!.stores.workspace.getState().rejection.overrides));
    expect(overrides).toEqual(['reject']);
    expect(await lastRow.getAttribute('data-verdict')).toBe('rejected');
    await table.scrollIntoViewIfNeeded();
    await page.screenshot({ path: path.join(artifactsDir, 'epoch-table-window.png') });

    // Back to the top, then Tab through 40 decisions: focus always lands on the next epoch's select.
    await table.evaluate((t) => (t.parentElement!.scrollTop = 0));
    const firstRow = page.locator('[data-testid="epoch-row"][aria-rowindex="2"]');
    await firstRow.waitFor();
    await firstRow.locator('select').focus();
    for (let k = 0; k < 40; k++) await page.keyboard.press('Tab');
    const focused = await page.evaluate(() => document.activeElement?.closest('tr')?.getAttribute('aria-rowindex') ?? null);
    expect(focused).toBe('42');
    await page.context().close();
  }, 120_000);
});
