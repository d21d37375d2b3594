// Team review through the workspace (issue 11, items 4–6), in Chromium with two people in two browser contexts: an
// analyst starts an analysis session on a demo recording, saves a version (its summary computed in the browser)
// and asks for review; the lead opens the session in the workspace with the same demo file (the fingerprint is
// checked, the stored recipe re-run), pins a note on a region of a map and returns the session; the analyst reopens
// it from this browser's library, sees the pin, moves the baseline, saves and asks again; the lead signs off with
// the password; the manifest shows on the session's page and in its export. A file with another fingerprint is
// refused with both fingerprints named. Every request body is recorded: none carries the demo header's patient
// field, nor the other file's name or patient field. Screenshots at 1440×900 in test-artifacts/.
import fs from 'node:fs';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser, BrowserContext, Page } from 'playwright-core';
import { appUrl, artifactsDir, downloadFrom, launchBrowser } from '../helpers/browser';
import { pool } from '../helpers/app';
import { createMember, createTeam } from '../helpers/fixtures';
import { dropFile, openDemoRecording, runOnChannels } from '../helpers/workspace';
import { seededNormal } from '../helpers/seeded-random';
import { DEMO_PATIENT_FIELD } from '../../src/lib/demo/cohort';
import { writeEdf } from '../../src/lib/formats';

let browser: Browser;
let close: () => Promise<void>;
const CHANNELS = ['Fz', 'Cz', 'Pz'];
const bodies: { url: string; body: string }[] = [];

let team: { id: string };
let study: { id: string };
let lead: Awaited<ReturnType<typeof createMember>>;
let analyst: Awaited<ReturnType<typeof createMember>>;
let demoFile = '';
// Another subject's recording on the lead's disk (a scenario of our own): its header and name stay on the device.
const OTHER_FILE = 'zq-lowmoor-visit2.edf';
const OTHER_PATIENT = 'QX-7781 F 02-FEB-1970 Zebediah_Quarrington';
let otherBytes: Uint8Array;
let sessionId = '';
/** The analyst's browser stays open between their turns: its library keeps the demo file, as a person's would. */
let analystContext: BrowserContext;
let analystPage: Page;
const NOTE = 'Theta burst here looks like eye movement; is the baseline clean?';
const KEY_NOTE = 'Pinned by keyboard: compare this band with the oar-pull condition.';

async function signedIn(person: { email: string; password: string }): Promise<{ context: BrowserContext; page: Page }> {
  const context = await browser.newContext({ viewport: { width: 1440, height: 900 }, acceptDownloads: true });
  const page = await context.newPage();
  page.on('request', (r) => {
    const body = r.postDataBuffer();
    if (body) bodies.push({ url: r.url(), body: body.toString('utf8') });
  });
  await page.goto(`${appUrl}/sign-in`);
  await page.getByLabel('E-mail').fill(person.email);
  await page.getByLabel('Password').fill(person.password);
  await page.getByRole('button', { name: /sign in/i }).click();
  await page.waitForURL((u) => !u.pathname.startsWith('/sign-in'));
  return { context, page };
}

const sessionPage = () => `${appUrl}/teams/${team.id}/studies/${study.id}/sessions/${sessionId}`;
const shot = (page: Page, name: string, fullPage = false) => page.screenshot({ path: path.join(artifactsDir, `review-flow-${name}.png`), fullPage });
const waitAttr = (page: Page, testId: string, attr: string, value: string, timeout = 90_000) =>
  page.waitForFunction(([t, a, v]) => document.querySelector(`[data-testid="${t}"]`)?.getAttribute(a) === v, [testId, attr, value] as const, { timeout });

/**
 * Waits until the session bar has left `from` and settled on a phase, and fails with its words (and a screenshot)
 * when that is not `want`.
 */
