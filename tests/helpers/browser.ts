// playwright-core driving Debian's Chromium (never a downloaded browser). launch() gives every run a fresh,
// temporary --user-data-dir of its own (it refuses one passed in args), removed when the browser closes.
import path from 'node:path';
import { chromium, type Browser } from 'playwright-core';

export const appUrl = process.env.TIDEMARK_APP_URL ?? '';
export const artifactsDir = path.resolve('test-artifacts');

export async function launchBrowser(): Promise<{ browser: Browser; close: () => Promise<void> }> {
  if (!appUrl) throw new Error('TIDEMARK_APP_URL is not set: run browser tests through `npm test`.');
  const browser = await chromium.launch({
    executablePath: process.env.TIDEMARK_CHROMIUM ?? '/usr/bin/chromium',
    headless: true,
    args: [
      '--headless', '--no-sandbox', '--disable-gpu', '--no-first-run', '--disable-background-networking',
      '--disable-component-update', '--disable-sync', '--disable-quic',
    ],
  });
  return {
    browser,
    close: () => browser.close(),
  };
}

/** Clicks the control `testId` on `page`, saves the download it starts into `dir`, and returns its name and bytes. */
export async function downloadFrom(page: import('playwright-core').Page, testId: string, dir: string): Promise<{ name: string; bytes: Buffer }> {
  const [dl] = await Promise.all([page.waitForEvent('download'), page.getByTestId(testId).click()]);
  const file = path.join(dir, dl.suggestedFilename());
  await dl.saveAs(file);
  const { readFileSync } = await import('node:fs');
  return { name: dl.suggestedFilename(), bytes: readFileSync(file) };
}
