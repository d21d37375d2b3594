// The Slope check screen as an analyst uses it, in Debian's Chromium: run the bench with two fit settings (a short,
// lean run), see both curves and the figures the core computes for the same settings under Node, save a report,
// then find it on the study page as a reviewer would. Screenshots at 1440×900 in test-artifacts/.
import fs from 'node:fs';
import { createRequire } from 'node:module';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser } from 'playwright-core';
import { artifactsDir, downloadFrom, launchBrowser } from '../helpers/browser';
import { openWorkspace, loadDemoInWorkspace } from '../helpers/workspace';
import { pool } from '../helpers/app';
import { compareAperiodicModels, runSlopeSweep } from '../../src/lib/analysis/slope-check';
import { welchPsd } from '../../src/lib/analysis/welch';
import { planRun, runRecipe } from '../../src/lib/analysis/run-recipe';
import { loadDemo } from '../../src/components/explorer/test-hooks';
import { useWorkspace } from '../../src/lib/client/workspace/store';

// The explorer tests' demo recording (invented Harbour Lights scenario, generated from its seed on both sides).
const DEMO = { seconds: 60, channels: ['Fz', 'Cz', 'Pz'], epochStart: -0.5, epochEnd: 1.5 };

const require = createRequire(import.meta.url);
let browser: Browser;
let close: () => Promise<void>;

beforeAll(async () => {
  ({ browser, close } = await launchBrowser());
  fs.mkdirSync(artifactsDir, { recursive: true });
}, 60_000);
afterAll(async () => {
  await close();
  await pool.end();
});

