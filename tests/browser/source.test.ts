import { createHash } from 'node:crypto';
import fs from 'node:fs';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser, BrowserContext, Page, Request } from 'playwright-core';
import { appUrl, artifactsDir, launchBrowser } from '../helpers/browser';
import { DEMO_PATIENT_FIELD, describeCohort, writeSubjectEdf, type SubjectParameters } from '../../src/lib/demo/cohort';
import { bytesSource, openEdf } from '../../src/lib/formats';
import { openWorkspace, dropFile } from '../helpers/workspace';

// A small recording from the demo generator (invented "Harbour Lights" scenario): 1 subject, 60 s, 32 channels.
// The file name is our own, so we can prove it never reaches the server.
const FILE_NAME = 'tm-privacy-check-61.edf';
const BROKEN_NAME = 'tm-broken-header-62.edf';

let browser: Browser;
let close: () => Promise<void>;
let subject: SubjectParameters;
let bytes: Uint8Array;
let recordingField: string;
let sampleTexts: string[];

beforeAll(async () => {
  ({ browser, close } = await launchBrowser());
  fs.mkdirSync(artifactsDir, { recursive: true });
  subject = describeCohort({ subjects: 1, seconds: 60 }).subjects[0];
  bytes = writeSubjectEdf(subject);
  const edf = await openEdf(bytesSource(bytes));
  recordingField = edf.identifying.recordingIdentification;
  // Sample values as a page would print them (µV, one decimal: the file's digital step is 0.1 µV).
  sampleTexts = [...edf.channels[0].samples.subarray(1000, 1010)].map((v) => v.toFixed(1)).filter((t) => t.replace('-', '').length >= 3);
});
afterAll(() => close());

async function signIn(context: BrowserContext, role: 'analyst' | 'reviewer'): Promise<Page> {
  const page = await context.newPage();
  await openWorkspace(page, role);
  await page.getByTestId('drop-zone').waitFor();
  return page;
}

/** The Source screen's epoch window form (the default is −1 … 2 s; these checks were worked out for −0.5 … 1.5 s). */
async function setWindow(page: Page, start: number, end: number) {
  const form = page.getByRole('form', { name: 'Epoch window' });
  await form.getByLabel('Epoch start (s)').fill(String(start));
  await form.getByLabel('Epoch end (s)').fill(String(end));
  await form.getByRole('button', { name: 'Apply window' }).click();
}

interface Seen {
  url: string;
  headers: Record<string, string>;
  body: Buffer | null;
  method: string;
}

function recordRequests(context: BrowserContext): { seen: Seen[]; settle: () => Promise<void> } {
  const seen: Seen[] = [];
  const pending: Promise<void>[] = [];
  const take = (r: Request) => {
    pending.push(
      r.allHeaders().then(
        (headers) => void seen.push({ url: r.url(), headers, body: r.postDataBuffer(), method: r.method() }),
        () => void seen.push({ url: r.url(), headers: r.headers(), body: r.postDataBuffer(), method: r.method() }),
      ),
    );
  };
  context.on('request', take);
  return { seen, settle: async () => void (await Promise.all(pending)) };
}

