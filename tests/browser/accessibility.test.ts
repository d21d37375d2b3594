// Accessibility (issue 13, item 6): axe-core (Deque's open rules engine, an independent general-purpose library)
// run in Chromium over every server page and the workspace screens, against the WCAG 2.0/2.1 A and AA rules
// (W3C, Web Content Accessibility Guidelines 2.1). Each screen is one entry of SCREENS: to cover another screen
// add an entry that gets the page there; the check and its report are the same for all.
import fs from 'node:fs';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser, Page } from 'playwright-core';
import { appUrl, artifactsDir, launchBrowser } from '../helpers/browser';
import { Client, pool, waitForMail } from '../helpers/app';
import { db, pool as dbPool } from '../../src/db/client';
import { users } from '../../src/db/schema';
import { hashPassword } from '../../src/lib/crypto/password';
import { newUserId } from '../../src/lib/crypto/ids';
import { DEMO_PEOPLE, DEMO_TEAM } from '../../src/db/seed';
import { describeCohort, writeSubjectEdf } from '../../src/lib/demo/cohort';
import { DEMO_STUDY, dropFile, signInAs } from '../helpers/workspace';

const AXE = path.resolve('node_modules/axe-core/axe.min.js');
const WCAG_TAGS = ['wcag2a', 'wcag2aa', 'wcag21a', 'wcag21aa'];

type Who = 'signed out' | 'operator' | 'lead' | 'analyst' | 'reviewer' | 'no team';
interface Ids {
  teamId: string;
  studyId: string;
  sessionId: string;
}
interface Screen {
  name: string;
  who: Who;
  /** Goes to the screen (signed in as `who` already) and waits until it is drawn. */
  reach: (page: Page, ids: Ids) => Promise<void>;
}

let browser: Browser;
let close: () => Promise<void>;
let ids: Ids;
const teamless = { email: `no-team-${Date.now().toString(36)}@fixture.example`, password: 'fixture-password-1' };
// A 20 s recording of the invented Harbour Lights scenario (demo generator), small enough to open quickly.
let recordingBytes: Uint8Array;

const goto = (url: string) => async (page: Page, i: Ids) => {
  await page.goto(`${appUrl}${url.replace(':team', i.teamId).replace(':study', i.studyId).replace(':session', i.sessionId)}`);
  await page.waitForLoadState('networkidle');
};

/** The workspace of the demo study with the small recording open on the Source screen. */
async function openRecordingInWorkspace(page: Page, i: Ids) {
  await page.goto(`${appUrl}/teams/${i.teamId}/studies/${i.studyId}/workspace`);
  await dropFile(page, 'tm-axe-check-81.edf', recordingBytes);
  await page.getByTestId('recording-details').waitFor({ timeout: 60_000 });
  await page.getByTestId('epoch-table').waitFor({ timeout: 60_000 });
}

/** The small recording opened and decomposed (12 frequencies, phase consistency on), then the screen `tab`. */
async function decomposedTab(page: Page, i: Ids, tab: string) {
  await openRecordingInWorkspace(page, i);
  await page.getByRole('tab', { name: 'Recipe' }).click();
  await page.getByTestId('recipe-fcount').fill('12');
  await page.getByTestId('recipe-itpc').check();
  await page.getByTestId('recipe-run').click();
  await page.waitForFunction(() => document.querySelector('[data-testid="recipe-status"]')?.getAttribute('data-status') === 'done', undefined, { timeout: 120_000 });
  await page.getByRole('tab', { name: tab }).click();
  await page.locator(`[role="tabpanel"]:not([hidden])`).first().waitFor();
  await page.waitForLoadState('networkidle');
  await page.waitForTimeout(500);
}

async function workspaceTab(page: Page, i: Ids, tab: string) {
  await openRecordingInWorkspace(page, i);
  await page.getByRole('tab', { name: tab }).click();
  await page.locator(`#panel-${tab}:not([hidden])`).waitFor();
  await page.waitForLoadState('networkidle');
}

export const SCREENS: Screen[] = [
  { name: 'sign-in', who: 'signed out', reach: goto('/sign-in') },
  { name: 'forgot password', who: 'signed out', reach: goto('/forgot-password') },
  { name: 'reset password (unknown link)', who: 'signed out', reach: goto('/reset-password/not-a-real-token') },
  { name: 'invitation (unknown link)', who: 'signed out', reach: goto('/invitations/not-a-real-token') },
  { name: 'landing (signed in, no team)', who: 'no team', reach: goto('/') },
  { name: 'team home', who: 'lead', reach: goto('/teams/:team') },
  { name: 'members', who: 'lead', reach: goto('/teams/:team/members') },
  { name: 'study', who: 'lead', reach: goto('/teams/:team/studies/:study') },
  { name: 'session', who: 'lead', reach: async (page, i) => {
    await goto('/teams/:team/studies/:study/sessions/:session')(page, i);
    await page.getByTestId('session-review').or(page.locator('main h1')).first().waitFor();
  } },
  { name: 'cohort', who: 'lead', reach: async (page, i) => {
    await goto('/teams/:team/studies/:study/cohort')(page, i);
    await page.locator('[data-testid="cohort-screen"][data-ready="yes"]').waitFor({ timeout: 60_000 });
  } },
  { name: 'cohort report', who: 'lead', reach: goto('/teams/:team/studies/:study/cohort/report') },
  { name: 'account', who: 'analyst', reach: goto('/account') },
  { name: 'account notifications', who: 'analyst', reach: goto('/account/notifications') },
  { name: 'site: people', who: 'operator', reach: goto('/admin') },
  { name: 'site: teams', who: 'operator', reach: goto('/admin/teams') },
  { name: 'site: audit', who: 'operator', reach: goto('/admin/audit') },
  { name: 'mailbox (dev)', who: 'operator', reach: async (page, i) => {
    // A message with a link in it, so the page shows what it lists: a reset asked for the teamless fixture account.
    await new Client().post('/forgot-password', { email: teamless.email });
    await waitForMail(teamless.email, 0, 20_000);
    await goto('/dev/mailbox')(page, i);
    await page.locator('[data-testid="mailbox"] pre a').first().waitFor();
  } },
  { name: 'workspace: Source (recording open)', who: 'analyst', reach: openRecordingInWorkspace },
  { name: 'workspace: Source (reviewer)', who: 'reviewer', reach: openRecordingInWorkspace },
  { name: 'workspace: Recipe', who: 'analyst', reach: (page, i) => workspaceTab(page, i, 'Recipe') },
  { name: 'workspace: Outbound', who: 'analyst', reach: (page, i) => workspaceTab(page, i, 'Outbound') },
  { name: 'workspace: Maps (decomposed)', who: 'analyst', reach: async (page, i) => {
    await decomposedTab(page, i, 'Maps');
    await page.getByTestId('map-normalized').waitFor({ timeout: 60_000 });
  } },
  { name: 'workspace: Spectrum (decomposed)', who: 'analyst', reach: async (page, i) => {
    await decomposedTab(page, i, 'Spectrum');
    await page.getByTestId('spectrum-plot').waitFor({ timeout: 60_000 });
  } },
  { name: 'workspace: Bands (decomposed)', who: 'analyst', reach: (page, i) => decomposedTab(page, i, 'Bands') },
  { name: 'workspace: Slope check (decomposed)', who: 'analyst', reach: (page, i) => decomposedTab(page, i, 'Slope check') },
];

