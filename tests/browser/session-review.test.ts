// The session page and the review flow in Chromium (issue 11): an analyst opens an EDF in the workspace and starts
// a session, brings in a command-line summary on the study page, asks for review on the session page; the lead
// returns it (password asked again, a wrong one refused in plain words) and later signs off; the manifest shows on
// the page and in the JSON export; a reviewer is offered no step. Every request body of the flow is recorded
// (page.on('request')) and none carries the patient field, the file name or a run of sample values.
// Offline: a second app instance is stopped while a note is posted; the note waits in IndexedDB with a visible
// state and arrives exactly once after the restart. Screenshots at 1440×900 in test-artifacts/.
import fs from 'node:fs';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser, BrowserContext, Page, Request } from 'playwright-core';
import { appUrl, artifactsDir, downloadFrom, launchBrowser } from '../helpers/browser';
import { pool } from '../helpers/app';
import { createMember, createTeam } from '../helpers/fixtures';
import { dropFile } from '../helpers/workspace';
import { freePort, startInstance, type Instance } from '../helpers/instance';
import { seededNormal } from '../helpers/seeded-random';
import { bytesSource, openEdf, toRecording, writeEdf } from '../../src/lib/formats';
import { analyzeChannel, assembleResult, planRun } from '../../src/lib/analysis/run-recipe';
import { buildSummary } from '../../src/lib/analysis/summary';
import { createHash } from 'node:crypto';

let browser: Browser;
let close: () => Promise<void>;
const FS = 200;
const NAMES = ['Fz', 'Cz', 'Pz', 'Oz'];
const PATIENT = 'QX-5521 M 11-NOV-1958 Barnaby_Wetherspoon-Quill';
const FILE_NAME = 'wetherspoon-quill-ward3.edf';
const recipe = {
  format: 2,
  epochs: { events: ['tug', 'slack'], start: -0.6, end: 1.4 },
  frequencies: { min: 4, max: 40, count: 10, spacing: 'log' },
  cycles: { min: 3, max: 6 },
  baseline: { start: -0.5, end: -0.2, method: 'decibel', scope: 'average' },
  spectrum: { segment: 1, overlap: 0.5, range: [1, 45], source: 'epochs' },
  aperiodic: { range: [2, 40], model: 'power-law' },
};
let edfBytes: Uint8Array;
let samples: Float32Array[];
let fingerprint: string;
let cliFile: string;

const bodies: { url: string; body: string }[] = [];
/** Writes whose body Chromium does not hand to the test (a FormData holding a File): checked apart below. */
const opaque: string[] = [];
function record(page: Page) {
  page.on('request', (r: Request) => {
    const body = r.postDataBuffer();
    if (body) bodies.push({ url: r.url(), body: body.toString('latin1') });
    else if (r.method() !== 'GET' && r.method() !== 'HEAD') opaque.push(r.url());
  });
}

async function signedInPage(base: string, email: string, password: string): Promise<{ context: BrowserContext; page: Page }> {
  const context = await browser.newContext({ viewport: { width: 1440, height: 900 }, acceptDownloads: true });
  const page = await context.newPage();
  record(page);
  await page.goto(`${base}/sign-in`);
  await page.getByLabel('E-mail').fill(email);
  await page.getByLabel('Password').fill(password);
  await page.getByRole('button', { name: /sign in/i }).click();
  await page.waitForURL((u) => !u.pathname.startsWith('/sign-in'));
  return { context, page };
}

beforeAll(async () => {
  ({ browser, close } = await launchBrowser());
  fs.mkdirSync(artifactsDir, { recursive: true });
  const normal = seededNormal(77);
  const n = FS * 60;
  const data = NAMES.map(() => Float32Array.from({ length: n }, () => Math.round(20 * normal()) / 4));
  edfBytes = writeEdf({
    patientIdentification: PATIENT,
    recordingIdentification: 'Startdate 11-NOV-2024 Quillfield-Hospital tech_Ambrose',
    start: { year: 2024, month: 11, day: 11, hour: 8, minute: 0, second: 0 },
    recordDurationSeconds: 1,
    signals: NAMES.map((name, c) => ({ label: `EEG ${name}`, physicalDimension: 'uV', physicalMin: -100, physicalMax: 100, samplesPerRecord: FS, samples: data[c] })),
    annotations: Array.from({ length: 28 }, (_, k) => ({ onsetSeconds: 2 + 2 * k, texts: [k % 2 === 0 ? 'tug' : 'slack'] })),
  });
  fingerprint = createHash('sha256').update(edfBytes).digest('hex');
  const edf = await openEdf(bytesSource(edfBytes));
  const rec = toRecording(edf);
  samples = rec.data;
  // The summary `analyze --summary` writes for this recording (same builder), as a command-line summary file.
  const { plan, recording } = planRun(rec, recipe);
  const channels = plan.channels.map((_, i) => analyzeChannel(plan, recording.data[plan.channelIndices[i]], { singleTrials: true }));
  assembleResult(plan, channels);
  const { summary } = buildSummary(plan, channels);
  cliFile = JSON.stringify({ format: 'tidemark-cli-summary-1', subjectCode: 'KS-12', fingerprint, recipe: { ...recipe, recording: { fingerprint } }, summary });
}, 120_000);
afterAll(async () => {
  await close();
  await pool.end();
});

