import fs from 'node:fs';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser, Page } from 'playwright-core';
import { artifactsDir, launchBrowser, downloadFrom } from '../helpers/browser';
import { loadDemoInWorkspace } from '../helpers/workspace';
import { loadDemo } from '../../src/components/explorer/test-hooks';
import { useWorkspace } from '../../src/lib/client/workspace/store';
import { planRecipe } from '../../src/lib/analysis/run-recipe';
import { epochSpectra } from '../../src/lib/analysis/epoch-spectra';

// The Spectrum and Bands screens on the full 32-channel demo cap (the invented Harbour Lights scenario), with phase
// consistency in the run, so the scalp maps have a whole head to draw and crowded labels to keep apart.
const DEMO = { seconds: 40, epochStart: -0.5, epochEnd: 1.5 };

let browser: Browser;
let close: () => Promise<void>;
let page: Page;

interface Box {
  x: number;
  y: number;
  width: number;
  height: number;
}
const intersect = (a: Box, b: Box) => a.x < b.x + b.width && b.x < a.x + a.width && a.y < b.y + b.height && b.y < a.y + a.height;

/** Runs axe-core (WCAG 2.0/2.1 A and AA rules) on the page; returns each violation's id and its first targets. */
async function axeViolations(): Promise<string[]> {
  // The page's CSP refuses an injected <script> (as it should); evaluating through the debugging protocol is not
  // subject to it, so axe runs without loosening the policy under test.
  if (!(await page.evaluate(() => 'axe' in window))) await page.evaluate(fs.readFileSync(path.resolve('node_modules/axe-core/axe.min.js'), 'utf8'));
  return page.evaluate(async () => {
    const axe = (window as unknown as { axe: { run: (ctx: Document, options: object) => Promise<{ violations: { id: string; nodes: { target: string[] }[] }[] }> } }).axe;
    const result = await axe.run(document, { runOnly: { type: 'tag', values: ['wcag2a', 'wcag2aa', 'wcag21a', 'wcag21aa'] } });
    return result.violations.map((v) => `${v.id}: ${v.nodes.slice(0, 3).map((n) => n.target.join(' ')).join(' | ')}`);
  });
}

/** No sideways scrolling at 640 CSS px (200 % of a 1280 px window), as explorer.test.ts checks the Maps screen; WCAG 2.1 SC 1.4.10 asks the same down to 320 px, which is not checked here. */
async function reflows(): Promise<number> {
  await page.setViewportSize({ width: 640, height: 900 });
  await page.waitForTimeout(300);
  const overflow = await page.evaluate(() => document.documentElement.scrollWidth - window.innerWidth);
  await page.setViewportSize({ width: 1440, height: 900 });
  await page.waitForTimeout(200);
  return overflow;
}

async function screenshots(name: string) {
  for (const [w, h] of [[1440, 900], [1100, 800]]) {
    await page.setViewportSize({ width: w, height: h });
    await page.waitForTimeout(300);
    await page.screenshot({ path: path.join(artifactsDir, `plots-${name}-${w}x${h}.png`), fullPage: true });
  }
  await page.setViewportSize({ width: 1440, height: 900 });
  await page.waitForTimeout(200);
}

beforeAll(async () => {
  ({ browser, close } = await launchBrowser());
  fs.mkdirSync(artifactsDir, { recursive: true });
  const context = await browser.newContext({ viewport: { width: 1440, height: 900 }, acceptDownloads: true });
  page = await context.newPage();
  const loaded = await loadDemoInWorkspace(page, DEMO);
  expect(loaded.channels).toHaveLength(32);
  // Phase consistency beside power: the recipe's `itpc` (the Recipe screen's own switch is another change).
  await page.evaluate(() => window.__tidemark!.stores.workspace.getState().setDraft({ itpc: true }));
  await page.getByRole('tab', { name: 'Recipe' }).click();
  await page.getByTestId('recipe-fcount').fill('12');
  await page.getByTestId('recipe-run').click();
  await page.waitForFunction(() => document.querySelector('[data-testid="recipe-status"]')?.getAttribute('data-status') === 'done', undefined, { timeout: 120_000 });
}, 180_000);
afterAll(() => close());

