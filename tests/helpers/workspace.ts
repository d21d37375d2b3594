// Steps the workspace browser tests share: a demo person signs in and opens a study's workspace, and a file is
// dropped on the Source screen the way a person drags one from the desktop.
import type { Page } from 'playwright-core';
import { DEMO_PEOPLE } from '../../src/db/seed';
import type { Role } from '../../src/lib/permissions';
import { appUrl } from './browser';

export const DEMO_STUDY = 'Harbour-bell anticipation';

/** The `nth` (from 0) demo person with `role`: the demo team has two analysts. */
export function demoPerson(role: Role = 'analyst', nth = 0) {
  const person = DEMO_PEOPLE.filter((p) => p.role === role)[nth];
  if (!person) throw new Error(`The demo has no person number ${nth} with role ${role}.`);
  return person;
}

/** Signs in through the sign-in page as a demo person; ends on their team's page. */
export async function signInAs(page: Page, person: { email: string; password: string }): Promise<void> {
  await page.goto(`${appUrl}/sign-in`);
  await page.getByLabel('E-mail').fill(person.email);
  await page.getByLabel('Password').fill(person.password);
  await page.getByRole('button', { name: 'Sign in' }).click();
  await page.waitForURL(/\/teams\/[0-9a-f-]+$/);
}

/**
 * Signs in as the first demo person with `role` (or the `nth`) and opens the workspace of the demo study (`query`
 * e.g. '?testhooks').
 */
export async function openWorkspace(page: Page, role: Role = 'analyst', query = '', { nth = 0 }: { nth?: number } = {}): Promise<void> {
  await signInAs(page, demoPerson(role, nth));
  await page.getByTestId('study-list').getByRole('link', { name: DEMO_STUDY }).click();
  await page.getByRole('link', { name: 'Open the workspace' }).click();
  await page.waitForURL(/\/workspace$/);
  if (query) await page.goto(`${page.url()}${query}`);
}

type DemoHooks = NonNullable<Window['__tidemark']>;

/**
 * Signs in as the first analyst, opens the demo study's workspace with the demo build's test hooks, and loads the
 * invented demo recording described by `demo` in the page; returns what the hooks report of it.
 */
export async function loadDemoInWorkspace(page: Page, demo: Parameters<DemoHooks['loadDemo']>[0]): Promise<Awaited<ReturnType<DemoHooks['loadDemo']>>> {
  await openWorkspace(page, 'analyst', '?testhooks');
  await page.waitForFunction(() => window.__tidemark !== undefined);
  return page.evaluate((d) => window.__tidemark!.loadDemo(d), demo);
}

/** dragenter, dragover and drop on the drop zone with a DataTransfer holding one File. */
export async function dropFile(page: Page, name: string, data: Uint8Array): Promise<void> {
  await page.getByTestId('drop-zone').waitFor();
  await page.evaluate(
    ({ name, b64 }) => {
      const binary = atob(b64);
      const buf = new Uint8Array(binary.length);
      for (let i = 0; i < binary.length; i++) buf[i] = binary.charCodeAt(i);
      const transfer = new DataTransfer();
      transfer.items.add(new File([buf], name, { type: 'application/octet-stream' }));
      const zone = document.querySelector('[data-testid="drop-zone"]')!;
      for (const type of ['dragenter', 'dragover', 'drop']) {
        zone.dispatchEvent(new DragEvent(type, { bubbles: true, cancelable: true, dataTransfer: transfer }));
      }
    },
    { name, b64: Buffer.from(data).toString('base64') },
  );
}

/**
 * Points at the centre of cell (fi, ti) of the normalized map and returns the cursor readout's numbers once it is
 * fresh; `textContains` also waits for the readout's text to say so.
 */
export async function readMapCell(page: Page, fi: number, ti: number, { textContains }: { textContains?: string } = {}) {
  const canvas = page.getByTestId('map-normalized');
  const box = (await canvas.boundingBox())!;
  const attr = async (n: string) => Number(await canvas.getAttribute(n));
  const [left, top, w, h, nt, nf] = await Promise.all(['data-plot-left', 'data-plot-top', 'data-plot-width', 'data-plot-height', 'data-times', 'data-frequencies'].map(attr));
  await page.mouse.move(box.x + left + ((ti + 0.5) * w) / nt, box.y + top + ((nf - 1 - fi + 0.5) * h) / nf);
  await page.waitForFunction(() => document.querySelector('[data-testid="map-readout"]')?.getAttribute('data-fresh') === 'yes');
  const readout = page.getByTestId('map-readout');
  if (textContains !== undefined) await page.waitForFunction((t) => (document.querySelector('[data-testid="map-readout"]')?.textContent ?? '').includes(t), textContains);
  return {
    time: Number(await readout.getAttribute('data-time')),
    frequency: Number(await readout.getAttribute('data-frequency')),
    raw: Number(await readout.getAttribute('data-raw')),
    normalized: Number(await readout.getAttribute('data-normalized')),
    text: (await readout.textContent()) ?? '',
  };
}

/** Starts recording every value the Recipe screen's progress bars show (their data-fraction attribute). */
export async function recordProgress(page: Page): Promise<void> {
  await page.evaluate(() => {
    const seen: number[] = ((window as unknown as { __tidemarkProgress: number[] }).__tidemarkProgress = []);
    new MutationObserver((records) => {
      for (const r of records) {
        const v = (r.target as Element).getAttribute?.('data-fraction');
        if (v !== null && v !== undefined) seen.push(Number(v));
      }
    }).observe(document.body, { subtree: true, attributes: true, attributeFilter: ['data-fraction'], childList: true });
  });
}

/** The progress values seen since recordProgress(). */
export function progressSeen(page: Page): Promise<number[]> {
  return page.evaluate(() => (window as unknown as { __tidemarkProgress: number[] }).__tidemarkProgress);
}

/** Opens a subject of the demo cohort from the Source screen's picker (`fileName`: the picker's value; default its first). */
export async function openDemoRecording(page: Page, fileName?: string): Promise<string> {
  const picker = page.getByLabel(/Demo cohort/);
  await picker.waitFor();
  if (fileName !== undefined) await picker.selectOption(fileName);
  const chosen = await picker.inputValue();
  await page.getByRole('button', { name: 'Open demo recording' }).click();
  await page.getByTestId('recording-details').waitFor({ timeout: 60_000 });
  return chosen;
}

/** On the Recipe screen: decompose exactly `channels` (leaving "all channels") and wait for the run to finish. */
export async function runOnChannels(page: Page, channels: readonly string[]): Promise<void> {
  await page.getByRole('tab', { name: 'Recipe' }).click();
  await page.getByTestId('recipe-screen').waitFor();
  const all = page.getByTestId('recipe-all-channels');
  if (await all.isChecked()) await all.uncheck();
  for (const name of channels) {
    const box = page.getByTestId(`recipe-channel-${name}`);
    if (!(await box.isChecked())) await box.check();
  }
  const checked = await page.locator('[data-testid^="recipe-channel-"]').evaluateAll((els) => els.filter((e) => (e as HTMLInputElement).checked).map((e) => e.getAttribute('data-testid')!.slice('recipe-channel-'.length)));
  for (const name of checked) if (!channels.includes(name)) await page.getByTestId(`recipe-channel-${name}`).uncheck();
  await page.getByTestId('recipe-run').click();
  await page.waitForFunction(() => document.querySelector('[data-testid="recipe-status"]')?.getAttribute('data-status') === 'done', undefined, { timeout: 60_000 });
}
