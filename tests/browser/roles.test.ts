import fs from 'node:fs';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser } from 'playwright-core';
import { appUrl, artifactsDir, launchBrowser } from '../helpers/browser';
import { DEMO_PEOPLE } from '../../src/db/seed';
import { createMember, createTeam } from '../helpers/fixtures';
import { pool as dbPool } from '../../src/db/client';
import { pool as helperPool } from '../helpers/app';
import { describeCohort, writeSubjectEdf } from '../../src/lib/demo/cohort';
import { DEMO_STUDY, dropFile, openWorkspace, signInAs, demoPerson } from '../helpers/workspace';

let browser: Browser;
let close: () => Promise<void>;

beforeAll(async () => {
  ({ browser, close } = await launchBrowser());
  fs.mkdirSync(artifactsDir, { recursive: true });
});
afterAll(async () => {
  await close();
  await dbPool.end();
  await helperPool.end();
});

// What each role must (and must not) see once signed in.
const expectations = {
  operator: { administration: true, newStudy: false },
  lead: { administration: false, newStudy: true },
  analyst: { administration: false, newStudy: false },
  reviewer: { administration: false, newStudy: false },
} as const;

describe('each demo role signs in, sees its navigation and signs out', () => {
  for (const person of DEMO_PEOPLE.filter((p, i, all) => all.findIndex((q) => q.role === p.role) === i)) {
    it(`${person.role} (${person.email})`, async () => {
      const context = await browser.newContext({ viewport: { width: 1280, height: 900 } });
      const page = await context.newPage();
      await page.goto(`${appUrl}/`);
      expect(new URL(page.url()).pathname).toBe('/sign-in');
      // Keyboard only: the form is reachable and submits with Enter.
      await page.getByLabel('E-mail').focus();
      await page.keyboard.type(person.email);
      await page.keyboard.press('Tab');
      await page.keyboard.type(person.password);
      await page.keyboard.press('Enter');
      const nav = page.getByRole('navigation', { name: 'Main' });
      if (person.role === 'operator') {
        // Site administration only: the operator belongs to no team and sees no study.
        await page.waitForURL(/\/admin$/);
        expect(await nav.getByRole('link', { name: 'Studies' }).count()).toBe(0);
        expect(await nav.getByRole('link', { name: 'Site' }).getAttribute('aria-current')).toBe('page');
        expect(await page.getByTestId('admin-users').textContent()).toContain('reviewer@saltmarsh.example');
        expect(await page.getByText('Harbour-bell anticipation').count()).toBe(0);
        expect(await page.getByTestId('caution').textContent()).toContain('not a medical device');
        // The dev mailbox is offered to operators in the demo build (the mail fake runs under npm test).
        expect(await nav.getByRole('link', { name: 'Mailbox (dev)' }).count()).toBe(1);
        await page.getByRole('button', { name: 'Sign out' }).click();
        await page.waitForURL(/\/sign-in\?notice=signed-out$/);
        await context.close();
        return;
      }
      await page.waitForURL(/\/teams\/[0-9a-f-]+$/);

      await expect(nav.getByRole('link', { name: 'Studies' }).isVisible()).resolves.toBe(true);
      await expect(nav.getByRole('link', { name: 'Members' }).isVisible()).resolves.toBe(true);
      expect(await nav.getByRole('link', { name: 'Site' }).count()).toBe(expectations[person.role].administration ? 1 : 0);
      expect(await nav.getByRole('link', { name: 'Mailbox (dev)' }).count()).toBe(0);
      expect(await page.getByRole('heading', { name: 'New study' }).count()).toBe(expectations[person.role].newStudy ? 1 : 0);
      expect(await page.getByTestId('role').textContent()).toBe(person.role);
      expect(await page.getByTestId('whoami').textContent()).toContain(person.displayName);
      expect(await page.getByTestId('study-list').textContent()).toContain('Harbour-bell anticipation');
      expect(await page.getByTestId('caution').textContent()).toContain('not a medical device');

      if (person.role === 'lead') {
        await page.screenshot({ path: path.join(artifactsDir, 'team-home.png'), fullPage: true });
        expect(fs.statSync(path.join(artifactsDir, 'team-home.png')).size).toBeGreaterThan(10_000);
      }

      await page.getByRole('button', { name: 'Sign out' }).click();
      await page.waitForURL(/\/sign-in\?notice=signed-out$/);
      expect(await page.getByRole('status').textContent()).toContain('You are signed out.');
      await page.goto(`${appUrl}/admin`);
      expect(new URL(page.url()).pathname).toBe('/sign-in');
      await context.close();
    });
  }

  it('operator area: people, teams and the site audit, used with the keyboard and the mouse (screenshots at 1440×900)', async () => {
    const operator = DEMO_PEOPLE.find((p) => p.role === 'operator')!;
    const { team } = await createTeam(`Browser fixture ${Date.now().toString(36)}`);
    const member = await createMember(team.id, 'analyst');
    const context = await browser.newContext({ viewport: { width: 1440, height: 900 } });
    const page = await context.newPage();
    const blocked: string[] = [];
    // Chromium reports what a Content-Security-Policy refuses as console errors ("Refused to …"); uncaught
    // script errors arrive as page errors. (The form's deliberate 400 below is neither.)
    page.on('console', (m) => {
      if (m.type() === 'error' && /Refused to|Content Security Policy/i.test(m.text())) blocked.push(m.text());
    });
    page.on('pageerror', (e) => blocked.push(e.message));
    await page.goto(`${appUrl}/sign-in`);
    await page.getByLabel('E-mail').fill(operator.email);
    await page.getByLabel('Password').fill(operator.password);
    await page.getByRole('button', { name: 'Sign in' }).click();
    await page.waitForURL(/\/admin$/);
    const tabs = page.getByRole('navigation', { name: 'Site administration' });
    expect(await tabs.getByRole('link', { name: 'People' }).getAttribute('aria-current')).toBe('page');

    // Suspend, then reactivate, the fixture analyst with the row's own buttons.
    const row = page.locator(`tr[data-person="${member.email}"]`);
    await row.getByRole('button', { name: `Suspend ${member.user.displayName}` }).click();
    await page.waitForURL(/\/admin\?done=suspend/);
    expect(await page.getByTestId('site-done').textContent()).toContain('is suspended and signed out everywhere.');
    expect(await row.getByTestId('account-state').textContent()).toBe('suspended');
    await page.screenshot({ path: path.join(artifactsDir, 'site-people.png') });
    await row.getByRole('button', { name: `Reactivate ${member.user.displayName}` }).click();
    await page.waitForURL(/\/admin\?done=reactivate/);
    expect(await row.getByTestId('account-state').textContent()).toBe('active');

    // Teams: create one with the keyboard; the form's message names a bad e-mail first.
    await tabs.getByRole('link', { name: 'Teams' }).click();
    await page.waitForURL(/\/admin\/teams$/);
    expect(await page.getByTestId('site-teams').textContent()).toContain('Maren Holt');
    expect(await page.getByTestId('site-teams').textContent()).not.toContain('Harbour-bell');
    const name = `Dune Lab ${Date.now().toString(36)}`;
    await page.getByLabel('Team name').fill(name);
    await page.getByLabel("First lead's e-mail").fill('not an address');
    await page.getByRole('button', { name: 'Create team and invite' }).click();
    await page.waitForLoadState();
    expect(await page.getByTestId('form-error').textContent()).toContain('Please correct the marked fields.');
    expect(await page.getByText('Enter a valid e-mail address.').count()).toBe(1);
    expect(await page.getByLabel('Team name').inputValue()).toBe(name);
    await page.getByLabel("First lead's e-mail").fill(`lead-${Date.now().toString(36)}@dune.example`);
    await page.getByLabel("First lead's e-mail").press('Enter');
    await page.waitForURL(/\/admin\/teams\?created=/);
    expect(await page.getByTestId('team-created').textContent()).toContain(`Team ${name} created.`);
    await page.screenshot({ path: path.join(artifactsDir, 'site-teams.png') });

    // Site audit: filter by prefix; the suspension and the new team are there, newest first.
    await tabs.getByRole('link', { name: 'Site audit' }).click();
    await page.getByLabel('Action starts with').fill('site.');
    await page.getByRole('button', { name: 'Filter' }).click();
    await page.waitForURL(/\/admin\/audit\?action=site\./);
    const actions = await page.locator('tr[data-action]').evaluateAll((rows) => rows.map((r) => r.getAttribute('data-action')));
    expect(actions.slice(0, 3)).toEqual(['site.createTeam', 'site.reactivate', 'site.suspend']);
    await page.screenshot({ path: path.join(artifactsDir, 'site-audit.png') });
    for (const file of ['site-people.png', 'site-teams.png', 'site-audit.png']) {
      expect(fs.statSync(path.join(artifactsDir, file)).size).toBeGreaterThan(20_000);
    }
    // Nothing on these pages was blocked by the Content-Security-Policy, and no script failed.
    expect(blocked).toEqual([]);
    await context.close();
  });

  it('stays readable at 200 % zoom: no sideways scrolling on the team home', async () => {
    // 200 % zoom of a 1280 px window leaves a 640 CSS px layout viewport.
    const context = await browser.newContext({ viewport: { width: 640, height: 800 }, deviceScaleFactor: 2 });
    const page = await context.newPage();
    await page.goto(`${appUrl}/sign-in`);
    const lead = DEMO_PEOPLE.find((p) => p.role === 'lead')!;
    await page.getByLabel('E-mail').fill(lead.email);
    await page.getByLabel('Password').fill(lead.password);
    await page.getByRole('button', { name: 'Sign in' }).click();
    await page.waitForURL(/\/teams\//);
    const overflow = await page.evaluate(() => document.documentElement.scrollWidth - window.innerWidth);
    expect(overflow).toBeLessThanOrEqual(0);
    await page.screenshot({ path: path.join(artifactsDir, 'team-home-200-percent.png'), fullPage: true });
    await context.close();
  });

  it('shows a wrong password as a message in the page', async () => {
    const context = await browser.newContext();
    const page = await context.newPage();
    await page.goto(`${appUrl}/sign-in`);
    await page.getByLabel('E-mail').fill('lead@saltmarsh.example');
    await page.getByLabel('Password').fill('wrong-password');
    await page.getByRole('button', { name: 'Sign in' }).click();
    await page.waitForLoadState();
    expect(await page.getByTestId('form-error').textContent()).toContain('do not match an account');
    await context.close();
  });
});

// Words that offer to make something new; a reviewer must meet none of them as a button or link (issue 13, item 5).
const CREATE_WORDS = /\b(create|new study|start (a|an) |bring in|invite)\b/i;
// A permission code as the matrix spells it (`analysisSession:create`, `note:view`): never shown to a person.
const PERMISSION_CODE = /\b[a-z]+[A-Za-z]*:[a-z][A-Za-z]*\b/;

async function offeredActions(page: import('playwright-core').Page): Promise<string[]> {
  return page.locator('main').getByRole('button').or(page.locator('main').getByRole('link')).evaluateAll((els) =>
    els.filter((e) => (e as HTMLElement).offsetParent !== null).map((e) => (e.textContent ?? '').replace(/\s+/g, ' ').trim()),
  );
}

describe('a role is offered only what it may do, and refusals speak plain words', () => {
  it('a reviewer meets no create action on the team home, the study page or the workspace (Source and Recipe)', async () => {
    const context = await browser.newContext({ viewport: { width: 1440, height: 900 } });
    const page = await context.newPage();
    await signInAs(page, demoPerson('reviewer'));
    expect((await offeredActions(page)).filter((t) => CREATE_WORDS.test(t))).toEqual([]);
    await page.getByTestId('study-list').getByRole('link', { name: DEMO_STUDY }).click();
    await page.waitForURL(/\/studies\/[0-9a-f-]+$/);
    expect((await offeredActions(page)).filter((t) => CREATE_WORDS.test(t))).toEqual([]);
    // Every listed session links its own page.
    const hrefs = await page.getByTestId('session-link').evaluateAll((as) => as.map((a) => a.getAttribute('href')));
    for (const href of hrefs) expect(href).toMatch(/^\/teams\/[0-9a-f-]+\/studies\/[0-9a-f-]+\/sessions\/[0-9a-f-]+$/);

    await page.getByRole('link', { name: 'Open the workspace' }).click();
    await page.waitForURL(/\/workspace$/);
    // A small recording of the invented Harbour Lights scenario (20 s), so the whole Source screen is drawn.
    await dropFile(page, 'tm-roles-check-71.edf', writeSubjectEdf(describeCohort({ subjects: 1, seconds: 20 }).subjects[0]));
    await page.getByTestId('recording-details').waitFor({ timeout: 30_000 });
    await page.getByTestId('session-not-offered').waitFor();
    expect((await offeredActions(page)).filter((t) => CREATE_WORDS.test(t))).toEqual([]);
    await page.getByRole('tab', { name: 'Recipe' }).click();
    expect((await offeredActions(page)).filter((t) => CREATE_WORDS.test(t))).toEqual([]);
    await context.close();
  });

  it('refusals a person can meet name no permission code: an API answer, a form post and a guarded page', async () => {
    const context = await browser.newContext();
    const page = await context.newPage();
    await openWorkspace(page, 'reviewer');
    const [, teamId, studyId] = /\/teams\/([0-9a-f-]+)\/studies\/([0-9a-f-]+)\/workspace/.exec(page.url())!;
    const refused = await page.evaluate(
      async ({ teamId, studyId }) => {
        const api = await fetch(`/api/studies/${studyId}/analysis-sessions`, { method: 'POST', headers: { 'content-type': 'application/json' }, body: JSON.stringify({ subjectCode: 'TM-S71', fingerprint: 'e'.repeat(64) }) });
        const design = await fetch(`/api/studies/${studyId}/cohort/design`, { method: 'PUT', headers: { 'content-type': 'application/json' }, body: JSON.stringify({ revision: null, cohort: {} }) });
        const form = await fetch(`/teams/${teamId}`, { method: 'POST', headers: { 'content-type': 'application/x-www-form-urlencoded' }, body: 'name=Shingle+drift' });
        const doc = new DOMParser().parseFromString(await form.text(), 'text/html');
        return {
          api: { status: api.status, message: ((await api.json()) as { error: { message: string } }).error.message },
          design: { status: design.status, message: ((await design.json()) as { error: { message: string } }).error.message },
          form: { status: form.status, text: doc.querySelector('main')?.textContent?.replace(/\s+/g, ' ') ?? '' },
        };
      },
      { teamId, studyId },
    );
    expect(refused.api.status).toBe(403);
    expect(refused.api.message).toContain('may not create analysis sessions');
    expect(refused.design.status).toBe(403);
    expect(refused.form.status).toBe(403);
    expect(refused.form.text).toContain('may not create studies');
    for (const text of [refused.api.message, refused.design.message, refused.form.text]) expect(text).not.toMatch(PERMISSION_CODE);
    // A page a role may not open: the lead-only report with unsigned sessions.
    const report = await page.goto(`${appUrl}/teams/${teamId}/studies/${studyId}/cohort/report?unsigned=1`);
    const body = (await page.locator('body').textContent()) ?? '';
    expect(report?.status()).toBe(403);
    expect(body).not.toMatch(PERMISSION_CODE);
    await context.close();
  });

  it('each demo study offers its own demo data or none: the rest study offers no Harbour Lights file', async () => {
    const context = await browser.newContext();
    const page = await context.newPage();
    await signInAs(page, demoPerson('analyst'));
    await page.getByTestId('study-list').getByRole('link', { name: 'Ebb and flow rest blocks' }).click();
    await page.getByRole('link', { name: 'Open the workspace' }).click();
    await page.waitForURL(/\/workspace$/);
    await page.getByTestId('no-demo-data').waitFor();
    expect(await page.getByRole('button', { name: 'Open demo recording' }).count()).toBe(0);
    expect(await page.getByText('Harbour Lights').count()).toBe(0);
    await context.close();
  });
});
