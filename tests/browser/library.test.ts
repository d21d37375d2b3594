// The local library per account: two people in one browser profile (one context, one after the other) never see
// each other's recordings, sign-out can remove this account's recordings from IndexedDB, and entries expire.
// Recordings are small files from the demo generator (the invented Harbour Lights scenario); names are our own.
import { createHash } from 'node:crypto';
import fs from 'node:fs';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser, Page } from 'playwright-core';
import { appUrl, artifactsDir, launchBrowser } from '../helpers/browser';
import { demoPerson, dropFile, openWorkspace, signInAs } from '../helpers/workspace';
import { describeCohort, writeSubjectEdf } from '../../src/lib/demo/cohort';

let browser: Browser;
let close: () => Promise<void>;
let fileA: Uint8Array;
let fileB: Uint8Array;
let fileC: Uint8Array;
const NAME_A = 'tm-first-account-71.edf';
const NAME_B = 'tm-second-account-72.edf';
const NAME_C = 'tm-kept-longer-73.edf';
const sha256 = (b: Uint8Array) => createHash('sha256').update(b).digest('hex');

beforeAll(async () => {
  ({ browser, close } = await launchBrowser());
  fs.mkdirSync(artifactsDir, { recursive: true });
  const cohort = describeCohort({ subjects: 3, seconds: 10 });
  [fileA, fileB, fileC] = cohort.subjects.map((s) => writeSubjectEdf(s));
});
afterAll(() => close());

interface StoredBinary {
  database: string;
  store: string;
  sha256: string;
  bytes: number;
}
interface Contents {
  databases: string[];
  binaries: StoredBinary[];
  /** Every string value found anywhere in any store, keys included. */
  strings: string[];
}

/**
 * Everything this origin keeps in IndexedDB: every database (indexedDB.databases()), every object store, every key
 * and value, walked recursively; each Blob, ArrayBuffer or typed array is read and hashed (SHA-256, Web Crypto).
 */
function indexedDbContents(page: Page): Promise<Contents> {
  return page.evaluate(async () => {
    const req = <T,>(r: IDBRequest<T>) => new Promise<T>((resolve, reject) => {
      r.onsuccess = () => resolve(r.result);
      r.onerror = () => reject(r.error);
    });
    const out: Contents = { databases: [], binaries: [], strings: [] };
    const hex = async (buf: ArrayBuffer) => [...new Uint8Array(await crypto.subtle.digest('SHA-256', buf))].map((b) => b.toString(16).padStart(2, '0')).join('');
    const walk = async (value: unknown, database: string, store: string): Promise<void> => {
      if (typeof value === 'string') out.strings.push(value);
      else if (value instanceof Blob) {
        const buf = await value.arrayBuffer();
        out.binaries.push({ database, store, sha256: await hex(buf), bytes: buf.byteLength });
      } else if (value instanceof ArrayBuffer) out.binaries.push({ database, store, sha256: await hex(value), bytes: value.byteLength });
      else if (ArrayBuffer.isView(value)) {
        const copy = new Uint8Array(value.byteLength);
        copy.set(new Uint8Array(value.buffer, value.byteOffset, value.byteLength));
        out.binaries.push({ database, store, sha256: await hex(copy.buffer), bytes: copy.byteLength });
      } else if (Array.isArray(value)) for (const v of value) await walk(v, database, store);
      else if (value !== null && typeof value === 'object') for (const v of Object.values(value)) await walk(v, database, store);
    };
    for (const info of await indexedDB.databases()) {
      const name = info.name!;
      out.databases.push(name);
      const db = await req(indexedDB.open(name));
      try {
        for (const store of [...db.objectStoreNames]) {
          const tx = db.transaction(store, 'readonly').objectStore(store);
          const [keys, values] = await Promise.all([req(tx.getAllKeys()), req(tx.getAll())]);
          await walk(keys, name, store);
          await walk(values, name, store);
        }
      } finally {
        db.close();
      }
    }
    return out;
  });
}

/** Clicks the header's Sign out with the box ticked or not, and waits for the sign-in page. */
async function signOut(page: Page, { removeRecordings }: { removeRecordings: boolean }): Promise<void> {
  const form = page.getByTestId('sign-out');
  const box = form.getByLabel('also remove the recordings kept in this browser');
  expect(await box.isChecked()).toBe(true); // ticked by default
  await box.setChecked(removeRecordings);
  await form.getByRole('button', { name: 'Sign out' }).click();
  await page.waitForURL(/\/sign-in\?notice=signed-out$/);
}