async function settled(page: Page, from: string, want: string, timeout = 120_000) {
  try {
    await page.waitForFunction(
      (f) => {
        const phase = document.querySelector('[data-testid="session-bar"]')?.getAttribute('data-phase') ?? '';
        return phase !== f && ['ready', 'failed', 'mismatch', 'needs-file'].includes(phase);
      },
      from,
      { timeout },
    );
  } catch (error) {
    await shot(page, `stuck-${from}`, true);
    throw error;
  }
  const phase = await page.getByTestId('session-bar').getAttribute('data-phase');
  if (phase !== want) await shot(page, `unexpected-${phase}`, true);
  expect(`${phase}: ${await page.getByTestId('session-bar').textContent()}`).toMatch(new RegExp(`^${want}:`));
}

beforeAll(async () => {
  ({ browser, close } = await launchBrowser());
  fs.mkdirSync(artifactsDir, { recursive: true });
  const normal = seededNormal(41);
  otherBytes = writeEdf({
    patientIdentification: OTHER_PATIENT,
    recordingIdentification: 'Startdate 02-FEB-2025 Lowmoor-Clinic',
    start: { year: 2025, month: 2, day: 2, hour: 9, minute: 0, second: 0 },
    recordDurationSeconds: 1,
    signals: ['Fz', 'Cz', 'Pz'].map((name) => ({ label: `EEG ${name}`, physicalDimension: 'uV', physicalMin: -100, physicalMax: 100, samplesPerRecord: 200, samples: Float32Array.from({ length: 200 * 30 }, () => Math.round(20 * normal()) / 4) })),
    annotations: Array.from({ length: 12 }, (_, k) => ({ onsetSeconds: 2 + 2 * k, texts: ['lamp-watch'] })),
  });
  ({ team, study } = await createTeam('Tide review'));
  lead = await createMember(team.id, 'lead');
  analyst = await createMember(team.id, 'analyst');
}, 60_000);
afterAll(async () => {
  await close();
  await pool.end();
});

