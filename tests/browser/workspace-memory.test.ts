// Work that survives, in Chromium: manual keep/reject decisions and recipe edits come back after a reload of the
// page (saved in this account's IndexedDB, keyed by the recording's fingerprint), undo walks them back one step at
// a time (button and Ctrl+Z), redo forward (Ctrl+Shift+Z, Ctrl+Y, button), and a second account in the same
// browser profile sees none of it. The recording is the invented Harbour Lights demo generated in the tab.
import fs from 'node:fs';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser, Page } from 'playwright-core';
import { artifactsDir, launchBrowser } from '../helpers/browser';
import { openWorkspace } from '../helpers/workspace';

const DEMO = { seconds: 40, channels: ['Fz', 'Cz', 'Pz'], epochStart: -0.5, epochEnd: 1.5 };

let browser: Browser;
let close: () => Promise<void>;

beforeAll(async () => {
  ({ browser, close } = await launchBrowser());
  fs.mkdirSync(artifactsDir, { recursive: true });
});
afterAll(async () => {
  await close();
});

async function loadDemo(page: Page) {
  await page.waitForFunction(() => window.__tidemark !== undefined);
  const loaded = await page.evaluate((demo) => window.__tidemark!.loadDemo(demo), DEMO);
  expect(loaded.settingsError).toBeNull();
  await page.getByTestId('epoch-table').waitFor();
}

/** The Decision select of the epoch of event `index` (0-based). */
const decision = (page: Page, index: number) => page.getByLabel(`Decision for event ${index + 1}`, { exact: true });

/** What the workspace holds that the test edits: manual decisions, frequency count, channel choice. */
function edits(page: Page) {
  return page.evaluate(() => {
    const s = window.__tidemark!.stores.workspace.getState();
    return { overrides: s.rejection.overrides, count: s.draft.frequencies.count, channels: s.draft.channels };
  });
}

/** Waits until the controller has saved after `previous` (the saved line's time changes). */
async function savedAfter(page: Page, previous: string): Promise<string> {
  await page.waitForFunction((p) => {
    const at = document.querySelector('[data-testid="saved-line"]')?.getAttribute('data-saved-at') ?? '';
    return at !== '' && at !== p;
  }, previous);
  return (await page.getByTestId('saved-line').getAttribute('data-saved-at'))!;
}

async function signOut(page: Page, removeRecordings: boolean) {
  const form = page.getByTestId('sign-out');
  await form.getByLabel('also remove the recordings kept in this browser').setChecked(removeRecordings);
  await form.getByRole('button', { name: 'Sign out' }).click();
  await page.waitForURL(/\/sign-in\?notice=signed-out$/);
}

