// The study page's review section as people see it (issue 11, server half): a mailed link opens the session at its
// anchor, the signature manifest and the activity list show, and the notifications page mutes a kind. Screenshots at
// 1440×900 in test-artifacts/.
import fs from 'node:fs';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser, Page } from 'playwright-core';
import { appUrl, artifactsDir, launchBrowser } from '../helpers/browser';
import { latestMailId, pool, waitForMail } from '../helpers/app';
import { createMember, createTeam } from '../helpers/fixtures';
import { demoRecipe, signedIn, smallSummary } from '../helpers/review';

let browser: Browser;
let close: () => Promise<void>;

beforeAll(async () => {
  ({ browser, close } = await launchBrowser());
  fs.mkdirSync(artifactsDir, { recursive: true });
});
afterAll(async () => {
  await close();
  await pool.end();
});

async function signInPage(email: string, password: string): Promise<Page> {
  const context = await browser.newContext({ viewport: { width: 1440, height: 900 } });
  const page = await context.newPage();
  await page.goto(`${appUrl}/sign-in`);
  await page.getByLabel('E-mail').fill(email);
  await page.getByLabel('Password').fill(password);
  await page.getByRole('button', { name: /sign in/i }).click();
  await page.waitForURL((u) => !u.pathname.startsWith('/sign-in'));
  return page;
}

describe('study page review section', () => {
  it('opens a mailed link at the session, shows the manifest and the activity, and mutes a kind', async () => {
    const { team, study } = await createTeam('Saltmarsh review');
    const lead = await createMember(team.id, 'lead');
    const analyst = await createMember(team.id, 'analyst');
    const reviewer = await createMember(team.id, 'reviewer');
    const a = await signedIn(analyst.email, analyst.password);
    const r = await signedIn(reviewer.email, reviewer.password);
    const l = await signedIn(lead.email, lead.password);
    const ids: string[] = [];
    for (const code of ['TM-S03', 'TM-S05', 'TM-S07']) {
      const id = (await (await a.request(`/api/studies/${study.id}/analysis-sessions`, { method: 'POST', json: { subjectCode: code, fingerprint: 'c'.repeat(64) } })).json()).analysisSession.id;
      await a.request(`/api/analysis-sessions/${id}/recipe-versions`, { method: 'POST', json: { baseVersion: null, recipe: demoRecipe() } });
      await a.request(`/api/analysis-sessions/${id}/recipe-versions/1/summary`, { method: 'PUT', json: smallSummary() });
      ids.push(id);
    }
    await a.request(`/api/analysis-sessions/${ids[0]}/status`, { method: 'POST', json: { change: 'submit', recipeVersion: 1 } });
    await r.request(`/api/analysis-sessions/${ids[0]}/notes`, { method: 'POST', json: { body: 'Theta at Fz rises before the cue in trials 3–9; is the baseline window clean?', recipeVersion: 1, anchor: { channel: 'Fz', condition: 'lamp', timeS: [-0.4, 0], frequencyHz: [4, 8] } } });
    await l.request(`/api/analysis-sessions/${ids[0]}/status`, { method: 'POST', json: { change: 'return', recipeVersion: 1, password: lead.password, reason: 'Move the baseline to -0.6…-0.3 s and resubmit.' } });
    await a.request(`/api/analysis-sessions/${ids[0]}/recipe-versions`, { method: 'POST', json: { baseVersion: 1, recipe: demoRecipe() } });
    await a.request(`/api/analysis-sessions/${ids[0]}/recipe-versions/2/summary`, { method: 'PUT', json: smallSummary() });
    await a.request(`/api/analysis-sessions/${ids[2]}/status`, { method: 'POST', json: { change: 'submit', recipeVersion: 1 } });
    const since = await latestMailId();
    await l.request(`/api/analysis-sessions/${ids[2]}/status`, { method: 'POST', json: { change: 'signOff', recipeVersion: 1, password: lead.password } });
    const mail = await waitForMail(analyst.email, since, 10_000, `#session-${ids[2]}`);
    const link = /https?:\/\/\S+#session-\S+/.exec(mail.text)![0];

    const page = await signInPage(analyst.email, analyst.password);
    await page.goto(link.replace(/^https?:\/\/[^/]+/, appUrl));
    const target = page.locator(`#session-${ids[2]}`);
    await target.waitFor();
    expect(await target.evaluate((el) => el.matches(':target'))).toBe(true);
    const box = await target.boundingBox();
    expect(box!.y).toBeLessThan(900);
    expect(await target.getByTestId('signature-manifest').textContent()).toContain('approved (signed off)');
    await page.screenshot({ path: path.join(artifactsDir, 'review-study-session-anchor.png') });
    await page.locator('#activity').scrollIntoViewIfNeeded();
    expect(await page.getByTestId('activity-list').textContent()).toContain('signed off a session TM-S07');
    await page.screenshot({ path: path.join(artifactsDir, 'review-study-activity.png') });
    await page.goto(`${appUrl}/teams/${team.id}/studies/${study.id}#session-${ids[0]}`);
    await page.screenshot({ path: path.join(artifactsDir, 'review-study-returned.png') });
    expect(await page.locator(`#session-${ids[0]}`).textContent()).toContain('on version 1 (earlier version)');

    await page.goto(`${appUrl}/account`);
    await page.getByLabel('My session was returned or signed off').uncheck();
    await page.getByRole('button', { name: 'Save mail choices' }).click();
    await page.waitForURL(/\/account\/notifications$/);
    await page.getByTestId('mutes-saved').waitFor();
    expect(await page.getByLabel('My session was returned or signed off').isChecked()).toBe(false);
    expect(await page.getByLabel('Someone mentioned me in a note').isChecked()).toBe(true);
    await page.screenshot({ path: path.join(artifactsDir, 'review-notifications.png') });
    const { rows } = await pool.query('SELECT kind FROM mail_mutes WHERE user_id = $1', [analyst.user.id]);
    expect(rows.map((x) => x.kind)).toEqual(['review-outcome']);
    await page.context().close();
  });
});