describe('the Spectrum screen', () => {
  it('draws the 10th–90th percentile across epochs, equal to the definition computed here from the core spectra', async () => {
    await page.getByRole('tab', { name: 'Maps' }).click();
    const recipe = JSON.parse((await downloadFrom(page, 'export-recipe', artifactsDir)).bytes.toString('utf8'));
    expect(recipe.itpc).toBe(true);
    await page.getByRole('tab', { name: 'Spectrum' }).click();
    await page.getByTestId('fit-readout').waitFor({ timeout: 60_000 });
    // The same samples and epochs in Node: the demo from its seed, planned with the exported recipe.
    loadDemo(DEMO);
    const recording = useWorkspace.getState().analysisRecording()!;
    const plan = planRecipe(recording, recipe);
    const channel = (await page.getByTestId('spectrum-channel').inputValue())!;
    const starts = Int32Array.from(plan.epochStarts.flatMap((s) => Array.from(s)));
    const core = epochSpectra(recording.data[recording.channelNames.indexOf(channel)], 500, starts, plan.epochSamples, plan.spectrum.segmentSamples, plan.spectrum.overlapSamples, recipe.spectrum.range);
    const bin = core.frequencies.findIndex((f) => f >= 10);
    const column = Array.from({ length: core.trials }, (_, k) => core.perTrial[k * core.frequencies.length + bin]).sort((a, b) => a - b);
    // Definition 7 of Hyndman & Fan (1996): h = (n − 1)p, linear between the order statistics around h.
    const q = (p: number) => {
      const h = (column.length - 1) * p;
      const lo = Math.floor(h);
      return column[lo] + (h - lo) * (column[Math.min(lo + 1, column.length - 1)] - column[lo]);
    };
    const row = page.locator(`[data-testid="spectrum-number-row"][data-hz="${core.frequencies[bin]}"]`);
    expect(Number(await row.getAttribute('data-low'))).toBeCloseTo(q(0.1), 9);
    expect(Number(await row.getAttribute('data-high'))).toBeCloseTo(q(0.9), 9);
    expect(q(0.1)).toBeLessThan(q(0.9));
  });

  it('shows each epoch only on demand, and keeps the fit-range handles off every tick label, by pointer and keyboard', async () => {
    const canvas = page.getByTestId('spectrum-plot');
    const before = await canvas.evaluate((c: HTMLCanvasElement) => c.toDataURL());
    await page.getByTestId('show-epochs').check();
    await expect.poll(() => canvas.evaluate((c: HTMLCanvasElement) => c.toDataURL())).not.toBe(before);
    await page.getByTestId('show-epochs').uncheck();
    await expect.poll(() => canvas.evaluate((c: HTMLCanvasElement) => c.toDataURL())).toBe(before);

    const labelBoxes = async (): Promise<Box[]> => {
      const at = (await canvas.boundingBox())!;
      const raw = JSON.parse((await canvas.getAttribute('data-label-boxes')) ?? '[]') as number[][];
      expect(raw.length).toBeGreaterThan(5);
      return raw.map(([x, y, width, height]) => ({ x: at.x + x, y: at.y + y, width, height }));
    };
    const handlesClear = async () => {
      const labels = await labelBoxes();
      for (const id of ['fit-range-low', 'fit-range-high']) {
        const h = (await page.getByTestId(id).boundingBox())!;
        for (const l of labels) expect(intersect(h, l), `${id} covers a label at ${JSON.stringify(l)}`).toBe(false);
      }
    };
    await handlesClear();
    // Keyboard: Home and End take the handles to the ends of the axis, where tick labels sit closest.
    const low = page.getByTestId('fit-range-low');
    await low.focus();
    await low.press('Home');
    await expect.poll(async () => Number(await page.getByTestId('fit-low').inputValue())).toBeLessThan(2);
    await page.getByTestId('fit-range-high').focus();
    await page.getByTestId('fit-range-high').press('End');
    await expect.poll(async () => Number(await page.getByTestId('fit-high').inputValue())).toBeGreaterThan(40);
    await handlesClear();
    // Arrow keys step one bin; the readout refits.
    const lowValue = Number(await page.getByTestId('fit-low').inputValue());
    await low.press('ArrowRight');
    await low.press('ArrowRight');
    await expect.poll(async () => Number(await page.getByTestId('fit-low').inputValue())).toBeGreaterThan(lowValue);
    await page.getByTestId('fit-low').fill('2');
    await page.getByTestId('fit-high').fill('40');
  });

  it('draws the exponent as a topography with 32 labels of which no two intersect (TP9/CP5, TP10/CP6 included)', async () => {
    const scalp = page.getByTestId('scalp-exponent');
    await expect.poll(() => scalp.locator('[data-testid="scalp-label"]').count()).toBe(32);
    const boxes = await scalp.locator('[data-testid="scalp-label"]').evaluateAll((els) => els.map((e) => {
      const r = e.getBoundingClientRect();
      return { name: e.textContent ?? '', x: r.x, y: r.y, width: r.width, height: r.height };
    }));
    for (let i = 0; i < boxes.length; i++) {
      for (let j = i + 1; j < boxes.length; j++) expect(intersect(boxes[i], boxes[j]), `${boxes[i].name} and ${boxes[j].name}`).toBe(false);
    }
    expect(boxes.map((b) => b.name)).toEqual(expect.arrayContaining(['TP9', 'CP5', 'TP10', 'CP6']));
    expect(await scalp.getByTestId('scalp-unit').textContent()).toBe('χ');
    // The interpolated disc is painted: the canvas under the outline holds more than one colour.
    const colours = await scalp.locator('canvas').evaluate((c: HTMLCanvasElement) => {
      const d = c.getContext('2d')!.getImageData(0, 0, c.width, c.height).data;
      const seen = new Set<number>();
      for (let i = 0; i < d.length; i += 4 * 97) if (d[i + 3] > 0) seen.add((d[i] << 16) | (d[i + 1] << 8) | d[i + 2]);
      return seen.size;
    });
    expect(colours).toBeGreaterThan(10);
  });

  it('has no WCAG 2.1 A/AA violation (axe-core) and is saved as screenshots', async () => {
    // Positive control: an unnamed button added to the screen must be reported, so a silent axe cannot pass.
    await page.evaluate(() => document.querySelector('[data-testid="spectrum-screen"]')!.appendChild(Object.assign(document.createElement('button'), { id: 'axe-control' })));
    expect((await axeViolations()).join('\n')).toContain('button-name');
    await page.evaluate(() => document.getElementById('axe-control')!.remove());
    await page.getByTestId('spectrum-numbers').locator('summary').click();
    expect(await axeViolations()).toEqual([]);
    await screenshots('spectrum');
    expect(await reflows()).toBeLessThanOrEqual(0);
    await page.getByTestId('spectrum-plot').locator('xpath=ancestor::div[contains(@class,"card")][1]').screenshot({ path: path.join(artifactsDir, 'plots-spectrum-plot.png') });
    await page.getByTestId('scalp-exponent').screenshot({ path: path.join(artifactsDir, 'plots-spectrum-scalp.png') });
  });
});