describe('review through the workspace, two people', () => {
  it('analyst: starts a session on a demo recording, saves a version with its summary, asks for review', async () => {
    ({ context: analystContext, page: analystPage } = await signedIn(analyst));
    const page = analystPage;
    await page.goto(`${appUrl}/teams/${team.id}/studies/${study.id}/workspace`);
    demoFile = await openDemoRecording(page);
    expect(await page.getByLabel('Subject code').inputValue()).not.toBe('');
    await page.getByRole('button', { name: 'Create analysis session' }).click();
    await page.getByTestId('session-bar').waitFor();
    await page.getByTestId('session-created').waitFor();
    // leave it, and a second start for the same subject and recording is refused in the server's words, with a
    // way to continue the one that exists
    await page.getByRole('button', { name: 'Leave the session' }).click();
    await page.getByTestId('session-bar').waitFor({ state: 'detached' });
    await page.getByRole('button', { name: 'Create analysis session' }).click();
    await page.getByTestId('session-problem').waitFor();
    expect(await page.getByTestId('session-problem').textContent()).toContain('already has an analysis session for this recording');
    await page.getByRole('button', { name: 'Continue that session here' }).click();
    await page.getByTestId('session-bar').waitFor();
    expect((await pool.query('SELECT count(*)::int AS n FROM analysis_sessions WHERE study_id = $1', [study.id])).rows[0].n).toBe(1);
    await runOnChannels(page, CHANNELS);
    await page.getByTestId('save-version').click();
    await waitAttr(page, 'save-version-state', 'data-state', 'saved');
    expect(await page.getByTestId('save-version-state').textContent()).toMatch(/^Saved as version \d with its summary/);
    await shot(page, 'analyst-saved');
    sessionId = (await page.getByTestId('session-bar-page').getAttribute('href'))!.split('/').pop()!;
    // The summary uploaded is the one the browser's builder computed over the three channels.
    const { rows } = await pool.query(
      'SELECT s.summary FROM summaries s JOIN recipe_versions v ON v.id = s.recipe_version_id WHERE v.analysis_session_id = $1',
      [sessionId],
    );
    expect(rows).toHaveLength(1);
    expect(rows[0].summary.channels).toEqual(CHANNELS);

    await page.getByTestId('session-bar-page').click();
    await page.getByRole('button', { name: 'Ask for review' }).click();
    await page.waitForFunction(() => document.querySelector('[data-testid="session-status"]')?.textContent === 'in review');
  }, 240_000);

  it('lead: another file is refused by fingerprint; the same demo file re-runs the recipe; a note is pinned; returned', async () => {
    const { context, page } = await signedIn(lead);
    await page.goto(sessionPage());
    await page.getByTestId('open-in-workspace').click();
    await page.waitForURL(/\/workspace\?session=/);
    await waitAttr(page, 'session-bar', 'data-phase', 'needs-file');
    expect(await page.getByTestId('session-bar-match').textContent()).toMatch(/Open the recording with SHA-256 [0-9a-f]{12}…/);

    // another subject's file: refused, both fingerprints shortened, nothing of the session applied
    await dropFile(page, OTHER_FILE, otherBytes);
    await waitAttr(page, 'session-bar', 'data-phase', 'mismatch');
    const refusal = (await page.getByTestId('session-bar-match').textContent()) ?? '';
    expect(refusal).toMatch(/not the session’s recording: the open file’s SHA-256 begins [0-9a-f]{12}…, the session’s begins [0-9a-f]{12}…/);
    const [opened, stored] = [...refusal.matchAll(/begins ([0-9a-f]{12})…/g)].map((m) => m[1]);
    expect(opened).not.toBe(stored);
    const { rows } = await pool.query('SELECT fingerprint FROM analysis_sessions WHERE id = $1', [sessionId]);
    expect(rows[0].fingerprint.startsWith(stored)).toBe(true);
    await shot(page, 'lead-mismatch');

    await openDemoRecording(page, demoFile);
    await settled(page, 'mismatch', 'ready');
    await page.getByRole('tab', { name: 'Maps' }).click();
    const canvas = page.getByTestId('map-normalized');
    await canvas.waitFor();
    await page.getByTestId('map-notes').waitFor();
    await page.getByTestId('pin-mode').click();
    // drag from 0.2 s / high to 0.6 s / low on the normalized map, through the panel's own plot geometry
    const box = (await canvas.boundingBox())!;
    const attr = async (n: string) => Number(await canvas.getAttribute(n));
    const [left, top, w, h] = await Promise.all(['data-plot-left', 'data-plot-top', 'data-plot-width', 'data-plot-height'].map(attr));
    const x = (fraction: number) => box.x + left + fraction * w;
    const y = (fraction: number) => box.y + top + fraction * h;
    await page.mouse.move(x(0.45), y(0.35));
    await page.mouse.down();
    await page.mouse.move(x(0.55), y(0.5), { steps: 4 });
    await page.mouse.move(x(0.6), y(0.65), { steps: 4 });
    await page.mouse.up();
    const form = page.getByTestId('pin-form');
    await form.waitFor();
    expect(await form.textContent()).toMatch(/Note at Fz · \S+ · -?[\d.]+…[\d.]+ s · [\d.]+…[\d.]+ Hz/);
    await form.getByRole('textbox').fill(NOTE);
    await page.getByTestId('map-normalized-pending-pin').waitFor();
    await shot(page, 'lead-pinning');
    await form.getByRole('button', { name: 'Post the note' }).click();
    await page.getByTestId('map-normalized-pin').waitFor({ timeout: 30_000 });
    expect(await page.getByTestId('map-note').first().textContent()).toContain(NOTE);
    const note = (await pool.query('SELECT v.number AS recipe_version, n.anchor FROM notes n JOIN recipe_versions v ON v.id = n.recipe_version_id WHERE n.analysis_session_id = $1 AND n.body = $2', [sessionId, NOTE])).rows;
    expect(note).toHaveLength(1);
    expect(note[0].recipe_version).toBe(1);
    expect(note[0].anchor.channel).toBe('Fz');
    expect(note[0].anchor.timeS[1]).toBeGreaterThan(note[0].anchor.timeS[0]);
    expect(note[0].anchor.frequencyHz[1]).toBeGreaterThan(note[0].anchor.frequencyHz[0]);
    await shot(page, 'lead-pinned');

    // the same by keyboard: the region picker is one tab stop on the normalized map
    await page.getByTestId('pin-mode').click();
    const picker = page.getByTestId('map-normalized-pin-layer');
    await picker.focus();
    for (const key of ['ArrowRight', 'ArrowRight', 'ArrowUp']) await page.keyboard.press(key);
    for (const key of ['Shift+ArrowRight', 'Shift+ArrowRight', 'Shift+ArrowRight', 'Shift+ArrowDown']) await page.keyboard.press(key);
    await page.getByTestId('map-normalized-pin-keys').waitFor();
    await page.keyboard.press('Enter');
    await form.waitFor();
    await form.getByRole('textbox').fill(KEY_NOTE);
    await form.getByRole('button', { name: 'Post the note' }).click();
    await expect.poll(() => page.getByTestId('map-normalized-pin').count(), { timeout: 30_000 }).toBe(2);
    const keyed = (await pool.query('SELECT n.anchor FROM notes n WHERE n.analysis_session_id = $1 AND n.body = $2', [sessionId, KEY_NOTE])).rows;
    expect(keyed).toHaveLength(1);
    // four time cells and two frequency rows: wider in time than one cell, the frequency range spans two rows
    const [t0, t1] = keyed[0].anchor.timeS;
    const [f0, f1] = keyed[0].anchor.frequencyHz;
    expect(t1 - t0).toBeGreaterThan(0);
    expect(f1 / f0).toBeGreaterThan(1);

    await page.getByTestId('session-bar-page').click();
    await page.getByRole('button', { name: 'Return with a reason' }).click();
    const dialog = page.getByTestId('sign-dialog');
    await dialog.getByLabel('Why it goes back').fill('Move the baseline to −0.6…−0.3 s, away from the pinned burst, and resubmit.');
    await dialog.getByLabel('Your password, again').fill(lead.password);
    await dialog.getByRole('button', { name: 'Return with a reason' }).click();
    await page.waitForFunction(() => document.querySelector('[data-testid="session-status"]')?.textContent === 'returned');
    await context.close();
  }, 240_000);

  it('analyst: reopens from this browser’s library, sees the pin, moves the baseline, saves and asks again', async () => {
    const page = analystPage;
    await page.goto(sessionPage());
    await page.getByTestId('open-in-workspace').click();
    await page.getByTestId('session-bar-library').click();
    await settled(page, 'needs-file', 'ready');
    expect(await page.getByTestId('session-bar-returned').textContent()).toContain('Move the baseline');
    await page.getByRole('tab', { name: 'Maps' }).click();
    await page.getByTestId('map-normalized').waitFor();
    const entry = page.getByTestId('map-note').filter({ hasText: NOTE });
    await entry.click();
    expect(await entry.getAttribute('aria-pressed')).toBe('true');
    await page.waitForFunction(() => document.querySelector('[data-testid="map-normalized-pin"][data-selected="yes"]') !== null);
    expect(await page.getByTestId('map-normalized-pin').count()).toBe(2);
    expect(await page.getByTestId('maps-channel').inputValue()).toBe('Fz');
    await shot(page, 'analyst-sees-pin');

    await page.getByTestId('baseline-start').fill('-0.6');
    await page.getByTestId('baseline-end').fill('-0.3');
    // autosave: a few quiet seconds later the changed recipe is queued as version 2, without a summary yet
    await waitAttr(page, 'autosave-state', 'data-state', 'queued', 30_000);
    await expect
      .poll(async () => (await pool.query('SELECT v.number, s.recipe_version_id IS NOT NULL AS summarized FROM recipe_versions v LEFT JOIN summaries s ON s.recipe_version_id = v.id WHERE v.analysis_session_id = $1 ORDER BY v.number', [sessionId])).rows, { timeout: 15_000 })
      .toEqual([{ number: 1, summarized: true }, { number: 2, summarized: false }]);
    // "Save as version" finds version 2 holding this recipe and adds its summary (no third version)
    await page.getByTestId('save-version').click();
    await waitAttr(page, 'save-version-state', 'data-state', 'saved');
    // the lead's note was written on version 1; the maps now show version 2 and the pin says where it pointed then
    await page.waitForFunction(() => document.querySelector('[data-testid="map-note"]')?.getAttribute('data-older') === 'yes');
    expect(await page.getByTestId('map-note').filter({ hasText: NOTE }).textContent()).toContain('Written on version 1');
    expect(await page.getByTestId('map-normalized-pin').evaluateAll((pins) => pins.map((p) => p.getAttribute('data-older')))).toEqual(['yes', 'yes']);
    await shot(page, 'analyst-older-pin');
    const versions = (await pool.query('SELECT v.number, v.recipe->\'baseline\' AS baseline, s.recipe_version_id IS NOT NULL AS summarized FROM recipe_versions v LEFT JOIN summaries s ON s.recipe_version_id = v.id WHERE v.analysis_session_id = $1 ORDER BY v.number', [sessionId])).rows;
    expect(versions.map((v) => v.number)).toEqual([1, 2]);
    const last = versions[versions.length - 1];
    expect(last.baseline.start).toBeCloseTo(-0.6, 6);
    expect(last.baseline.end).toBeCloseTo(-0.3, 6);
    expect(last.summarized).toBe(true);

    await page.getByTestId('session-bar-page').click();
    await page.getByRole('button', { name: 'Ask for review' }).click();
    await page.waitForFunction(() => document.querySelector('[data-testid="session-status"]')?.textContent === 'in review');
    await analystContext.close();
  }, 240_000);

  it('lead: signs off with the password; the manifest shows on the page and in the export', async () => {
    const { context, page } = await signedIn(lead);
    await page.goto(sessionPage());
    await page.getByRole('button', { name: 'Sign off' }).click();
    await page.getByTestId('sign-dialog').getByLabel('Your password, again').fill(lead.password);
    await page.getByTestId('sign-dialog').getByRole('button', { name: 'Sign off' }).click();
    await page.waitForFunction(() => document.querySelector('[data-testid="session-status"]')?.textContent === 'signed off');
    const { rows } = await pool.query('SELECT printed_name, meaning, content_hash, recipe_version_number AS recipe_version FROM signatures WHERE analysis_session_id = $1 ORDER BY signed_at', [sessionId]);
    expect(rows.map((r) => r.meaning)).toEqual(['returned', 'approved']);
    const manifest = (await page.getByTestId('signature-manifest').textContent()) ?? '';
    for (const r of rows) expect(manifest).toContain(r.content_hash);
    await shot(page, 'lead-signed', true);
    const dir = fs.mkdtempSync(path.join(artifactsDir, 'review-flow-export-'));
    const exported = JSON.parse((await downloadFrom(page, 'export-session', dir)).bytes.toString('utf8'));
    expect(exported.signatureManifest.map((s: { meaning: string; contentSha256: string; recipeVersion: number }) => [s.meaning, s.contentSha256, s.recipeVersion])).toEqual(rows.map((r) => [r.meaning, r.content_hash, r.recipe_version]));
    expect(exported.summary.summary.channels).toEqual(CHANNELS);
    await context.close();
  }, 120_000);

  it('sent no request body holding the demo header’s patient field', () => {
    expect(bodies.length).toBeGreaterThan(5);
    for (const b of bodies) {
      for (const secret of [DEMO_PATIENT_FIELD, OTHER_PATIENT, 'Quarrington', OTHER_FILE]) expect(b.body.includes(secret), b.url).toBe(false);
    }
  });
});
