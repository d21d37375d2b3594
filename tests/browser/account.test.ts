// The Account page in Chromium: one's own sessions in plain words, ending one and all the others, and changing the
// password (a common one refused with the reason). Two more sessions of the same person come from Node with the
// User-Agent strings of other browsers.
import fs from 'node:fs';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser, Page } from 'playwright-core';
import { appUrl, artifactsDir, launchBrowser } from '../helpers/browser';
import { Client, pool } from '../helpers/app';
import { createMember, createTeam } from '../helpers/fixtures';
import { pool as appPool } from '../../src/db/client';

const FIREFOX_WINDOWS = 'Mozilla/5.0 (Windows NT 10.0; Win64; x64; rv:128.0) Gecko/20100101 Firefox/128.0';
const SAFARI_IPHONE = 'Mozilla/5.0 (iPhone; CPU iPhone OS 17_4 like Mac OS X) AppleWebKit/605.1.15 (KHTML, like Gecko) Version/17.4 Mobile/15E148 Safari/604.1';

let browser: Browser;
let close: () => Promise<void>;
let page: Page;
let member: Awaited<ReturnType<typeof createMember>>;

async function signInElsewhere(userAgent: string): Promise<Client> {
  const client = new Client();
  const response = await client.request('/sign-in', { method: 'POST', form: { email: member.email, password: member.password }, headers: { 'user-agent': userAgent } });
  expect(response.status).toBe(302);
  return client;
}

beforeAll(async () => {
  const { team } = await createTeam();
  member = await createMember(team.id, 'analyst');
  ({ browser, close } = await launchBrowser());
  fs.mkdirSync(artifactsDir, { recursive: true });
  page = await (await browser.newContext({ viewport: { width: 1440, height: 900 } })).newPage();
  await page.goto(`${appUrl}/sign-in`);
  await page.getByLabel('E-mail').fill(member.email);
  await page.getByLabel('Password').fill(member.password);
  await page.getByRole('button', { name: 'Sign in' }).click();
  await page.waitForURL(/\/teams\//);
});
afterAll(async () => {
  await close();
  await pool.end();
  await appPool.end();
});

describe('the Account page', () => {
  it('lists this person\'s sessions, ends one, then all the others', async () => {
    const phone = await signInElsewhere(SAFARI_IPHONE);
    const laptop = await signInElsewhere(FIREFOX_WINDOWS);
    await page.getByRole('link', { name: 'Account' }).click();
    await page.waitForURL(/\/account$/);
    const rows = page.getByTestId('session-row');
    expect(await rows.count()).toBe(3);
    const mine = page.locator('[data-testid="session-row"][data-current="yes"]');
    expect(await mine.textContent()).toMatch(/Chrome \d+ on Linux\s*this browser/);
    expect(await page.getByTestId('session-table').textContent()).toContain('Safari 17 on iOS 17 (phone)');
    expect(await page.getByTestId('session-table').textContent()).toContain('Firefox 128 on Windows 10');
    await page.screenshot({ path: path.join(artifactsDir, 'account.png') });

    await page.getByRole('button', { name: /^End the session of Safari 17 on iOS 17/ }).click();
    expect(await page.getByTestId('account-notice').textContent()).toBe('That session has ended.');
    expect(await rows.count()).toBe(2);
    expect((await phone.request('/api/me')).status).toBe(401);

    await page.getByRole('button', { name: 'Sign out everywhere else' }).click();
    expect(await page.getByTestId('account-notice').textContent()).toContain('Every other session of this account has ended.');
    expect(await rows.count()).toBe(1);
    expect(await page.getByTestId('only-session').isVisible()).toBe(true);
    expect((await laptop.request('/api/me')).status).toBe(401);
  });

  it('refuses a common password with the reason, then changes to a good one and stays signed in', async () => {
    const laptop = await signInElsewhere(FIREFOX_WINDOWS);
    const form = page.getByTestId('change-password');
    await form.getByLabel('Current password').fill(member.password);
    await form.getByLabel('New password', { exact: true }).fill('qwertyuiop');
    await form.getByLabel('Repeat the new password').fill('qwertyuiop');
    await form.getByRole('button', { name: 'Change password' }).click();
    await page.getByTestId('form-error').waitFor();
    const field = page.locator('#field-password-error');
    expect(await field.textContent()).toContain('This password is on a list of commonly used or leaked passwords');
    expect(await page.locator('#field-password').getAttribute('aria-invalid')).toBe('true');
    await page.screenshot({ path: path.join(artifactsDir, 'account-common-password.png') });
    expect((await laptop.request('/api/me')).status).toBe(200);

    // The labels now carry the messages too, so the fields are found by id.
    await page.locator('#field-current').fill(member.password);
    await page.locator('#field-password').fill('salt marsh at low tide');
    await page.locator('#field-confirm').fill('salt marsh at low tide');
    await form.getByRole('button', { name: 'Change password' }).click();
    expect(await page.getByTestId('account-notice').textContent()).toContain('Your password was changed.');
    expect(await page.getByTestId('session-row').count()).toBe(1);
    expect((await laptop.request('/api/me')).status).toBe(401);
    const me = await page.evaluate(async () => (await fetch('/api/me')).status);
    expect(me).toBe(200);
  });
});