describe('the Bands screen', () => {
  it('sorts and filters the table, and a group row is the mean of its channels', async () => {
    await page.getByRole('tab', { name: 'Bands' }).click();
    await page.getByTestId('band-table').waitFor();
    // 32 channels × 2 conditions × 4 bands × 2 windows channel rows, plus the groups'.
    expect(await page.getByTestId('band-row').count()).toBe(25);
    await page.getByTestId('band-sort-value').click();
    const values = (await page.getByTestId('band-row').evaluateAll((rows) => rows.map((r) => r.getAttribute('data-value')))).map(Number);
    expect([...values].sort((a, b) => a - b)).toEqual(values);
    await page.getByTestId('band-filter').fill('TP10');
    await expect.poll(() => page.getByTestId('band-row-count').textContent()).toMatch(/^16 of /);
    expect(new Set(await page.getByTestId('band-row').evaluateAll((rows) => rows.map((r) => r.getAttribute('data-site'))))).toEqual(new Set(['TP10']));

    await page.getByTestId('band-filter').fill('left central');
    await page.getByTestId('band-kind').selectOption('group');
    const group = page.getByTestId('band-row').first();
    const [band, window, condition] = await Promise.all(['data-band', 'data-window', 'data-condition'].map((a) => group.getAttribute(a)));
    const groupValue = Number(await group.getAttribute('data-value'));
    const groupItpc = Number(await group.getAttribute('data-itpc'));
    // The default left-central region on this cap: C3, FC1, CP1 (src/lib/analysis/channel-groups.ts).
    await page.getByTestId('band-kind').selectOption('channel');
    const members: { value: number; itpc: number }[] = [];
    for (const c of ['C3', 'FC1', 'CP1']) {
      await page.getByTestId('band-filter').fill(c);
      const row = page.locator(`[data-testid="band-row"][data-site="${c}"][data-band="${band}"][data-window="${window}"][data-condition="${condition}"]`);
      members.push({ value: Number(await row.getAttribute('data-value')), itpc: Number(await row.getAttribute('data-itpc')) });
    }
    expect(groupValue).toBeCloseTo(members.reduce((s, m) => s + m.value, 0) / 3, 12);
    expect(groupItpc).toBeCloseTo(members.reduce((s, m) => s + m.itpc, 0) / 3, 12);
    await page.getByTestId('band-filter').fill('');
    await page.getByTestId('band-kind').selectOption('');
  });

  it('charts several channels and a group, each sized to its card, the unit apart from every number', async () => {
    await page.getByTestId('band-sites').selectOption(['left central', 'TP9', 'Oz']);
    await expect.poll(() => page.getByTestId('band-chart').count()).toBe(3);
    const card = (await page.getByTestId('band-sites').locator('xpath=ancestor::div[contains(@class,"card")][1]').boundingBox())!;
    for (const chart of await page.getByTestId('band-plot').all()) {
      const b = (await chart.boundingBox())!;
      expect(b.x + b.width).toBeLessThanOrEqual(card.x + card.width + 0.5);
      const title = (await chart.getByTestId('band-axis-title').boundingBox())!;
      for (const tick of await chart.getByTestId('band-tick').all()) expect(intersect(title, (await tick.boundingBox())!)).toBe(false);
      expect(await chart.getByTestId('band-axis-title').textContent()).toBe('mean (dB)');
    }
  });

  it('maps any band × window on the scalp, as normalized power or as ITPC, with the table values', async () => {
    const card = page.getByTestId('band-scalp-card');
    await card.getByTestId('scalp-band').selectOption({ label: 'alpha 8–13 Hz' });
    await card.getByTestId('scalp-window').selectOption({ index: 1 });
    await card.getByTestId('scalp-condition').selectOption('oar-pull');
    await card.getByTestId('scalp-measure').selectOption('itpc');
    await expect.poll(() => card.getByTestId('scalp-unit').textContent()).toBe('ITPC, 0–1');
    await card.locator('summary').click();
    const tp9 = Number(await card.locator('tr', { hasText: /^TP9/ }).locator('td').nth(1).textContent());
    await page.getByTestId('band-filter').fill('TP9');
    const row = page.locator('[data-testid="band-row"][data-site="TP9"][data-band="alpha"][data-window="late"][data-condition="oar-pull"]');
    expect(tp9).toBeCloseTo(Number(await row.getAttribute('data-itpc')), 3);
    expect(tp9).toBeGreaterThanOrEqual(0);
    expect(tp9).toBeLessThanOrEqual(1);
    const labels = await card.locator('[data-testid="scalp-label"]').evaluateAll((els) => els.map((e) => e.getBoundingClientRect()));
    for (let i = 0; i < labels.length; i++) for (let j = i + 1; j < labels.length; j++) expect(intersect(labels[i], labels[j])).toBe(false);
    await card.getByTestId('scalp-measure').selectOption('power');
    await expect.poll(() => card.getByTestId('scalp-unit').textContent()).toBe('dB');
    await page.getByTestId('band-filter').fill('');
  });

  it('has no WCAG 2.1 A/AA violation (axe-core) and is saved as screenshots', async () => {
    expect(await axeViolations()).toEqual([]);
    await screenshots('bands');
    expect(await reflows()).toBeLessThanOrEqual(0);
    await page.getByTestId('band-scalp-card').screenshot({ path: path.join(artifactsDir, 'plots-bands-scalp.png') });
  });

  it('forgets the charted channels and groups when another recording is decomposed', async () => {
    await page.getByTestId('band-sites').selectOption(['left central', 'TP9', 'Oz']);
    await expect.poll(() => page.getByTestId('band-chart').count()).toBe(3);
    // Another subject of the same scenario, four midline channels: no TP9, no left-central group.
    const other = await page.evaluate(() => window.__tidemark!.loadDemo({ seconds: 20, subject: 1, channels: ['Fz', 'Cz', 'Pz', 'Oz'], epochStart: -0.5, epochEnd: 1.5 }));
    expect(other.channels).toEqual(['Fz', 'Cz', 'Pz', 'Oz']);
    await page.getByRole('tab', { name: 'Recipe' }).click();
    await page.getByTestId('recipe-run').click();
    await page.waitForFunction(() => document.querySelector('[data-testid="recipe-status"]')?.getAttribute('data-status') === 'done', undefined, { timeout: 120_000 });
    await page.getByRole('tab', { name: 'Bands' }).click();
    await page.getByTestId('band-table').waitFor();
    const sites = await page.getByTestId('band-chart').evaluateAll((charts) => charts.map((c) => c.getAttribute('data-site')));
    expect(sites).toHaveLength(1);
    expect(other.channels).toContain(sites[0]);
    expect(await page.getByTestId('band-sites').evaluate((s: HTMLSelectElement) => Array.from(s.selectedOptions, (o) => o.value))).toEqual(sites);
  });
});