describe('the workspace survives a reload and every edit can be undone', () => {
  it('reload in the middle of rejection and recipe edits: all back, undo walks back step by step, redo forward; another account sees none of it', async () => {
    const context = await browser.newContext({ viewport: { width: 1440, height: 900 } });
    const page = await context.newPage();
    await openWorkspace(page, 'analyst', '?testhooks', { nth: 0 });
    await loadDemo(page);
    expect(await page.getByTestId('restored-line').count()).toBe(0);
    expect(await page.getByTestId('undo').isDisabled()).toBe(true);

    // Four edits: two manual decisions on the Source screen, two on the Recipe screen.
    const rows = page.getByTestId('epoch-row');
    const a = Number(await rows.nth(0).getAttribute('data-event-index'));
    const b = Number(await rows.nth(1).getAttribute('data-event-index'));
    let saved = '';
    await decision(page, a).selectOption('reject');
    await decision(page, b).selectOption('keep');
    saved = await savedAfter(page, saved);
    await page.getByRole('tab', { name: 'Recipe' }).click();
    await page.getByTestId('recipe-fcount').fill('12');
    await page.getByTestId('recipe-all-channels').click();
    saved = await savedAfter(page, saved);
    const before = await edits(page);
    expect(Object.values(before.overrides).sort()).toEqual(['keep', 'reject']);
    expect(before.count).toBe(12);
    expect(before.channels).toHaveLength(1);

    // Reload and open the same recording again: everything is back, with the time it was saved.
    await page.reload();
    await loadDemo(page);
    await page.getByTestId('restored-line').waitFor();
    expect(await page.getByTestId('restored-line').locator('time').getAttribute('datetime')).toBe(saved);
    expect(await edits(page)).toEqual(before);
    expect(await decision(page, a).inputValue()).toBe('reject');
    expect(await decision(page, b).inputValue()).toBe('keep');
    await page.screenshot({ path: path.join(artifactsDir, 'workspace-restored-source.png') });
    await page.getByRole('tab', { name: 'Recipe' }).click();
    expect(await page.getByTestId('recipe-fcount').inputValue()).toBe('12');
    expect(await page.getByTestId('recipe-all-channels').isChecked()).toBe(false);
    // A restored workspace starts a new history: the saved state is the new starting point.
    expect(await page.getByTestId('undo').isDisabled()).toBe(true);

    // Ctrl+Z inside a text field is the field's own undo, not the workspace's.
    await page.getByTestId('recipe-fcount').focus();
    await page.keyboard.press('Control+z');
    expect((await edits(page)).channels).toHaveLength(1);
    await page.getByTestId('recipe-fcount').blur();

    // Make two more edits, then walk back step by step with Ctrl+Z and the button, and forward again.
    await page.getByTestId('recipe-all-channels').click();
    await page.getByRole('tab', { name: 'Source' }).click();
    await decision(page, a).selectOption('rules');
    const after = await edits(page);
    expect(after.channels).toEqual([]);
    expect(Object.values(after.overrides)).toEqual(['keep']);
    await page.locator('body').click({ position: { x: 5, y: 5 } });
    await page.keyboard.press('Control+z');
    expect((await edits(page)).overrides).toEqual(before.overrides);
    expect(await decision(page, a).inputValue()).toBe('reject');
    await page.getByTestId('undo').click();
    expect(await edits(page)).toEqual(before);
    expect(await page.getByTestId('undo').isDisabled()).toBe(true);
    await page.keyboard.press('Control+Shift+Z');
    expect((await edits(page)).channels).toEqual([]);
    await page.keyboard.press('Control+y');
    expect(await edits(page)).toEqual(after);
    expect(await page.getByTestId('redo').isDisabled()).toBe(true);
    await page.getByTestId('undo').click();
    expect((await edits(page)).overrides).toEqual(before.overrides);
    await page.getByTestId('redo').click();
    expect(await edits(page)).toEqual(after);
    await page.screenshot({ path: path.join(artifactsDir, 'workspace-memory-bar.png') });
    saved = await savedAfter(page, saved);

    // A second analyst in the same browser profile (the first signed out keeping what this browser holds).
    await signOut(page, false);
    await openWorkspace(page, 'analyst', '?testhooks', { nth: 1 });
    await loadDemo(page);
    await page.waitForTimeout(300); // a restore would arrive within a few ms (IndexedDB read); give it time to show
    expect(await page.getByTestId('restored-line').count()).toBe(0);
    expect((await edits(page)).overrides).toEqual({});
    expect((await edits(page)).count).toBe(30);
    await signOut(page, true);

    // The first analyst again: their work is still theirs; signing out with the box ticked removes it.
    await openWorkspace(page, 'analyst', '?testhooks', { nth: 0 });
    await loadDemo(page);
    await page.getByTestId('restored-line').waitFor();
    expect(await edits(page)).toEqual(after);
    await page.getByTestId('start-clean').click();
    expect((await edits(page)).overrides).toEqual({});
    expect(await page.getByTestId('restored-line').count()).toBe(0);
    await decision(page, a).selectOption('reject');
    await savedAfter(page, '');
    await signOut(page, true);
    const databases = await page.evaluate(async () => (await indexedDB.databases()).map((d) => d.name ?? ''));
    expect(databases.filter((n) => n.startsWith('tidemark-workspace'))).toEqual([]);
    await context.close();
  }, 240_000);
});