describe('the Slope check screen', () => {
  it('runs the bench with two settings, shows both curves, saves a report and lists it on the study page', async () => {
    // bypassCSP: only so the test can inject axe-core; the app's own code runs under its policy in csp.test.ts.
    const context = await browser.newContext({ viewport: { width: 1440, height: 900 }, acceptDownloads: true, bypassCSP: true });
    const page = await context.newPage();
    const errors: string[] = [];
    page.on('pageerror', (e) => errors.push(e.message));
    await openWorkspace(page, 'analyst');
    await page.getByRole('tab', { name: 'Slope check' }).click();
    await page.getByTestId('slope-caution').waitFor();

    // Bad settings are named and nothing runs: an exponent that is not a number (refused at the field), a fit range
    // past Nyquist (125 Hz at 250 Hz sampling, refused by the core and named by its field).
    await page.getByTestId('bench-exponents').fill('1, x');
    await page.getByTestId('bench-run').click();
    await expect.poll(() => page.getByTestId('bench-problem').textContent()).toBe('True exponents: "x" is not an exponent between 0 and 6.');
    await page.getByTestId('bench-exponents').fill('1');
    await page.getByTestId('bench-setting-high').first().fill('200');
    await page.getByTestId('bench-run').click();
    await expect.poll(() => page.getByTestId('bench-problem').textContent()).toBe('Setting 1 ("robust 2-40 Hz"), fit range: ends at 200 Hz, above Nyquist (125 Hz); nothing was run.');
    await page.getByTestId('bench-setting-high').first().fill('40');
    // A name a saved report could not carry is refused before the run (the route's Label rule).
    await page.getByTestId('bench-setting-name').nth(1).fill('plain, 2-40');
    await page.getByTestId('bench-run').click();
    await expect.poll(() => page.getByTestId('bench-problem').textContent()).toBe('Setting 2, name "plain, 2-40": may hold only letters, digits, space and . _ + - / : ( ).');
    await page.getByTestId('bench-setting-name').nth(1).fill('plain 2-40 Hz');
    // A long run is cancelled at once (its worker is ended) and leaves nothing behind.
    await page.getByTestId('bench-repetitions').fill('500');
    await page.getByTestId('bench-run').click();
    await page.getByTestId('bench-cancel').dispatchEvent('click');
    await expect.poll(() => page.getByTestId('bench-problem').textContent()).toBe('Cancelled; nothing was changed.');
    expect(await page.getByTestId('bench-chart').count()).toBe(0);

    // Lean: 2 true exponents × 3 repetitions of 10 s at 250 Hz, the screen's two first settings (robust and plain),
    // with the coverage of 90 % bootstrap intervals (100 resamples each).
    await page.getByTestId('bench-duration').fill('10');
    await page.getByTestId('bench-repetitions').fill('3');
    await page.getByTestId('bench-exponents').fill('1, 2');
    await page.getByTestId('bench-coverage-on').check();
    expect(await page.getByTestId('bench-setting').count()).toBe(2);
    await page.getByTestId('bench-run').click();
    await page.getByTestId('bench-chart').waitFor({ timeout: 60_000 });

    // Both curves, in both panels (estimate against truth, bias).
    const curves = page.getByTestId('bench-chart').getByTestId('bench-curve');
    expect(await curves.count()).toBe(4);
    expect(await curves.evaluateAll((gs) => gs.map((g) => g.getAttribute('data-setting')))).toEqual(['robust 2-40 Hz', 'plain 2-40 Hz', 'robust 2-40 Hz', 'plain 2-40 Hz']);
    expect(await curves.first().locator('polyline').getAttribute('points')).toMatch(/^[\d.]+,[\d.]+ [\d.]+,[\d.]+$/);

    // The table holds what the core computes for the same truth and settings under Node (same seeds, same code).
    const expected = runSlopeSweep({
      truth: { offset: 1, knee: 0, peaks: [{ centreHz: 10, widthHz: 1.5, heightLog10: 0.8 }], durationSeconds: 10, sampleRateHz: 250, noiseMicrovolts: 0, seed: 1 },
      exponents: [1, 2],
      settings: [
        { name: 'robust 2-40 Hz', range: [2, 40], model: 'power-law', robust: true, segmentSeconds: 2, overlap: 0.5 },
        { name: 'plain 2-40 Hz', range: [2, 40], model: 'power-law', robust: false, segmentSeconds: 2, overlap: 0.5 },
      ],
      repetitions: 3,
      coverage: { level: 0.9, resamples: 100 },
    });
    const rows = await page.getByTestId('bench-row').evaluateAll((trs) => trs.map((tr) => Array.from(tr.querySelectorAll('td'), (td) => td.textContent)));
    expect(rows.map((r) => [r[0], r[1], r[3], r[4], r[6]])).toEqual(expected.map((c) => [c.setting, String(c.trueExponent), c.bias.toFixed(3), c.spread.toFixed(3), `${Math.round(c.coverage! * 100)} %`]));
    await page.screenshot({ path: path.join(artifactsDir, 'slope-check-bench.png'), fullPage: true });
    // WCAG 2.1 A/AA rules of axe-core (Deque, an independent checker) over the whole screen with its results shown.
    await page.addScriptTag({ content: fs.readFileSync(require.resolve('axe-core/axe.min.js'), 'utf8') });
    const violations = await page.evaluate(async () => {
      const axe = (window as unknown as { axe: { run: (el: Element, o: unknown) => Promise<{ violations: { id: string; impact: string; nodes: { target: string[] }[] }[] }> } }).axe;
      const r = await axe.run(document.querySelector('[data-testid="slope-check-screen"]')!, { runOnly: { type: 'tag', values: ['wcag2a', 'wcag2aa', 'wcag21a', 'wcag21aa'] } });
      return r.violations.map((v) => `${v.id} (${v.impact}): ${v.nodes.map((n) => n.target.join(' ')).join(', ')}`);
    });
    expect(violations).toEqual([]);

    const svg = await downloadFrom(page, 'bench-export-svg', artifactsDir);
    expect(svg.name).toMatch(/\.svg$/);
    expect(svg.bytes.toString('utf8')).toMatch(/^<\?xml[^>]*>\n<svg[^>]*xmlns="http:\/\/www\.w3\.org\/2000\/svg"/);
    const csv = await downloadFrom(page, 'bench-export-csv', artifactsDir);
    const lines = csv.bytes.toString('utf8').trim().split('\r\n');
    expect(lines[0].split(',').slice(0, 5)).toEqual(['title', 'setting', 'true_exponent', 'mean_estimate', 'bias']);
    expect(lines).toHaveLength(1 + 4);

    const title = `Bench check ${Date.now()}`;
    await page.getByTestId('slope-report-title').fill(title);
    await page.getByTestId('slope-report-save').click();
    await page.getByTestId('slope-report-saved').waitFor();
    await page.getByTestId('slope-report-saved').getByRole('link', { name: 'the study page' }).click();
    await page.waitForURL(/\/studies\/[0-9a-f-]+#slope-reports$/);
    // The study's tool list leads to the same section.
    expect(await page.getByTestId('slope-reports-link').getAttribute('href')).toBe('#slope-reports');
    const report = page.getByTestId('slope-report').filter({ hasText: title });
    await report.locator('summary').click();
    await expect.poll(() => report.getByTestId('bench-curve').count()).toBe(4);
    await report.scrollIntoViewIfNeeded();
    await page.screenshot({ path: path.join(artifactsDir, 'slope-check-study-page.png') });
    const { rows: stored } = await pool.query(`SELECT report FROM slope_reports WHERE title = $1`, [title]);
    expect(stored).toHaveLength(1);
    expect(stored[0].report.results).toHaveLength(4);
    expect(errors).toEqual([]);
    await context.close();
  }, 180_000);

  it('checks one channel of the open recording: the exponent over fit ranges, its interval and model, and the broadband shift', async () => {
    const context = await browser.newContext({ viewport: { width: 1440, height: 900 } });
    const page = await context.newPage();
    const errors: string[] = [];
    page.on('pageerror', (e) => errors.push(e.message));
    expect((await loadDemoInWorkspace(page, DEMO)).settingsError).toBeNull();
    await page.getByRole('tab', { name: 'Recipe' }).click();
    await page.getByTestId('recipe-fcount').fill('16');
    await page.getByTestId('recipe-run').click();
    await page.waitForFunction(() => document.querySelector('[data-testid="recipe-status"]')?.getAttribute('data-status') === 'done', undefined, { timeout: 60_000 });

    await page.getByRole('tab', { name: 'Slope check' }).click();
    await page.getByTestId('sensitivity-channel').selectOption('Cz');
    await page.getByTestId('sensitivity-run').click();
    await page.getByTestId('sensitivity-result').waitFor({ timeout: 60_000 });
    // 6 starts × 6 ends of the screen's defaults plus none added (the live range 2–40 Hz is already on the grid).
    expect(await page.getByTestId('sensitivity-map').locator('rect').count()).toBe(36);
    // The estimate is the aperiodic fit the core reports for this recipe in Node (run-recipe, the CLI's path).
    const recipe = await page.evaluate(() => {
      const r = window.__tidemark!.stores.results.getState();
      return r.cache[r.activeKey!].recipe;
    });
    loadDemo(DEMO);
    const node = runRecipe(useWorkspace.getState().analysisRecording()!, { ...recipe, aperiodic: { ...recipe.aperiodic, range: [2, 40] } });
    const cz = node.aperiodic.find((a: { channel: string }) => a.channel === 'Cz')!;
    const interval = (await page.getByTestId('sensitivity-interval').textContent()) ?? '';
    expect(interval).toContain(`exponent ${cz.exponent.toFixed(3)}, 90 % bootstrap interval`);
    const [lower, upper] = /interval (-?[\d.]+) … (-?[\d.]+)/.exec(interval)!.slice(1).map(Number);
    expect(lower).toBeLessThanOrEqual(cz.exponent);
    expect(upper).toBeGreaterThanOrEqual(cz.exponent);
    // The model the screen recommends is the one BIC prefers (Schwarz 1978) for the same spectrum in Node: the
    // recipe's Welch of Cz as the run conditioned it (planRun), over the same 2–40 Hz.
    const planned = planRun(useWorkspace.getState().analysisRecording()!, { ...recipe, aperiodic: { ...recipe.aperiodic, range: [2, 40] } });
    const sp = planned.plan.spectrum;
    const welch = welchPsd(planned.recording.data[planned.recording.channelNames.indexOf('Cz')], planned.plan.sampleRateHz, sp.segmentSamples, sp.overlapSamples, sp.spans);
    const comparison = compareAperiodicModels(welch.frequencies, welch.psd, [2, 40]);
    const modelWords = comparison.preferred === 'power-law' ? 'power law' : 'power law with a knee';
    expect((await page.getByTestId('sensitivity-model').locator('p').first().textContent())?.trim()).toBe(`Recommended model: ${modelWords}. ${comparison.reason}`);

    await page.getByTestId('shift-run').click();
    await page.getByTestId('shift-result').waitFor({ timeout: 60_000 });
    const bands = await page.getByTestId('shift-band').evaluateAll((trs) => trs.map((tr) => Array.from(tr.querySelectorAll('td'), (td) => td.textContent ?? '')));
    expect(bands.map((b) => b[0])).toEqual(['theta', 'alpha', 'beta', 'gamma']);
    for (const b of bands) expect(b[3]).toMatch(/^(—|\d{1,3} %)$/);
    await page.getByTestId('slope-sensitivity').scrollIntoViewIfNeeded();
    await page.screenshot({ path: path.join(artifactsDir, 'slope-check-sensitivity.png') });
    await page.getByTestId('slope-shift').scrollIntoViewIfNeeded();
    await page.screenshot({ path: path.join(artifactsDir, 'slope-check-shift.png') });

    // A report saved now carries the sensitivity results beside a (lean) bench run.
    await page.getByTestId('bench-duration').fill('10');
    await page.getByTestId('bench-repetitions').fill('2');
    await page.getByTestId('bench-exponents').fill('1.5');
    await page.getByTestId('bench-run').click();
    await page.getByTestId('bench-chart').waitFor({ timeout: 60_000 });
    const title = `Sensitivity check ${Date.now()}`;
    await page.getByTestId('slope-report-title').fill(title);
    await page.getByTestId('slope-report-save').click();
    await page.getByTestId('slope-report-saved').waitFor();
    const { rows: stored } = await pool.query(`SELECT report FROM slope_reports WHERE title = $1`, [title]);
    expect(stored[0].report.sensitivity).toMatchObject({ channel: 'Cz', rangeHz: [2, 40], startsHz: [1, 2, 3, 4, 6, 8], endsHz: [20, 25, 30, 35, 40, 45] });
    expect(stored[0].report.sensitivity.grid).toHaveLength(36);
    expect(stored[0].report.sensitivity.interval.estimate).toBeCloseTo(cz.exponent, 12);
    expect(errors).toEqual([]);
    await context.close();
  }, 180_000);
});