describe('Source screen: a recording opened on this device', () => {
  it('opens a dropped EDF+ file, maps labels to conditions, rejects the artifact epochs, creates the analysis session, and sends nothing identifying', async () => {
    const context = await browser.newContext({ viewport: { width: 1280, height: 900 } });
    const { seen, settle } = recordRequests(context);
    const page = await signIn(context, 'analyst');

    await dropFile(page, FILE_NAME, bytes);
    const details = page.getByTestId('recording-details');
    await details.waitFor({ timeout: 30_000 });
    // The header's patient field and the file name are shown here, marked as staying on the device.
    expect(await page.getByTestId('patient-field').textContent()).toBe(DEMO_PATIENT_FIELD);
    expect(await details.textContent()).toContain(FILE_NAME);
    expect(await details.getByText('stays on this device').count()).toBeGreaterThanOrEqual(2);
    expect(await details.textContent()).toContain('32 channels at 500 Hz');
    // Fingerprint: SHA-256 of the bytes, checked against Node's own implementation (node:crypto).
    expect(await page.getByTestId('fingerprint').textContent()).toBe(createHash('sha256').update(bytes).digest('hex'));

    // Labels with counts: the generator puts 12 cues of each condition in 60 s (cohort.ts: ~60 per 5 minutes).
    const labelsTable = page.getByRole('table', { name: 'Event labels' });
    expect(await labelsTable.textContent()).toContain('lamp-watch');
    // Two distinct labels: a first-time recording gets one condition per label, which the user can replace.
    expect(await page.getByTestId('condition').allTextContents()).toEqual([expect.stringContaining('lamp-watch'), expect.stringContaining('oar-pull')]);
    await page.getByRole('button', { name: 'Remove condition lamp-watch' }).click();
    await page.getByRole('button', { name: 'Remove condition oar-pull' }).click();
    await setWindow(page, -0.5, 1.5);
    await page.getByLabel('Pick label lamp-watch').check();
    await page.getByLabel('Condition name').fill('lamp');
    await page.getByRole('button', { name: 'Make condition from picked labels' }).click();
    await page.getByLabel('Pick label oar-pull').check();
    await page.getByLabel('Condition name').fill('oar');
    await page.getByRole('button', { name: 'Make condition from picked labels' }).click();
    expect(await page.getByTestId('condition').count()).toBe(2);

    // The generator documents which epochs carry artifacts (cohort.json / SubjectParameters.artifacts): each
    // is a step or spike of ≥ 250 µV or a flat stretch inside the default −0.5…1.5 s window, so each is rejected.
    const rows = page.getByTestId('epoch-row');
    await rows.first().waitFor();
    expect(await rows.count()).toBe(subject.events.length);
    expect(subject.artifacts.length).toBeGreaterThan(0);
    for (const artifact of subject.artifacts) {
      const row = page.locator(`[data-testid="epoch-row"][data-event-index="${artifact.eventIndex}"]`);
      expect(await row.getAttribute('data-verdict'), `${artifact.kind} artifact on event ${artifact.eventIndex}`).toBe('rejected');
      expect(await row.textContent()).toMatch(artifact.kind === 'flat' ? /flat on/ : /peak-to-peak \d+ µV/);
    }
    // The clean background (RMS 8–12 µV) stays well under 150 µV, so most epochs are kept.
    const kept = await page.locator('[data-testid="epoch-row"][data-verdict="kept"]').count();
    expect(kept).toBeGreaterThanOrEqual(subject.events.length - 2 * subject.artifacts.length - 2);
    expect(await page.getByRole('img', { name: /Overview of Fp1 .* rejected/ }).count()).toBe(1);

    // A manual decision overrides the rules, and can be returned to them.
    const first = subject.artifacts[0].eventIndex;
    await page.getByLabel(`Decision for event ${first + 1}`).selectOption('keep');
    expect(await page.locator(`[data-testid="epoch-row"][data-event-index="${first}"]`).getAttribute('data-verdict')).toBe('kept');
    await page.getByLabel(`Decision for event ${first + 1}`).selectOption('rules');
    expect(await page.locator(`[data-testid="epoch-row"][data-event-index="${first}"]`).getAttribute('data-verdict')).toBe('rejected');

    // A name is refused on this device before anything is sent; a code goes through.
    const postsBefore = seen.filter((s) => s.method === 'POST').length;
    await page.getByLabel('Subject code').fill('Harriet');
    await page.getByRole('button', { name: 'Create analysis session' }).click();
    expect(await page.getByTestId('session-problem').textContent()).toContain('never a name');
    await settle();
    expect(seen.filter((s) => s.method === 'POST').length).toBe(postsBefore);
    await page.getByLabel('Subject code').fill('TM-S61');
    await page.getByRole('button', { name: 'Create analysis session' }).click();
    expect(await page.getByTestId('session-created').textContent()).toContain('TM-S61');

    // The Outbound screen shows the exact body this tab sent.
    await page.getByRole('tab', { name: 'Outbound' }).click();
    const log = await page.getByTestId('outbound-log').textContent();
    expect(log).toContain(`{"subjectCode":"TM-S61","fingerprint":"${createHash('sha256').update(bytes).digest('hex')}"}`);
    await page.getByRole('tab', { name: 'Source' }).click();

    // 200 % zoom (a 640 CSS px viewport): the screen reflows without sideways scrolling.
    await page.setViewportSize({ width: 640, height: 800 });
    await page.waitForTimeout(200);
    const overflow = await page.evaluate(() => {
      const over = [...document.querySelectorAll('body *')]
        .filter((el) => el.getBoundingClientRect().right > window.innerWidth + 1)
        .slice(0, 5)
        .map((el) => `${el.tagName.toLowerCase()}.${el.className}`);
      return { by: document.documentElement.scrollWidth - window.innerWidth, over };
    });
    expect(overflow.by, `wider than the window: ${overflow.over.join(' | ')}`).toBeLessThanOrEqual(0);
    await page.screenshot({ path: path.join(artifactsDir, 'source-screen-narrow.png'), fullPage: true });
    await page.setViewportSize({ width: 1280, height: 900 });
    await page.screenshot({ path: path.join(artifactsDir, 'source-screen.png'), fullPage: true });

    // A damaged file: truncated by 1000 bytes. The message names the field and byte offset (the data record
    // count sits at byte 236 of the fixed header, Kemp et al., 1992, Table 1), and nothing else changes.
    expect(await page.getByTestId('library-entry').count()).toBe(1);
    await dropFile(page, BROKEN_NAME, bytes.slice(0, bytes.length - 1000));
    const problem = page.getByTestId('intake-problem');
    await problem.waitFor();
    const text = (await problem.textContent()) ?? '';
    expect(text).toContain(BROKEN_NAME);
    expect(text).toContain('data record count');
    expect(text).toMatch(/Byte offset\s*236/);
    expect(await page.getByTestId('library-entry').count()).toBe(1);
    expect(await page.getByTestId('patient-field').textContent()).toBe(DEMO_PATIENT_FIELD);
    expect(await page.getByTestId('epoch-row').count()).toBe(subject.events.length);

    // Every request of the whole visit: none carries the patient field, the recording field, the file names or
    // sample data (URLs, headers and bodies; bodies are small JSON with only the two allowed keys).
    await settle();
    expect(seen.length).toBeGreaterThan(5);
    const forbidden = [DEMO_PATIENT_FIELD, recordingField.trim(), FILE_NAME, BROKEN_NAME, 'DEMO-ONLY-NOT-A-PERSON'];
    for (const r of seen) {
      const where = `${r.method} ${r.url}`;
      const headerText = Object.entries(r.headers).map(([k, v]) => `${k}: ${v}`).join('\n');
      for (const s of forbidden) {
        expect(decodeURIComponent(r.url).includes(s), `${where} URL carries "${s}"`).toBe(false);
        expect(headerText.includes(s), `${where} headers carry "${s}"`).toBe(false);
        expect(r.body?.toString('latin1').includes(s) ?? false, `${where} body carries "${s}"`).toBe(false);
      }
      if (r.body !== null && r.body.length > 0) {
        expect(r.body.length, `${where} body size`).toBeLessThan(1024);
        if (new URL(r.url).pathname === '/sign-in') continue; // the sign-in form, before the workspace opened
        const json = JSON.parse(r.body.toString('utf8')) as Record<string, unknown>;
        for (const key of Object.keys(json)) expect(['subjectCode', 'fingerprint'], `${where} body key`).toContain(key);
        for (const t of sampleTexts) expect(r.body.toString('utf8').includes(t), `${where} body carries sample ${t}`).toBe(false);
      }
    }
    expect(seen.filter((s) => s.method === 'POST').map((s) => new URL(s.url).pathname).filter((p) => p !== '/sign-in')).toEqual([expect.stringMatching(/^\/api\/studies\/[0-9a-f-]+\/analysis-sessions$/)]);
    await context.close();
  });

  it('offers a reviewer no way to create an analysis session, and a forced request is refused in plain words', async () => {
    const context = await browser.newContext();
    const page = await signIn(context, 'reviewer');
    await dropFile(page, FILE_NAME, bytes);
    await page.getByTestId('recording-details').waitFor({ timeout: 30_000 });
    expect(await page.getByRole('button', { name: 'Create analysis session' }).count()).toBe(0);
    expect(await page.getByTestId('session-not-offered').textContent()).toContain('reviewer');
    // The same request the analyst's button sends, sent by hand: 403, and its message names no permission code.
    const studyId = /\/studies\/([0-9a-f-]+)\/workspace/.exec(page.url())![1];
    const answer = await page.evaluate(async (id) => {
      const r = await fetch(`/api/studies/${id}/analysis-sessions`, { method: 'POST', headers: { 'content-type': 'application/json' }, body: JSON.stringify({ subjectCode: 'TM-S61', fingerprint: 'f'.repeat(64) }) });
      return { status: r.status, message: ((await r.json()) as { error: { message: string } }).error.message };
    }, studyId);
    expect(answer.status).toBe(403);
    expect(answer.message).toBe('Your role in this team (reviewer) may not create analysis sessions. Analysts may. Nothing was changed.');
    await context.close();
  });

  it('reads a CSV matrix with a BIDS events file, reports bad rows and onsets by row and column, and says when storage is full', async () => {
    // Invented test data: 2 channels at 100 Hz for 10 s, ±5 µV alternating, one 300 µV spike on Fz at 4.2 s.
    const rows = ['Fz,Cz'];
    for (let i = 0; i < 1000; i++) rows.push(`${i === 420 ? 300 : i % 2 ? 5 : -5},${i % 2 ? -4 : 4}`);
    const csv = Buffer.from(rows.join('\n') + '\n');
    const ragged = Buffer.from(['Fz,Cz', '1,2', '3,4', '5'].join('\n'));
    // BIDS events (onset, duration, trial_type): cues at 2, 4, 6, 8 s and one at 9.5 s whose epoch runs past the end.
    const events = Buffer.from(['onset\tduration\ttrial_type', '2\tn/a\tbell', '4\t0\tbell', '6\t0\tbell', '8\t0\tbell', '9.5\t0\tbell'].join('\n'));
    const badEvents = Buffer.from(['onset\tduration\ttrial_type', '2\t0\tbell', 'soon\t0\tbell'].join('\n'));

    const context = await browser.newContext();
    // Simulates a full disk for the library: IndexedDB writes fail with QuotaExceededError while the flag is set.
    await context.addInitScript(() => {
      const put = IDBObjectStore.prototype.put;
      IDBObjectStore.prototype.put = function (this: IDBObjectStore, ...args: Parameters<typeof put>) {
        if ((window as unknown as { fullDisk?: boolean }).fullDisk) throw new DOMException('quota', 'QuotaExceededError');
        return put.apply(this, args);
      };
    });
    const page = await signIn(context, 'analyst');
    const pick = async (name: string, data: Buffer, eventsFile: { name: string; data: Buffer } | null) => {
      await page.getByLabel('Choose a recording file…').setInputFiles({ name, mimeType: 'text/csv', buffer: data });
      await page.locator('#panel-Source').getByLabel('Sample rate (Hz)').fill('100');
      if (eventsFile) await page.getByLabel(/Events file/).setInputFiles({ name: eventsFile.name, mimeType: 'text/tab-separated-values', buffer: eventsFile.data });
      await page.getByRole('button', { name: 'Read the matrix' }).click();
    };

    await pick('tm-ragged.csv', ragged, null);
    let problem = (await page.getByTestId('intake-problem').textContent()) ?? '';
    // Row 4 (the header is row 1) has one cell where the header names two channels.
    expect(problem).toMatch(/1 cells.*header.* 2 channels/);
    expect(problem).toMatch(/Row\s*4/);
    expect(problem).toMatch(/Column\s*Cz/);

    await pick('tm-matrix.csv', csv, { name: 'tm-matrix_events.tsv', data: badEvents });
    await page.getByTestId('intake-problem').filter({ hasText: 'events file' }).waitFor();
    problem = (await page.getByTestId('intake-problem').textContent()) ?? '';
    expect(problem).toContain('tm-matrix_events.tsv (events file)');
    expect(problem).toMatch(/onset.*"soon".*not a number/);
    expect(problem).toMatch(/Row\s*3/);
    expect(await page.getByTestId('recording-details').count()).toBe(0);

    await page.evaluate(() => ((window as unknown as { fullDisk?: boolean }).fullDisk = true));
    await pick('tm-matrix.csv', csv, { name: 'tm-matrix_events.tsv', data: events });
    await page.getByTestId('recording-details').waitFor();
    expect(await page.getByTestId('library-notice').textContent()).toContain('QuotaExceededError');
    expect(await page.getByTestId('library-entry').count()).toBe(0);
    expect(await page.getByTestId('recording-details').textContent()).toContain('2 channels at 100 Hz');

    await page.getByRole('button', { name: 'Remove condition bell' }).click();
    await setWindow(page, -0.5, 1.5);
    await page.getByLabel('Pick label bell').check();
    await page.getByLabel('Condition name').fill('bell cue');
    await page.getByRole('button', { name: 'Make condition from picked labels' }).click();
    // By hand, window −0.5…1.5 s at 100 Hz: the 4 s cue covers samples 350…550 and holds the spike (300 − (−4)…
    // Fz: 300 − (−5) = 305 µV > 150); the 9.5 s cue needs samples up to 1100 of 1000 (outside); the others are kept.
    const verdicts = await page.getByTestId('epoch-row').evaluateAll((els) => els.map((e) => e.getAttribute('data-verdict')));
    expect(verdicts).toEqual(['kept', 'rejected', 'kept', 'kept', 'rejected']);
    expect(await page.locator('[data-testid="epoch-row"][data-event-index="1"]').textContent()).toContain('peak-to-peak 305 µV on Fz');
    expect(await page.locator('[data-testid="epoch-row"][data-event-index="4"]').textContent()).toContain('outside the recording');
    // Tally (by hand from the verdicts above): 5 epochs, 3 kept, 2 rejected, 1 of them outside, none across a gap.
    const tally = await page.getByTestId('condition-tally').locator('tbody td').allTextContents();
    expect(tally).toEqual(['bell cue', '5', '3', '2', '1', '0']);

    // With room again, the recording is kept in the library.
    await page.evaluate(() => ((window as unknown as { fullDisk?: boolean }).fullDisk = false));
    await pick('tm-matrix.csv', csv, { name: 'tm-matrix_events.tsv', data: events });
    await page.getByTestId('library-entry').first().waitFor();
    expect(await page.getByTestId('library-entry').count()).toBe(1);
    expect(await page.getByTestId('library-entry').textContent()).toContain('sample matrix, 100 Hz');

    // Reopened from the library, it is read the same way (rate and events kept with it), then removed.
    await page.getByRole('button', { name: 'Reopen tm-matrix.csv' }).click();
    await page.getByTestId('recording-details').filter({ hasText: 'this browser’s library' }).waitFor();
    expect(await page.getByTestId('epoch-row').count()).toBe(5);
    await page.getByRole('button', { name: 'Remove all…' }).click();
    await page.getByRole('button', { name: 'Remove all', exact: true }).click();
    await page.getByText('The library is empty.').waitFor();
    await context.close();
  });

  it('lists the generated demo cohort and serves only its own files', async () => {
    const context = await browser.newContext();
    const page = await signIn(context, 'analyst');
    const picker = page.getByLabel(/Demo cohort/);
    await picker.waitFor();
    expect(await picker.locator('option').count()).toBeGreaterThan(0);
    for (const probe of ['..%2Fpackage.json', '%2E%2E%2F.env', '.gitignore', 'cohort.json%00.edf']) {
      const response = await page.request.get(`${appUrl}/demo/${probe}`);
      expect(response.status(), probe).toBe(404);
    }
    expect((await page.request.get(`${appUrl}/demo/cohort.json`)).status()).toBe(200);
    // Opening a demo recording fetches it from the app (demo data, not a person's) and suggests its subject code.
    await page.getByRole('button', { name: 'Open demo recording' }).click();
    await page.getByTestId('recording-details').waitFor({ timeout: 60_000 });
    expect(await page.getByLabel('Subject code').inputValue()).toBe('TM-S01');
    expect(await page.getByTestId('patient-field').textContent()).toBe(DEMO_PATIENT_FIELD);
    // A second demo file opens too: the first one's header (it names the invented scenario) does not block its address.
    const first = await page.getByTestId('fingerprint').textContent();
    const options = await picker.locator('option').evaluateAll((els) => els.map((e) => (e as HTMLOptionElement).value));
    await picker.selectOption(options[1]);
    await page.getByRole('button', { name: 'Open demo recording' }).click();
    await expect.poll(() => page.getByTestId('fingerprint').textContent(), { timeout: 60_000 }).not.toBe(first);
    expect(await page.getByTestId('intake-problem').count()).toBe(0);
    await context.close();
  });
});
