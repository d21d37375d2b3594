// The workspace's sign-in watch in Chromium: the "Still there?" notice before the idle limit (60 minutes), and the
// sign-in-again dialog when the session has ended, which keeps the open recording and its decomposition in memory.
// The session's clock is moved in PostgreSQL (the server compares stored times with the database's clock).
import { createHash } from 'node:crypto';
import fs from 'node:fs';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import pg from 'pg';
import type { Browser, BrowserContext, Page } from 'playwright-core';
import { appUrl, artifactsDir, launchBrowser } from '../helpers/browser';
import { loadDemoInWorkspace } from '../helpers/workspace';
import { DEMO_PEOPLE } from '../../src/db/seed';

const DEMO = { seconds: 60, channels: ['Fz', 'Cz', 'Pz'], tmin: -0.5, tmax: 1.5 };
const analyst = DEMO_PEOPLE.find((p) => p.role === 'analyst')!;
const lead = DEMO_PEOPLE.find((p) => p.role === 'lead')!;
const owner = new pg.Pool({ connectionString: process.env.TIDEMARK_OWNER_DATABASE_URL, max: 2 });

let browser: Browser;
let close: () => Promise<void>;
let context: BrowserContext;
let page: Page;

/** The sessions row of this browser: SHA-256 (hex) of the cookie's value. */
async function sessionId(): Promise<string> {
  const cookie = (await context.cookies(appUrl)).find((c) => c.name === 'tidemark_session');
  if (!cookie) throw new Error('no session cookie in the browser');
  return createHash('sha256').update(cookie.value).digest('hex');
}

/** What the workspace holds in memory: the open recording and the decompositions. */
function memory() {
  return page.evaluate(() => {
    const t = window.__tidemark!;
    const source = t.stores.workspace.getState();
    const results = t.stores.results.getState();
    return {
      fingerprint: source.fingerprint,
      channels: source.recording?.channelNames ?? [],
      samples: source.recording ? source.recording.data[0].length : 0,
      firstSamples: source.recording ? Array.from(source.recording.data[0].slice(0, 8)) : [],
      activeKey: results.activeKey,
      decompositions: Object.keys(results.cache),
      powerCells: results.activeKey ? results.cache[results.activeKey].power[0][0].length : 0,
    };
  });
}

/** What a person does when they come back to the tab: the window regains focus. */
const comeBack = () => page.evaluate(() => window.dispatchEvent(new Event('focus')));

beforeAll(async () => {
  ({ browser, close } = await launchBrowser());
  fs.mkdirSync(artifactsDir, { recursive: true });
  context = await browser.newContext({ viewport: { width: 1440, height: 900 } });
  page = await context.newPage();
  const loaded = await loadDemoInWorkspace(page, DEMO);
  expect(loaded.settingsError).toBeNull();
  await page.getByRole('tab', { name: 'Recipe' }).click();
  await page.getByTestId('recipe-fcount').fill('8');
  await page.getByTestId('recipe-run').click();
  await page.waitForFunction(() => document.querySelector('[data-testid="recipe-status"]')?.getAttribute('data-status') === 'done', undefined, { timeout: 60_000 });
  await page.getByRole('tab', { name: 'Maps' }).click();
  await page.getByTestId('map-normalized').waitFor();
});
afterAll(async () => {
  await close();
  await owner.end();
});

