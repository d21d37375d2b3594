// The recipe's plan is made in the plan worker (workers/plan.worker.ts), not on the page's main thread: the Recipe
// screen's field errors arrive with that plan, and the run that follows uses it. Demo data: the invented Harbour
// Lights scenario generated from its seed (src/lib/demo).
import fs from 'node:fs';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser, Page } from 'playwright-core';
import { artifactsDir, launchBrowser } from '../helpers/browser';
import { loadDemoInWorkspace } from '../helpers/workspace';

const DEMO = { seconds: 60, channels: ['Fz', 'Cz', 'Pz'], epochStart: -0.5, epochEnd: 1.5 };

let browser: Browser;
let close: () => Promise<void>;
let page: Page;

const planWorkers = () => page.workers().filter((w) => /\/plan\.worker[-.]/.test(w.url()));

beforeAll(async () => {
  ({ browser, close } = await launchBrowser());
  fs.mkdirSync(artifactsDir, { recursive: true });
  const context = await browser.newContext({ viewport: { width: 1440, height: 900 } });
  page = await context.newPage();
  await loadDemoInWorkspace(page, DEMO);
});
afterAll(() => close());

describe('the plan worker', () => {
  it('checks the recipe in the plan worker: the field error arrives with the plan, and the run uses that worker only', async () => {
    expect(planWorkers()).toHaveLength(0);
    await page.getByRole('tab', { name: 'Recipe' }).click();
    // Showing the Recipe screen checks its recipe: the plan worker starts and holds the recording.
    await expect.poll(() => planWorkers().length).toBe(1);
    const fmax = await page.getByTestId('recipe-fmax').inputValue();
    await page.getByTestId('recipe-fmax').fill('300');
    // 500 Hz sampling: Nyquist is 250 Hz (Nyquist–Shannon sampling theorem, common practice).
    await expect.poll(() => page.getByRole('alert').allTextContents()).toContainEqual(expect.stringContaining('Nyquist frequency (250 Hz'));
    expect(await page.getByTestId('recipe-run').isDisabled()).toBe(true);
    await page.screenshot({ path: path.join(artifactsDir, 'plan-worker-recipe-error.png') });
    await page.getByTestId('recipe-fmax').fill(fmax);
    await expect.poll(() => page.getByRole('alert').allTextContents()).not.toContainEqual(expect.stringContaining('Nyquist'));
    await page.getByTestId('recipe-fcount').fill('12');
    await page.getByTestId('recipe-run').click();
    await page.waitForFunction(() => document.querySelector('[data-testid="recipe-status"]')?.getAttribute('data-status') === 'done', undefined, { timeout: 60_000 });
    // Still the one plan worker: the recording went to it once, and every plan since was made there.
    expect(planWorkers()).toHaveLength(1);
  });
});