interface Finding {
  rule: string;
  impact: string | null;
  help: string;
  nodes: { target: string; summary: string }[];
}

/** axe-core over the whole document with the WCAG 2.0/2.1 A and AA tags; returns the violations in short. */
async function axeViolations(page: Page): Promise<Finding[]> {
  await page.addScriptTag({ path: AXE });
  return page.evaluate(async (tags) => {
    const axe = (window as unknown as { axe: { run: (ctx: Document, opts: unknown) => Promise<{ violations: { id: string; impact: string | null; help: string; nodes: { target: unknown[]; failureSummary?: string }[] }[] }> } }).axe;
    const result = await axe.run(document, { runOnly: { type: 'tag', values: tags } });
    return result.violations.map((v) => ({
      rule: v.id,
      impact: v.impact,
      help: v.help,
      nodes: v.nodes.slice(0, 5).map((n) => ({ target: n.target.map(String).join(' '), summary: (n.failureSummary ?? '').split('\n').slice(0, 2).join(' ') })),
    }));
  }, WCAG_TAGS);
}

async function signIn(page: Page, who: Who) {
  if (who === 'signed out') return;
  if (who === 'no team') {
    await page.goto(`${appUrl}/sign-in`);
    await page.getByLabel('E-mail').fill(teamless.email);
    await page.getByLabel('Password').fill(teamless.password);
    await page.getByRole('button', { name: 'Sign in' }).click();
    await page.waitForURL((u) => u.pathname === '/');
    return;
  }
  const person = DEMO_PEOPLE.find((p) => p.role === who)!;
  if (who === 'operator') {
    await page.goto(`${appUrl}/sign-in`);
    await page.getByLabel('E-mail').fill(person.email);
    await page.getByLabel('Password').fill(person.password);
    await page.getByRole('button', { name: 'Sign in' }).click();
    await page.waitForURL(/\/admin$/);
    return;
  }
  await signInAs(page, person);
}

beforeAll(async () => {
  ({ browser, close } = await launchBrowser());
  fs.mkdirSync(artifactsDir, { recursive: true });
  recordingBytes = writeSubjectEdf(describeCohort({ subjects: 1, seconds: 20 }).subjects[0]);
  const { rows } = await pool.query(
    `SELECT t.id AS team_id, s.id AS study_id, (SELECT a.id FROM analysis_sessions a WHERE a.study_id = s.id ORDER BY a.created_at LIMIT 1) AS session_id
       FROM teams t JOIN studies s ON s.team_id = t.id WHERE t.slug = $1 AND s.name = $2`,
    [DEMO_TEAM.slug, DEMO_STUDY],
  );
  if (!rows[0]?.session_id) throw new Error('The demo study has no analysis session: the seed should have brought in the demo summaries.');
  ids = { teamId: rows[0].team_id, studyId: rows[0].study_id, sessionId: rows[0].session_id };
  await db.insert(users).values({ id: newUserId(), email: teamless.email, displayName: 'Fixture without a team', passwordHash: await hashPassword(teamless.password) });
}, 120_000);

afterAll(async () => {
  await close();
  await pool.end();
  await dbPool.end();
});

describe('axe-core finds no WCAG 2.1 A/AA violation', () => {
  for (const screen of SCREENS) {
    it(`${screen.name} (${screen.who})`, async () => {
      // The pages' Content-Security-Policy allows only hashed inline scripts; axe is injected by the test alone.
      const context = await browser.newContext({ viewport: { width: 1440, height: 900 }, bypassCSP: true });
      const page = await context.newPage();
      try {
        await signIn(page, screen.who);
        await screen.reach(page, ids);
        const found = await axeViolations(page);
        // What axe looked at, to read beside its report (1440 × 900, the first screenful).
        await page.screenshot({ path: path.join(artifactsDir, `screen-${screen.name.replace(/[^a-z0-9]+/gi, '-')}.png`) });
        expect(found, JSON.stringify(found, null, 2)).toEqual([]);
      } finally {
        await context.close();
      }
    }, 180_000);
  }
});