describe('the sign-in watch in the workspace', () => {
  it('warns a few minutes before the idle limit and keeps the session alive on request', async () => {
    const id = await sessionId();
    await owner.query("UPDATE sessions SET last_used_at = now() - interval '57 minutes' WHERE id = $1", [id]);
    await comeBack();
    const notice = page.getByTestId('signin-notice');
    await notice.waitFor();
    expect(await notice.textContent()).toContain('Still there? Your sign-in ends in 3 minutes.');
    // Non-modal: the workspace stays usable behind it.
    expect(await page.getByTestId('signin-dialog').evaluate((d) => (d as HTMLDialogElement).open)).toBe(false);
    await page.getByRole('tab', { name: 'Spectrum' }).click();
    await page.getByRole('tab', { name: 'Maps' }).click();
    await page.screenshot({ path: path.join(artifactsDir, 'workspace-still-there.png') });

    await page.getByRole('button', { name: 'Keep me signed in' }).click();
    await notice.waitFor({ state: 'detached' });
    const { rows } = await owner.query('SELECT extract(epoch from now() - last_used_at)::int AS idle FROM sessions WHERE id = $1', [id]);
    expect(rows[0].idle).toBeLessThan(60);

    // Near the 12-hour limit nothing can keep it alive: the notice only says when, with no button.
    await owner.query("UPDATE sessions SET expires_at = now() + interval '4 minutes' WHERE id = $1", [id]);
    await comeBack();
    await notice.waitFor();
    expect(await notice.textContent()).toContain('Your sign-in reaches its time limit in 4 minutes.');
    expect(await notice.getByRole('button').count()).toBe(0);
  });

  it('after 60 idle minutes, signs in again in a dialog; the recording and its decomposition stay', async () => {
    const before = await memory();
    expect(before.fingerprint).toMatch(/^demo-/);
    expect(before.channels).toEqual(DEMO.channels);
    expect(before.decompositions.length).toBe(1);
    expect(before.powerCells).toBeGreaterThan(0);
    const url = page.url();
    const oldId = await sessionId();

    await owner.query("UPDATE sessions SET last_used_at = now() - interval '61 minutes' WHERE id = $1", [oldId]);
    await comeBack();
    const dialog = page.getByRole('dialog', { name: 'Sign in again to carry on' });
    await dialog.waitFor();
    expect(await page.getByTestId('signin-dialog').evaluate((d) => (d as HTMLDialogElement).open && d.matches(':modal'))).toBe(true);
    expect(await page.getByTestId('signin-reason').textContent()).toBe('You were signed out after 60 minutes without activity.');
    expect(await dialog.getByLabel('E-mail').inputValue()).toBe(analyst.email);
    expect(await page.evaluate(() => document.activeElement?.id)).toBe('signin-again-password');
    await page.screenshot({ path: path.join(artifactsDir, 'workspace-sign-in-again.png') });

    // Another person's account is refused: the open work belongs to the one who opened it.
    const { rows: leadBefore } = await owner.query('SELECT count(*)::int AS n FROM sessions s JOIN users u ON u.id = s.user_id WHERE u.email = $1', [lead.email]);
    await dialog.getByLabel('E-mail').fill(lead.email);
    await dialog.getByLabel('Password').fill(lead.password);
    await dialog.getByRole('button', { name: 'Sign in again' }).click();
    await page.getByTestId('signin-again-error').waitFor();
    expect(await page.getByTestId('signin-again-error').textContent()).toContain('sign in with that account to carry on');
    const { rows: leadAfter } = await owner.query('SELECT count(*)::int AS n FROM sessions s JOIN users u ON u.id = s.user_id WHERE u.email = $1', [lead.email]);
    expect(leadAfter[0].n).toBe(leadBefore[0].n);

    // A wrong password: a message, the dialog stays.
    await dialog.getByLabel('E-mail').fill(analyst.email);
    await dialog.getByLabel('Password').fill('not-the-password');
    await dialog.getByRole('button', { name: 'Sign in again' }).click();
    await page.waitForFunction(() => document.querySelector('[data-testid="signin-again-error"]')?.textContent?.includes('do not match'));

    await dialog.getByLabel('Password').fill(analyst.password);
    await dialog.getByRole('button', { name: 'Sign in again' }).click();
    await dialog.waitFor({ state: 'hidden' });

    // Same page, same memory; a new session id in the cookie and the table, the old one gone.
    expect(page.url()).toBe(url);
    expect(await memory()).toEqual(before);
    await expect(page.getByTestId('map-normalized').isVisible()).resolves.toBe(true);
    const newId = await sessionId();
    expect(newId).not.toBe(oldId);
    const { rows } = await owner.query('SELECT id FROM sessions WHERE id = ANY($1)', [[oldId, newId]]);
    expect(rows.map((r) => r.id)).toEqual([newId]);
    // The password never shows in the Outbound log.
    await page.getByRole('tab', { name: 'Outbound' }).click();
    const log = (await page.getByTestId('outbound-log').textContent()) ?? '';
    expect(log).toContain('/api/session');
    expect(log).not.toContain(analyst.password);
    await page.getByRole('tab', { name: 'Maps' }).click();
  });

  it('opens the dialog when a request of the workspace is answered 401, and can be put aside and reopened', async () => {
    const before = await memory();
    await owner.query('DELETE FROM sessions WHERE id = $1', [await sessionId()]);
    // The Source screen's one request (create an analysis session) now meets "sign in first".
    await page.getByRole('tab', { name: 'Source' }).click();
    await page.getByLabel('Subject code').fill('TM-S62');
    await page.getByRole('button', { name: 'Create analysis session' }).click();
    const dialog = page.getByRole('dialog', { name: 'Sign in again to carry on' });
    await dialog.waitFor();
    expect(await page.getByTestId('signin-reason').textContent()).toContain('Your sign-in has ended');

    // Escape puts it aside (nothing is lost); a banner offers to sign in again.
    await page.keyboard.press('Escape');
    await dialog.waitFor({ state: 'hidden' });
    await page.getByTestId('signin-ended-banner').getByRole('button', { name: 'Sign in again' }).click();
    await dialog.waitFor();
    await dialog.getByLabel('Password').fill(analyst.password);
    await dialog.getByRole('button', { name: 'Sign in again' }).click();
    await dialog.waitFor({ state: 'hidden' });
    expect(await memory()).toEqual(before);

    // Signed in again, the same request passes the sign-in check: the server now judges its body (the demo's
    // stand-in fingerprint is not a SHA-256, so a 400 that names the field, not a 401).
    // The refused attempt (401) said so in plain words before the dialog came up.
    expect(await page.getByTestId('session-problem').textContent()).toContain('Your sign-in has ended. Sign in again; nothing was changed.');
    await page.getByRole('button', { name: 'Create analysis session' }).click();
    await page.waitForFunction(() => document.querySelector('[data-testid="session-problem"]')?.textContent?.includes('fingerprint'));
    expect(await page.getByRole('dialog', { name: 'Sign in again to carry on' }).isVisible()).toBe(false);
  });
});
