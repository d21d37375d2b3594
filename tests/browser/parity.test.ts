// Parity of the browser and the command line (analysis contract: "a result computed in one can be reproduced bit
// for bit in the other"). One small EDF+ file from the demo generator (the invented Harbour Lights scenario, four
// channels, 60 s) is dropped into the workspace as a File and handed to `node --import tsx src/cli/analyze.ts` from
// here; the Recipe screen's run (the app's module-worker pool) and the CLI must agree to the last bit of every double.
import { execFileSync } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser, Page } from 'playwright-core';
import { artifactsDir, launchBrowser } from '../helpers/browser';
import { DEMO_PATIENT_FIELD, describeCohort, synthesizeSubject } from '../../src/lib/demo/cohort';
import { writeEdf } from '../../src/lib/formats';
import type { AnalysisResult } from '../../src/lib/analysis/run-recipe';
import { openWorkspace, dropFile } from '../helpers/workspace';

const FILE_NAME = 'tm-parity-check-71.edf';
const CHANNELS = ['Fz', 'Cz', 'Pz', 'Oz'];

let browser: Browser;
let close: () => Promise<void>;
let page: Page;
let dir: string;
let edfPath: string;
let eventCount: number;
const pageErrors: string[] = [];

/** The demo subject's first four channels as EDF+C bytes (int16, 0.1 µV steps, events as TALs). */
function parityEdf(): { bytes: Uint8Array; events: number } {
  const subject = describeCohort({ subjects: 1, seconds: 60, seed: 71 }).subjects[0];
  const { data } = synthesizeSubject(subject);
  const bytes = writeEdf({
    variant: 'EDF+C',
    patientIdentification: DEMO_PATIENT_FIELD,
    recordingIdentification: 'Startdate 04-MAR-2024 HARBOUR-LIGHTS X SYNTHETIC-DEMO',
    start: subject.start,
    recordDurationSeconds: 1,
    signals: CHANNELS.map((name) => ({
      label: `EEG ${name}`,
      transducer: 'synthetic demo signal',
      physicalDimension: 'uV',
      physicalMin: -3276.8,
      physicalMax: 3276.7,
      prefiltering: 'none',
      samplesPerRecord: subject.sampleRateHz,
      samples: data[subject.channels.indexOf(name)],
    })),
    // One annotation after the last sample (the harbour closing at 75 s of a 60 s file): the reader leaves it out,
    // and both sides must say so in the same words (src/lib/formats/recording-warnings.ts).
    annotations: [
      ...subject.events.map((e) => ({ onsetSeconds: e.onsetSeconds, durationSeconds: e.durationSeconds, texts: [e.label] })),
      { onsetSeconds: 75, durationSeconds: 0, texts: ['harbour-closed'] },
    ],
  });
  return { bytes, events: subject.events.length };
}

/** The command line on the same file: `node --import tsx src/cli/analyze.ts <file.edf> --recipe … --out …`. */
function cli(recipe: unknown, name: string): { text: string; result: AnalysisResult } {
  const recipePath = path.join(dir, `${name}.recipe.json`);
  const outPath = path.join(dir, `${name}.result.json`);
  fs.writeFileSync(recipePath, JSON.stringify(recipe));
  execFileSync(process.execPath, ['--import', 'tsx', 'src/cli/analyze.ts', edfPath, '--recipe', recipePath, '--out', outPath], { stdio: 'pipe' });
  const text = fs.readFileSync(outPath, 'utf8').trimEnd();
  return { text, result: JSON.parse(text) as AnalysisResult };
}