describe('session page and review flow', () => {
  let team: { id: string };
  let study: { id: string };
  let lead: Awaited<ReturnType<typeof createMember>>;
  let reviewerPerson: Awaited<ReturnType<typeof createMember>>;
  let analyst: Awaited<ReturnType<typeof createMember>>;
  let sessionId: string;

  it('analyst: a session from the workspace, a summary brought in, review asked for; a second session refused', async () => {
    ({ team, study } = await createTeam('Quill review'));
    lead = await createMember(team.id, 'lead');
    reviewerPerson = await createMember(team.id, 'reviewer');
    analyst = await createMember(team.id, 'analyst');
    const { context, page } = await signedInPage(appUrl, analyst.email, analyst.password);
    await page.goto(`${appUrl}/teams/${team.id}/studies/${study.id}/workspace`);
    await dropFile(page, FILE_NAME, edfBytes);
    await page.getByTestId('recording-details').waitFor({ timeout: 30_000 });
    await page.getByLabel('Subject code').fill('KS-11');
    await page.getByRole('button', { name: 'Create analysis session' }).click();
    await page.getByTestId('session-created').waitFor();
    // the same subject and recording again: refused with the words that say what to do
    await page.getByRole('button', { name: 'Create analysis session' }).click();
    await page.waitForFunction(() => document.querySelector('[data-testid="session-problem"]')?.textContent?.includes('already has an analysis session'));
    expect(await page.getByTestId('session-problem').textContent()).toContain('Open that session and save a new recipe version there');

    // the study page's batch import, with a command-line summary of the same recording for subject KS-12
    await page.goto(`${appUrl}/teams/${team.id}/studies/${study.id}`);
    await page.locator('#summary-import summary').click();
    const dir = fs.mkdtempSync(path.join(artifactsDir, 'import-'));
    fs.writeFileSync(path.join(dir, 'KS-12.json'), cliFile);
    await page.getByLabel('Summary files (.json)').setInputFiles(path.join(dir, 'KS-12.json'));
    await page.getByTestId('import-verdict').waitFor();
    expect(await page.getByTestId('import-verdict').textContent()).toBe('The file is fine.');
    await page.screenshot({ path: path.join(artifactsDir, 'review-import-preview.png'), fullPage: true });
    await page.getByRole('button', { name: 'Bring in this file' }).click();
    await page.getByTestId('import-message').waitFor();
    expect(await page.getByTestId('import-message').textContent()).toContain('Brought in 1 session');
    await page.getByTestId('import-message').getByRole('link', { name: 'KS-12' }).click();
    await page.waitForURL(/\/sessions\/[0-9a-f-]+$/);
    sessionId = page.url().split('/').pop()!;
    await page.getByTestId('summary-overview').waitFor();
    expect(await page.getByTestId('review-steps').textContent()).toContain('Ask for review');
    await page.getByRole('button', { name: 'Ask for review' }).click();
    await page.waitForFunction(() => document.querySelector('[data-testid="session-status"]')?.textContent === 'in review');
    await page.screenshot({ path: path.join(artifactsDir, 'review-session-analyst.png'), fullPage: true });
    await context.close();
  }, 120_000);

  it('lead: returns with a reason (password asked again), then signs off; the manifest shows and is exported', async () => {
    const { context, page } = await signedInPage(appUrl, lead.email, lead.password);
    await page.goto(`${appUrl}/teams/${team.id}/studies/${study.id}`);
    await page.getByTestId('session-link').filter({ hasText: 'KS-12' }).click();
    await page.getByTestId('review-steps').waitFor();
    const offered = await page.getByTestId('review-steps').getByRole('button').allTextContents();
    expect(offered).toEqual(['Sign off', 'Return with a reason', 'Sign as reviewed', 'Download this session (JSON)']);
    await page.getByLabel('New note').fill('Alpha at Pz looks flat in the late window; is the baseline clean?');
    await page.getByRole('button', { name: 'Post note' }).click();
    await page.getByTestId('note').first().waitFor();

    await page.getByRole('button', { name: 'Return with a reason' }).click();
    const dialog = page.getByTestId('sign-dialog');
    await dialog.getByLabel('Why it goes back').fill('Move the baseline to −0.6…−0.3 s and resubmit.');
    await dialog.getByLabel('Your password, again').fill('not-the-password');
    await dialog.getByRole('button', { name: 'Return with a reason' }).click();
    await page.getByTestId('sign-problem').waitFor();
    expect(await page.getByTestId('sign-problem').textContent()).toBe('That is not your password. Nothing was signed.');
    await page.screenshot({ path: path.join(artifactsDir, 'review-session-sign-refused.png') });
    await dialog.getByLabel('Your password, again').fill(lead.password);
    await dialog.getByRole('button', { name: 'Return with a reason' }).click();
    await page.waitForFunction(() => document.querySelector('[data-testid="session-status"]')?.textContent === 'returned');
    expect(await page.getByTestId('return-reason').textContent()).toContain('Move the baseline');
    expect(await page.getByTestId('review-steps').getByRole('button').allTextContents()).toEqual(['Download this session (JSON)']);
    await context.close();

    // the analyst reads the note and asks again; the lead signs off
    const again = await signedInPage(appUrl, analyst.email, analyst.password);
    await again.page.goto(`${appUrl}/teams/${team.id}/studies/${study.id}/sessions/${sessionId}`);
    expect(await again.page.getByTestId('note').first().textContent()).toContain('Alpha at Pz');
    await again.page.getByRole('button', { name: 'Ask for review' }).click();
    await again.page.waitForFunction(() => document.querySelector('[data-testid="session-status"]')?.textContent === 'in review');
    await again.context.close();

    const signer = await signedInPage(appUrl, lead.email, lead.password);
    await signer.page.goto(`${appUrl}/teams/${team.id}/studies/${study.id}/sessions/${sessionId}`);
    await signer.page.getByRole('button', { name: 'Sign off' }).click();
    await signer.page.getByTestId('sign-dialog').getByLabel('Your password, again').fill(lead.password);
    await signer.page.getByTestId('sign-dialog').getByRole('button', { name: 'Sign off' }).click();
    await signer.page.waitForFunction(() => document.querySelector('[data-testid="session-status"]')?.textContent === 'signed off');
    const { rows } = await pool.query('SELECT printed_name, meaning, content_hash FROM signatures WHERE analysis_session_id = $1 ORDER BY signed_at', [sessionId]);
    expect(rows.map((r) => r.meaning)).toEqual(['returned', 'approved']);
    const manifest = await signer.page.getByTestId('signature-manifest').textContent();
    for (const r of rows) {
      expect(manifest).toContain(r.printed_name);
      expect(manifest).toContain(r.content_hash);
    }
    expect(manifest).toContain('approved (signed off)');
    expect(manifest).toContain('returned for changes: Move the baseline');
    await signer.page.screenshot({ path: path.join(artifactsDir, 'review-session-signed.png'), fullPage: true });
    const dir = fs.mkdtempSync(path.join(artifactsDir, 'export-'));
    const exported = JSON.parse((await downloadFrom(signer.page, 'export-session', dir)).bytes.toString('utf8'));
    expect(exported.format).toBe('tidemark-session-export-1');
    expect(exported.signatureManifest.map((s: { contentSha256: string; meaning: string; printedName: string }) => [s.meaning, s.contentSha256, s.printedName])).toEqual(rows.map((r) => [r.meaning, r.content_hash, r.printed_name]));
    expect(exported.summary.summary.channels).toEqual(NAMES);
    await signer.context.close();

    // a reviewer is offered no step, and told why in plain words
    const r = await signedInPage(appUrl, reviewerPerson.email, reviewerPerson.password);
    await r.page.goto(`${appUrl}/teams/${team.id}/studies/${study.id}/sessions/${sessionId}`);
    await r.page.getByTestId('no-steps').waitFor();
    expect(await r.page.getByTestId('review-steps').getByRole('button').allTextContents()).toEqual(['Download this session (JSON)']);
    expect(await r.page.getByTestId('no-steps').textContent()).toMatch(/^Signed off\./);
    expect(await r.page.getByTestId('signature-manifest').textContent()).toContain(rows[1].content_hash);
    await r.context.close();
  }, 180_000);

  it('offline: a note posted while the server is down waits in this browser and arrives exactly once', async () => {
    const port = await freePort();
    let app: Instance = await startInstance({ PORT: String(port) });
    const base = app.url;
    const { context, page } = await signedInPage(base, reviewerPerson.email, reviewerPerson.password);
    try {
      await page.goto(`${base}/teams/${team.id}/studies/${study.id}/sessions/${sessionId}`);
      await page.getByTestId('review-steps').waitFor();
      await app.stop();
      const text = `Offline note ${Date.now()}: checked the aperiodic fits on the train.`;
      await page.getByLabel('New note').fill(text);
      await page.getByRole('button', { name: 'Post note' }).click();
      await page.getByTestId('outbox-waiting').waitFor();
      await page.waitForFunction(() => document.querySelector('[data-testid="outbox-waiting"]')?.textContent?.includes('cannot be reached'));
      await page.screenshot({ path: path.join(artifactsDir, 'review-session-offline.png') });
      const stored = await page.evaluate(
        (db) =>
          new Promise<number>((resolve, reject) => {
            const open = indexedDB.open(db);
            open.onsuccess = () => {
              const req = open.result.transaction('items').objectStore('items').count();
              req.onsuccess = () => resolve(req.result);
              req.onerror = () => reject(req.error);
            };
            open.onerror = () => reject(open.error);
          }),
        `tidemark-outbox:${reviewerPerson.user.id}`,
      );
      expect(stored).toBe(1);
      expect((await pool.query('SELECT count(*)::int AS n FROM notes WHERE body = $1', [text])).rows[0].n).toBe(0);
      app = await startInstance({ PORT: String(port) });
      await page.getByTestId('outbox-waiting').waitFor({ state: 'detached', timeout: 30_000 });
      await page.locator('[data-testid="note"]', { hasText: 'Offline note' }).waitFor();
      // a reload retries nothing: the outbox is empty and the note is stored once
      await page.reload();
      await page.getByTestId('note-list').waitFor();
      await new Promise((r) => setTimeout(r, 1500));
      expect((await pool.query('SELECT count(*)::int AS n FROM notes WHERE body = $1', [text])).rows[0].n).toBe(1);
      expect(await page.locator('[data-testid="note"]', { hasText: 'Offline note' }).count()).toBe(1);
    } finally {
      await context.close();
      await app.stop();
    }
  }, 180_000);

  it('no request body of the flow carries the patient field, the file name or a run of samples', () => {
    expect(bodies.length).toBeGreaterThan(10);
    const forbidden = ['Barnaby', 'Wetherspoon', 'QX-5521', '11-NOV-1958', 'Quillfield', 'Ambrose', FILE_NAME, 'wetherspoon-quill', 'ward3'];
    const runs = new Set<string>();
    // every window of 4 consecutive samples of every channel, as JS would print them
    for (const ch of samples) for (let i = 0; i + 4 <= ch.length; i += 1) runs.add(Array.from(ch.subarray(i, i + 4)).join(','));
    const urls = new Set<string>();
    for (const { url, body } of bodies) {
      urls.add(new URL(url).pathname.replace(/[0-9a-f-]{36}/g, ':id'));
      const folded = body.toLowerCase();
      for (const f of forbidden) expect(folded.includes(f.toLowerCase()), `${f} in ${url}`).toBe(false);
      const numbers = body.match(/-?\d+(?:\.\d+)?(?:e-?\d+)?/gi) ?? [];
      for (let i = 0; i + 4 <= numbers.length; i++) {
        const key = numbers.slice(i, i + 4).map(Number).join(',');
        expect(runs.has(key), `a run of samples in ${url}: ${key}`).toBe(false);
      }
    }
    // the flow's writes were all seen
    for (const p of ['/api/studies/:id/analysis-sessions', '/api/analysis-sessions/:id/status', '/api/analysis-sessions/:id/notes']) expect([...urls]).toContain(p);
    // The one write whose body Chromium keeps from the test is the multipart import (a File part): its parts are the
    // intent, and the chosen file renamed to its position; the file's bytes are the command-line summary checked here.
    expect(opaque.map((u) => new URL(u).pathname.replace(/[0-9a-f-]{36}/g, ':id'))).toEqual(['/api/studies/:id/summary-imports', '/api/studies/:id/summary-imports']);
    for (const f of forbidden) expect(cliFile.toLowerCase().includes(f.toLowerCase()), `${f} in the imported file`).toBe(false);
    const numbers = cliFile.match(/-?\d+(?:\.\d+)?(?:e-?\d+)?/gi) ?? [];
    for (let i = 0; i + 4 <= numbers.length; i++) expect(runs.has(numbers.slice(i, i + 4).map(Number).join(',')), 'a run of samples in the imported file').toBe(false);
  });
});