async function libraryNames(page: Page): Promise<string[]> {
  const library = page.getByTestId('library');
  await library.getByText(/The library is empty\.|Storage used/).first().waitFor();
  await page.waitForFunction(() => document.querySelector('[data-testid="library"]') !== null);
  return (await library.getByTestId('library-entry').locator('span.font-semibold').allTextContents()).sort();
}

async function keep(page: Page, name: string, bytes: Uint8Array): Promise<void> {
  await dropFile(page, name, bytes);
  await page.getByTestId('recording-details').getByText(name).first().waitFor({ timeout: 30_000 });
  await page.getByTestId('library-entry').filter({ hasText: name }).waitFor();
}

describe('the local library belongs to one account', () => {
  it('two accounts in one browser profile do not see each other’s local recordings; sign-out unticked keeps them for that account, ticked removes every recording byte from IndexedDB', async () => {
    const context = await browser.newContext({ viewport: { width: 1440, height: 900 } });
    const page = await context.newPage();

    // First analyst keeps a recording, then signs out keeping it.
    await openWorkspace(page, 'analyst', '', { nth: 0 });
    expect(await libraryNames(page)).toEqual([]);
    await keep(page, NAME_A, fileA);
    expect(await libraryNames(page)).toEqual([NAME_A]);
    await page.screenshot({ path: path.join(artifactsDir, 'library-source-signout.png') });
    await signOut(page, { removeRecordings: false });
    let stored = await indexedDbContents(page);
    // The enumeration does find a kept recording's bytes: the checks below that find none can fail.
    expect(stored.binaries.map((b) => b.sha256)).toContain(sha256(fileA));

    // Second analyst, same browser profile: an empty library, then only their own recording.
    await openWorkspace(page, 'analyst', '', { nth: 1 });
    expect(await libraryNames(page)).toEqual([]);
    await keep(page, NAME_B, fileB);
    expect(await libraryNames(page)).toEqual([NAME_B]);
    // Reopening by fingerprint through the page's library finds nothing of the other account either.
    stored = await indexedDbContents(page);
    expect(stored.binaries.map((b) => b.sha256).sort()).toEqual([sha256(fileA), sha256(fileB)].sort());
    const dbOf = (hash: string) => stored.binaries.find((b) => b.sha256 === hash)!.database;
    expect(dbOf(sha256(fileA))).not.toBe(dbOf(sha256(fileB)));
    await signOut(page, { removeRecordings: true });
    stored = await indexedDbContents(page);
    expect(stored.binaries.map((b) => b.sha256)).toEqual([sha256(fileA)]);
    expect(stored.strings.join('\n')).not.toContain(NAME_B);

    // The first analyst again: their recording is still there (unticked), and the other's never was.
    await openWorkspace(page, 'analyst', '', { nth: 0 });
    expect(await libraryNames(page)).toEqual([NAME_A]);
    await page.getByRole('button', { name: `Reopen ${NAME_A}` }).click();
    await page.getByTestId('recording-details').getByText('this browser’s library').waitFor({ timeout: 30_000 });
    await signOut(page, { removeRecordings: true });

    // Box ticked: no recording byte and no file name left anywhere in this origin's IndexedDB.
    stored = await indexedDbContents(page);
    expect(stored.binaries).toEqual([]);
    const text = stored.strings.join('\n');
    for (const name of [NAME_A, NAME_B]) expect(text).not.toContain(name);
    expect(stored.databases.filter((d) => d.startsWith('tidemark-library'))).toEqual([]);
    await context.close();
  });

  it('sign-out removes the recordings even while another workspace tab holds the library open', async () => {
    const context = await browser.newContext({ viewport: { width: 1440, height: 900 } });
    const first = await context.newPage();
    await openWorkspace(first, 'analyst', '', { nth: 1 });
    await keep(first, NAME_B, fileB);
    // A second tab of the same account, its library listed (so its IndexedDB connection is open).
    const second = await context.newPage();
    await second.goto(first.url());
    expect(await libraryNames(second)).toEqual([NAME_B]);
    await signOut(first, { removeRecordings: true });
    const stored = await indexedDbContents(first);
    expect(stored.binaries).toEqual([]);
    expect(stored.databases.filter((d) => d.startsWith('tidemark-library'))).toEqual([]);
    await context.close();
  });

  it('the sign-out script is a bundled module file of this origin, not an inline script', async () => {
    const context = await browser.newContext();
    const page = await context.newPage();
    await signInAs(page, demoPerson('reviewer'));
    const html = await (await page.request.get(page.url())).text();
    const inline = [...html.matchAll(/<script\b([^>]*)>([\s\S]*?)<\/script>/gi)].filter((m) => !/\bsrc\s*=/.test(m[1]));
    for (const m of inline) expect(m[2]).not.toMatch(/deleteDatabase|forget-library|libraryOwner/);
    const sources = [...html.matchAll(/<script\b[^>]*\bsrc="([^"]+)"[^>]*>/gi)].map((m) => m[1]);
    const bodies = await Promise.all(sources.map(async (src) => (await page.request.get(new URL(src, appUrl).href)).text()));
    const signOutScript = sources.filter((_, i) => bodies[i].includes('deleteDatabase'));
    expect(signOutScript.length).toBe(1);
    expect(signOutScript[0]).toMatch(/^\/_astro\/[^/]+\.js$/);
    await context.close();
  });

  it('removes entries not opened for the library expiry (default 30 days) and lists what expired', async () => {
    const context = await browser.newContext({ viewport: { width: 1440, height: 900 } });
    const page = await context.newPage();
    await openWorkspace(page, 'lead');
    await keep(page, NAME_A, fileA);
    await keep(page, NAME_C, fileC);
    // Move the stored "last opened" times back (the clock stays; the timestamps move): 31 and 29 days.
    await page.evaluate(async ({ old, recent }) => {
      const name = (await indexedDB.databases()).map((d) => d.name!).find((n) => n.startsWith('tidemark-library:'))!;
      const db = await new Promise<IDBDatabase>((resolve, reject) => {
        const r = indexedDB.open(name);
        r.onsuccess = () => resolve(r.result);
        r.onerror = () => reject(r.error);
      });
      const store = db.transaction('recordings', 'readwrite').objectStore('recordings');
      await new Promise<void>((resolve, reject) => {
        const cursor = store.openCursor();
        cursor.onsuccess = () => {
          const c = cursor.result;
          if (!c) return resolve();
          const v = c.value as { fileName: string; openedAt: string };
          c.update({ ...v, openedAt: v.fileName === old.name ? old.at : recent.at });
          c.continue();
        };
        cursor.onerror = () => reject(cursor.error);
      });
      db.close();
    }, {
      old: { name: NAME_A, at: new Date(Date.now() - 31 * 86_400_000).toISOString() },
      recent: { at: new Date(Date.now() - 29 * 86_400_000).toISOString() },
    });
    await page.reload();
    const notice = page.getByTestId('library-expired');
    await notice.waitFor();
    expect(await notice.textContent()).toContain('Not opened for 30 days');
    expect(await notice.getByRole('listitem').allTextContents()).toEqual([expect.stringContaining(NAME_A)]);
    expect(await libraryNames(page)).toEqual([NAME_C]);
    const stored = await indexedDbContents(page);
    expect(stored.binaries.map((b) => b.sha256)).toEqual([sha256(fileC)]);
    await page.screenshot({ path: path.join(artifactsDir, 'library-expired.png') });
    await signOut(page, { removeRecordings: true });
    await context.close();
  });

  it('removes the one library all accounts shared before, without showing its contents to anyone', async () => {
    const context = await browser.newContext({ viewport: { width: 1440, height: 900 } });
    const page = await context.newPage();
    await page.goto(`${appUrl}/sign-in`);
    // The library as an earlier version kept it: one database for the whole browser.
    await page.evaluate(async (name) => {
      const db = await new Promise<IDBDatabase>((resolve, reject) => {
        const r = indexedDB.open('tidemark-library');
        r.onupgradeneeded = () => r.result.createObjectStore('recordings');
        r.onsuccess = () => resolve(r.result);
        r.onerror = () => reject(r.error);
      });
      const tx = db.transaction('recordings', 'readwrite');
      tx.objectStore('recordings').put({ fingerprint: 'ab', fileName: name, sizeBytes: 3, openedAt: new Date().toISOString(), kind: 'edf', csv: null, blob: new Blob([new Uint8Array([1, 2, 3])]), events: null }, 'ab');
      await new Promise((r) => (tx.oncomplete = r));
      db.close();
    }, 'tm-shared-before-74.edf');
    await openWorkspace(page, 'reviewer');
    await page.getByTestId('library-legacy-removed').waitFor();
    expect(await libraryNames(page)).toEqual([]);
    expect(await page.getByTestId('library').textContent()).not.toContain('tm-shared-before-74.edf');
    const stored = await indexedDbContents(page);
    expect(stored.databases).not.toContain('tidemark-library');
    expect(stored.binaries).toEqual([]);
    await context.close();
  });
});
