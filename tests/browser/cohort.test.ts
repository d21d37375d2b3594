// The Cohort screen as a lead uses it, in Debian's Chromium: choose who enters, see the plots and the statistics,
// run the cluster test with its progress, export the values table and check its rows, and print the report to PDF
// and find the sign-off manifests in it. Screenshots at 1440×900 in test-artifacts/.
import fs from 'node:fs';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser, Page } from 'playwright-core';
import { appUrl, artifactsDir, downloadFrom, launchBrowser } from '../helpers/browser';
import { pool } from '../helpers/app';
import { createCohort, tern, type CohortFixture } from '../helpers/cohort';
import { parseTidyValues } from '../../src/lib/statistics/tidy-values';
import { pdfText } from '../helpers/pdf-text';

let browser: Browser;
let close: () => Promise<void>;
let c: CohortFixture;

beforeAll(async () => {
  ({ browser, close } = await launchBrowser());
  fs.mkdirSync(artifactsDir, { recursive: true });
  c = await createCohort({ signed: 10, unsigned: 2 });
}, 180_000);
afterAll(async () => {
  await close();
  await pool.end();
});

async function signInPage(email: string, password: string): Promise<Page> {
  const context = await browser.newContext({ viewport: { width: 1440, height: 900 }, acceptDownloads: true });
  const page = await context.newPage();
  await page.goto(`${appUrl}/sign-in`);
  await page.getByLabel('E-mail').fill(email);
  await page.getByLabel('Password').fill(password);
  await page.getByRole('button', { name: /sign in/i }).click();
  await page.waitForURL((u) => !u.pathname.startsWith('/sign-in'));
  return page;
}