/** Every place two JSON values differ (numbers compared with Object.is), as "path: a ≠ b" lines. */
function differences(a: unknown, b: unknown, at = '$', out: string[] = []): string[] {
  if (typeof a === 'number' && typeof b === 'number') {
    if (!Object.is(a, b)) out.push(`${at}: ${a} ≠ ${b}`);
  } else if (Array.isArray(a) && Array.isArray(b)) {
    if (a.length !== b.length) out.push(`${at}: length ${a.length} ≠ ${b.length}`);
    else for (let i = 0; i < a.length; i++) differences(a[i], b[i], `${at}[${i}]`, out);
  } else if (a !== null && b !== null && typeof a === 'object' && typeof b === 'object') {
    const ka = Object.keys(a).sort();
    const kb = Object.keys(b).sort();
    if (ka.join() !== kb.join()) out.push(`${at}: keys ${ka.join(',')} ≠ ${kb.join(',')}`);
    else for (const k of ka) differences((a as Record<string, unknown>)[k], (b as Record<string, unknown>)[k], `${at}.${k}`, out);
  } else if (!Object.is(a, b)) {
    out.push(`${at}: ${JSON.stringify(a)} ≠ ${JSON.stringify(b)}`);
  }
  return out;
}

/** null when equal, else how many values differ and the first few. */
function firstDifference(a: unknown, b: unknown): string | null {
  const d = differences(a, b);
  return d.length === 0 ? null : `${d.length} difference(s): ${d.slice(0, 6).join('; ')}`;
}

/** Row-major `[f·T + t]` of a `[f][t]` array, nulls (undefined normalized values) as NaN, like the results store. */
const flat = (rows: (number | null)[][]) => rows.flat().map((v) => (v === null ? NaN : v));

beforeAll(async () => {
  ({ browser, close } = await launchBrowser());
  dir = fs.mkdtempSync(path.join(os.tmpdir(), 'tidemark-parity-'));
  const made = parityEdf();
  edfPath = path.join(dir, FILE_NAME);
  fs.writeFileSync(edfPath, made.bytes);
  eventCount = made.events;

  page = await (await browser.newContext({ viewport: { width: 1400, height: 1000 } })).newPage();
  page.on('pageerror', (e) => pageErrors.push(e.message));
  // ?testhooks only exposes the stores and a pool runner; the recording is opened through the real drop zone.
  await openWorkspace(page, 'analyst', '?testhooks');
  await page.waitForFunction(() => window.__tidemark !== undefined);
  await page.getByTestId('drop-zone').waitFor().catch(async (e: unknown) => {
    await page.screenshot({ path: path.join(artifactsDir, 'parity-failure.png'), fullPage: true });
    throw new Error(`${String(e)}; page errors: ${pageErrors.join(' | ') || 'none'}`);
  });
  await dropFile(page, FILE_NAME, made.bytes);
  await page.getByTestId('recording-details').waitFor({ timeout: 30_000 });
});
afterAll(async () => {
  await close();
  fs.rmSync(dir, { recursive: true, force: true });
});