describe('the Cohort screen', () => {
  it('pools the signed-off subjects, plots them, runs the cluster test, exports the CSV and prints the report', async () => {
    const page = await signInPage(c.leadPerson.email, c.leadPerson.password);
    const errors: string[] = [];
    page.on('pageerror', (e) => errors.push(e.message));
    await page.goto(`${appUrl}/teams/${c.teamId}/studies/${c.studyId}`);
    await page.getByTestId('cohort-link').click();
    await page.waitForURL(/\/cohort$/);
    await page.locator('[data-testid="cohort-screen"][data-ready="yes"]').waitFor();
    await expect.poll(() => page.getByTestId('entering-count').textContent()).toMatch(/^10 of 12 sessions enter\.$/);
    // Each band column of the sessions table names its unit (the fixture's summaries are decibel change: dB).
    const headers = (await page.getByTestId('cohort-sessions').locator('thead th').allTextContents()).map((t) => t.replace(/\s+/g, ' ').trim());
    expect(headers).toEqual(expect.arrayContaining([expect.stringMatching(/^theta \(dB\)/), expect.stringMatching(/^alpha \(dB\)/)]));

    // Plots: one per band, with one dot per subject per window.
    await page.getByTestId('channel-choice').selectOption('Fz');
    const plots = page.getByTestId('band-plots').locator('svg');
    expect(await plots.count()).toBe(2);
    expect(await plots.first().locator('circle').count()).toBe(10 * 3);
    // The group table's theta/early mean is the 10 signed-off subjects' Fz values averaged here.
    const expected = Array.from({ length: 10 }, (_, i) => tern(i).bandValues.find((v) => v.band === 'theta' && v.window === 'early' && v.channel === 'Fz' && v.condition === 'gull')!.normalized);
    const mean = expected.reduce((a, b) => a + b, 0) / 10;
    const row = page.locator('[data-testid="group-table"] tr[data-band="theta"][data-window="early"]');
    expect(await row.locator('td').nth(3).textContent()).toBe(mean.toFixed(2));
    expect(mean).toBeGreaterThan(1.5);
    await page.screenshot({ path: path.join(artifactsDir, 'cohort-screen.png') });

    // Untick one subject: 9 enter; include unsigned: 11 and every result says so.
    await page.locator(`tr[data-session-id="${c.sessions[0].id}"] [data-testid="enter-box"]`).uncheck();
    await expect.poll(() => page.getByTestId('entering-count').textContent()).toMatch(/^9 of 12/);
    await page.getByTestId('include-unsigned').check();
    await expect.poll(() => page.getByTestId('entering-count').textContent()).toMatch(/^11 of 12 sessions enter \(2 unsigned\)/);
    expect(await page.getByTestId('unsigned-marker').count()).toBeGreaterThanOrEqual(3);
    await page.getByTestId('include-unsigned').uncheck();
    await page.locator(`tr[data-session-id="${c.sessions[0].id}"] [data-testid="enter-box"]`).check();

    // The tests: the default one-sample test of "gull" finds theta/early at Fz.
    const gull = page.locator('[data-testid="test-result"][data-test="gull vs no change"]');
    await expect.poll(() => gull.locator('tr.font-semibold').count()).toBeGreaterThan(0);

    // The cluster test in its worker, with progress; the planted cluster comes out with p < 0.05.
    const seen: number[] = [];
    await page.exposeFunction('__progress', (v: number) => seen.push(v));
    await page.evaluate(() => {
      new MutationObserver(() => {
        const p = document.querySelector('[data-testid="map-test-progress"]') as HTMLProgressElement | null;
        if (p) (window as unknown as { __progress: (v: number) => void }).__progress(p.value);
      }).observe(document.body, { subtree: true, childList: true, attributes: true, attributeFilter: ['value'] });
    });
    await page.getByTestId('run-map-test').click();
    await page.getByTestId('cluster-table').waitFor({ timeout: 60_000 });
    expect(seen.length).toBeGreaterThan(0);
    expect(await page.getByTestId('map-test-summary').textContent()).toMatch(/^All 1024 sign flips \(exact\)/);
    const firstP = Number(await page.locator('[data-testid="cluster-table"] tbody tr').first().locator('td').last().textContent());
    expect(firstP).toBeLessThan(0.05);
    expect(await page.locator('[data-testid="group-map"] path').count()).toBeGreaterThan(0);

    // The distribution check says something plain.
    expect(await page.getByTestId('distribution-sentence').textContent()).toMatch(/^For theta · /);
    await page.getByTestId('group-map').scrollIntoViewIfNeeded();
    await page.screenshot({ path: path.join(artifactsDir, 'cohort-map-test.png') });
    await page.getByTestId('distribution-check').scrollIntoViewIfNeeded();
    await page.screenshot({ path: path.join(artifactsDir, 'cohort-distribution.png') });

    // The values table: 10 subjects × 2 conditions × 2 bands × 3 windows × 3 channels, with provenance.
    const dir = fs.mkdtempSync(path.join(artifactsDir, 'cohort-'));
    const csv = await downloadFrom(page, 'export-csv', dir);
    const text = csv.bytes.toString('utf8');
    const lines = text.trimEnd().split('\n');
    expect(lines[0]).toBe('subject,condition,band,window,channel,value,recipe_hash,sign_off');
    expect(lines).toHaveLength(1 + 10 * 2 * 2 * 3 * 3);
    expect(lines.slice(1).every((l) => l.endsWith(',signed-off'))).toBe(true);
    expect(parseTidyValues(text).rows).toHaveLength(360);
    const json = JSON.parse((await downloadFrom(page, 'export-json', dir)).bytes.toString('utf8'));
    expect(json.cohort.sessions).toHaveLength(10);
    expect(json.clusters[0].p).toBeLessThan(0.05);

    // The printable report, printed to PDF by Chromium: the manifests' hashes are in it.
    await page.getByTestId('report-link').click();
    await page.getByTestId('cohort-report').waitFor();
    await page.screenshot({ path: path.join(artifactsDir, 'cohort-report.png'), fullPage: false });
    const pdf = await page.pdf({ format: 'A4', printBackground: true });
    fs.writeFileSync(path.join(artifactsDir, 'cohort-report.pdf'), pdf);
    expect(pdf.subarray(0, 5).toString()).toBe('%PDF-');
    const { rows } = await pool.query(`SELECT content_hash FROM signatures s JOIN analysis_sessions a ON a.id = s.analysis_session_id WHERE a.study_id = $1`, [c.studyId]);
    const printed = await page.evaluate(() => document.querySelector('[data-testid="report-manifest"]')!.textContent);
    for (const r of rows) expect(printed).toContain(r.content_hash);
    // The PDF's own text (tests/helpers/pdf-text.ts): every signature's content hash is printed in it.
    const printedText = pdfText(pdf).replace(/\s+/g, '');
    for (const r of rows) expect(printedText, `hash ${r.content_hash} in the PDF`).toContain(r.content_hash);
    expect(printedText).toContain('Researchuseonly');
    expect(errors).toEqual([]);
  }, 180_000);

  it('imports covariates from a CSV: a bad file is named by row and column and changes nothing; a good one is saved', async () => {
    const page = await signInPage(c.leadPerson.email, c.leadPerson.password);
    await page.goto(`${appUrl}/teams/${c.teamId}/studies/${c.studyId}/cohort`);
    await page.locator('[data-testid="cohort-screen"][data-ready="yes"]').waitFor();
    const input = page.getByTestId('covariate-csv');
    await input.setInputFiles({ name: 'ages.csv', mimeType: 'text/csv', buffer: Buffer.from('subject,age\nTP-01,31\nTP-02,thirty-two\n') });
    await expect.poll(() => page.getByTestId('covariates-message').textContent()).toBe('ages.csv: row 3, column "age": "thirty-two" is not a number (code a group as numbers, e.g. 0 and 1). Nothing was changed.');
    expect(await page.getByTestId('covariates-table').count()).toBe(0);
    const good = ['subject,age,group', ...c.sessions.map((s, i) => `${s.subject},${30 + i},${i % 2}`)].join('\n');
    await input.setInputFiles({ name: 'ages.csv', mimeType: 'text/csv', buffer: Buffer.from(good) });
    await page.getByTestId('save-covariates').click();
    await expect.poll(() => page.getByTestId('covariates-message').textContent()).toBe('Saved 24 values.');
    const { rows } = await pool.query(`SELECT count(*)::int AS n, sum(value)::float AS total FROM subject_covariates v JOIN subjects s ON s.id = v.subject_id WHERE s.study_id = $1 AND v.name = 'age'`, [c.studyId]);
    expect(rows[0]).toEqual({ n: 12, total: Array.from({ length: 12 }, (_, i) => 30 + i).reduce((a, b) => a + b, 0) });
    await page.getByTestId('covariates-panel').scrollIntoViewIfNeeded();
    await page.screenshot({ path: path.join(artifactsDir, 'cohort-covariates.png') });
  }, 120_000);

  it('refuses to pool mixed recipes and names the field on screen', async () => {
    const mixed = await createCohort({ signed: 2, unsigned: 1, recipeEdit: (r) => { r.filters = { notch: { lineHz: 50 } }; } });
    const page = await signInPage(mixed.leadPerson.email, mixed.leadPerson.password);
    await page.goto(`${appUrl}/teams/${mixed.teamId}/studies/${mixed.studyId}/cohort`);
    await page.locator('[data-testid="cohort-screen"][data-ready="yes"]').waitFor();
    expect(await page.getByTestId('pooling-refused').count()).toBe(0);
    await page.getByTestId('include-unsigned').check();
    const refusal = page.getByTestId('pooling-refused');
    await refusal.waitFor();
    expect(await refusal.getAttribute('data-field')).toBe('filters.notch');
    expect(await refusal.textContent()).toMatch(/^Cannot pool: filters\.notch differs — null in TP-01 \(version 1\), \{"harmonics":1,"lineHz":50,"q":30\} in TP-03 \(version 1\)/);
    await page.screenshot({ path: path.join(artifactsDir, 'cohort-refused.png') });
  }, 120_000);
});