describe('browser worker pool and command line on the same EDF+ bytes', () => {
  // Warnings too: the file's (one function, recordingWarnings, in both), then the run's.
  let cliFirst: AnalysisResult;
  let recipe: Record<string, unknown> & { epochs: { events: string[] } };

  it('decodes the samples once, into memory the page and its workers share', async () => {
    // Cross-origin isolation (COOP same-origin + COEP require-corp, HTML Standard) lets the decoded channels live on
    // SharedArrayBuffers (src/lib/formats/sample-arrays.ts), so the plan and analysis workers read the page's copy.
    const shared = await page.evaluate(() => {
      const rec = window.__tidemark!.stores.workspace.getState().recording;
      return { isolated: crossOriginIsolated, shared: rec !== null && rec.data.every((d) => d.buffer instanceof SharedArrayBuffer) };
    });
    expect(shared).toEqual({ isolated: true, shared: true });
  });

  it('the Recipe screen’s run equals the CLI’s result: power, spectrum, fits, trials, times, frequencies, edges', async () => {
    // One condition per label (unless the workspace already made them), every epoch kept: the command line has no
    // rejection rules, so both sides must epoch the same events.
    if ((await page.getByTestId('condition').count()) === 0) await page.getByRole('button', { name: 'One condition per remaining label' }).click();
    await expect.poll(() => page.getByTestId('condition').count()).toBe(2);
    for (const rule of ['Peak-to-peak rule', 'Flat-signal rule']) {
      const box = page.getByLabel(rule, { exact: true });
      if (await box.isChecked()) await box.uncheck();
    }
    await expect.poll(() => page.locator('[data-testid="epoch-row"][data-verdict="kept"]').count()).toBe(eventCount);

    await page.getByRole('tab', { name: 'Recipe' }).click();
    await page.getByTestId('recipe-fcount').fill('12');
    await expect.poll(() => page.evaluate(() => window.__tidemark!.stores.workspace.getState().draft.frequencies.count)).toBe(12);
    await page.getByTestId('recipe-run').click();
    await page.waitForFunction(() => document.querySelector('[data-testid="recipe-status"]')?.getAttribute('data-status') === 'done', undefined, { timeout: 45_000 });

    const shown = JSON.parse(
      await page.evaluate(() => {
        const s = window.__tidemark!.stores.results.getState();
        const s0 = window.__tidemark!.stores.workspace.getState();
        const d = s.cache[s.activeKey!];
        return JSON.stringify({
          recipe: d.recipe,
          channels: d.channels,
          labels: d.labels,
          trials: d.trials,
          times: Array.from(d.times),
          frequencies: Array.from(d.frequencies),
          edgeSeconds: Array.from(d.edgeSeconds),
          // JSON has no NaN: encode every double as its shortest round-trip text, NaN as "NaN".
          power: d.power.map((perCondition) => perCondition.map((p) => Array.from(p, (v) => (Number.isNaN(v) ? 'NaN' : v)))),
          spectrum: { frequencies: Array.from(d.spectrum.frequencies), psd: d.spectrum.psd.map((p) => Array.from(p)) },
          aperiodic: d.aperiodic,
          // What the Source screen shows for the file, then the run's own: the command line's order.
          warnings: [...s0.local!.warnings, ...(s0.local!.selectionWarnings ?? []), ...d.warnings],
        });
      }),
    );
    recipe = shown.recipe;
    expect([...recipe.epochs.events].sort()).toEqual(['lamp-watch', 'oar-pull']);
    const { result } = cli(recipe, 'screen');
    cliFirst = result;
    expect(shown.channels).toEqual(CHANNELS);
    expect(result.channels).toEqual(CHANNELS);
    // Every epoch fits (cues sit ≥ 3 s from either end, cohort.ts), so trials = events of the label on both sides.
    expect(shown.trials).toEqual(shown.labels.map((l: string) => result.conditions[l].trials));
    expect(shown.trials.reduce((a: number, b: number) => a + b, 0)).toBe(eventCount);
    expect(firstDifference(shown.times, result.times)).toBeNull();
    expect(firstDifference(shown.frequencies, result.frequencies)).toBeNull();
    expect(firstDifference(shown.edgeSeconds, result.edgeSeconds)).toBeNull();
    expect(result.frequencies).toHaveLength(12);
    shown.labels.forEach((label: string, k: number) => {
      CHANNELS.forEach((_, c) => {
        const row = shown.power[c][k].map((v: number | string) => (v === 'NaN' ? NaN : v));
        expect(firstDifference(row, flat(result.conditions[label].power[c])), `power ${label} ${CHANNELS[c]}`).toBeNull();
      });
    });
    expect(firstDifference(shown.spectrum, result.spectrum)).toBeNull();
    expect(firstDifference(shown.aperiodic, result.aperiodic)).toBeNull();
    expect(firstDifference(shown.warnings, result.warnings)).toBeNull();
    // Not vacuous: the annotation after the end is reported, on the page as in the CLI's Result.
    const outside = '1 annotations fall outside the recorded samples and are left out (first: "harbour-closed" at 75 s, after end)';
    expect(result.warnings).toContain(outside);
    await expect.poll(() => page.getByTestId('intake-warning').allTextContents()).toContain(outside);
    // Not a vacuous comparison: real, varied numbers (positive power, a fitted 1/f exponent between 0.5 and 3).
    expect(new Set(flat(result.conditions['lamp-watch'].power[0])).size).toBeGreaterThan(1000);
    for (const fit of result.aperiodic) expect(fit.exponent).toBeGreaterThan(0.5);
  });

  it('the pool’s complete Result, normalized maps included, is the CLI’s JSON text character for character', async () => {
    const pageText = await page.evaluate((r) => window.__tidemark!.runPool(r), recipe);
    const { text, result } = cli(recipe, 'pool');
    expect(firstDifference(JSON.parse(pageText), result)).toBeNull();
    // JSON.stringify writes each double's shortest round-trip decimal (ECMA-262, Number::toString), so equal text
    // means equal bits, every power and normalized value included.
    expect(pageText).toBe(text);
    expect(firstDifference(result, cliFirst)).toBeNull();
    expect(result.conditions['lamp-watch'].normalized[0].flat().filter((v) => v !== null && v !== 0).length).toBeGreaterThan(1000);
  });

  it('matches too for single-trial z-scores, a knee fit on epoch spectra, FWHM widths, linear frequencies, a reference and filters', async () => {
    const variant = {
      ...recipe,
      channels: ['Pz', 'Fz'],
      frequencies: { min: 4, max: 30, count: 7, spacing: 'linear' },
      cycles: { fwhm: 0.35 },
      baseline: { ...(recipe.baseline as object), method: 'z-score', scope: 'trial' },
      spectrum: { segment: 0.5, overlap: 0.25, range: [1, 60], source: 'epochs' },
      aperiodic: { range: [2, 50], model: 'power-law-knee' },
      // the continuous recording conditioned first: a reference and zero-phase filters (portable maths only)
      reference: { kind: 'common-average' },
      filters: { highPass: { cutoffHz: 0.5, order: 4 }, notch: { lineHz: 50, harmonics: 2, q: 30 } },
    };
    const pageText = await page.evaluate((r) => window.__tidemark!.runPool(r), variant);
    const { text, result } = cli(variant, 'variant');
    expect(firstDifference(JSON.parse(pageText), result)).toBeNull();
    expect(pageText).toBe(text);
    expect(result.channels).toEqual(['Pz', 'Fz']);
    expect(result.aperiodic[0].knee).not.toBeNull();
  });

  it('matches too for scope trial in decibels and percent change (trial pairs and coarse baselines)', async () => {
    for (const method of ['decibel', 'percent-change']) {
      const variant = { ...recipe, channels: ['Fz', 'Cz'], baseline: { ...(recipe.baseline as object), method, scope: 'trial' } };
      const pageText = await page.evaluate((r) => window.__tidemark!.runPool(r), variant);
      const { text, result } = cli(variant, `trial-${method}`);
      expect(firstDifference(JSON.parse(pageText), result), method).toBeNull();
      expect(pageText, method).toBe(text);
      // Not vacuous: trial scope differs from average scope.
      expect(firstDifference(result.conditions['lamp-watch'].normalized, cliFirst.conditions['lamp-watch'].normalized.slice(0, 2)), method).not.toBeNull();
    }
  });

  it('matches too for phase consistency and induced power (every ITPC value and evoked sample to the last bit)', async () => {
    const variant = { ...recipe, itpc: true, trialPower: 'induced' };
    const pageText = await page.evaluate((r) => window.__tidemark!.runPool(r), variant);
    const { text, result } = cli(variant, 'itpc-induced');
    expect(firstDifference(JSON.parse(pageText), result)).toBeNull();
    expect(pageText).toBe(text);
    // Not vacuous: both fields are there, and induced power is not total power (the evoked response came out).
    const lamp = result.conditions['lamp-watch'];
    expect(lamp.itpc).toHaveLength(CHANNELS.length);
    expect(lamp.evoked).toHaveLength(CHANNELS.length);
    expect(new Set(lamp.itpc![0].flat()).size).toBeGreaterThan(100);
    expect(firstDifference(lamp.power, cliFirst.conditions['lamp-watch'].power)).not.toBeNull();
  });
});
