// `npm run serve`, the production launcher: refuses missing or unsafe settings with one line, and with good ones
// serves the production flavour, whose bundle has no test hooks, no demo generator and no dev mailbox route.
import fs from 'node:fs';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser } from 'playwright-core';
import { launchBrowser } from '../helpers/browser';
import { repoRoot, runToEnd, startInstance, type Instance } from '../helpers/instance';
import { DEMO_PEOPLE } from '../../src/db/seed';

const slot = process.env.TIDEMARK_TEST_SLOT ?? '';
const productionOut = `dist-production-test${slot}`;
const base = { PATH: process.env.PATH, HOME: process.env.HOME };
const appRoleUrl = process.env.DATABASE_URL!;
const ownerUrl = process.env.TIDEMARK_OWNER_DATABASE_URL!;
const good = {
  ...base,
  DATABASE_URL: appRoleUrl,
  TIDEMARK_SMTP_URL: `smtp://127.0.0.1:${process.env.SMTP_PORT}`,
  TIDEMARK_TRUSTED_PROXIES: 'none',
  TIDEMARK_OUT_DIR: productionOut,
};

describe('npm run serve refuses to start without safe settings', () => {
  it('names the first missing setting', async () => {
    const { code, output } = await runToEnd('scripts/serve.mjs', base);
    expect(code).toBe(2);
    expect(output.trim()).toBe("tidemark: not starting: DATABASE_URL is not set: the app's PostgreSQL connection (its own role: no superuser, no DDL; see README, Deploying)");
  });

  it('refuses plain http for a public origin, the mail fake, and a superuser database role', async () => {
    const origin = 'http://tidemark.example.org';
    const http = await runToEnd('scripts/serve.mjs', { ...good, TIDEMARK_ORIGIN: origin });
    expect(http.code).toBe(2);
    expect(http.output).toContain('TIDEMARK_ORIGIN must use https');
    const fake = await runToEnd('scripts/serve.mjs', { ...good, TIDEMARK_ORIGIN: 'https://tidemark.example.org', TIDEMARK_MAIL_FAKE: '1' });
    expect(fake.output).toContain('TIDEMARK_MAIL_FAKE is set');
    const superuser = await runToEnd('scripts/serve.mjs', { ...good, TIDEMARK_ORIGIN: 'https://tidemark.example.org', DATABASE_URL: ownerUrl });
    expect(superuser.code).toBe(2);
    expect(superuser.output).toContain('DATABASE_URL connects as a superuser');
    const idle = await runToEnd('scripts/serve.mjs', { ...good, TIDEMARK_ORIGIN: 'https://tidemark.example.org', TIDEMARK_SESSION_IDLE_MINUTES: 'soon' });
    expect(idle.output).toContain('TIDEMARK_SESSION_IDLE_MINUTES must be a positive number, not "soon"');
  });
});

describe('the production flavour', () => {
  let server: Instance;
  let browser: Browser;
  let close: () => Promise<void>;

  beforeAll(async () => {
    const port = 4391 + Number(slot || 0);
    server = await startInstance(
      { ...good, TIDEMARK_ORIGIN: `http://127.0.0.1:${port}`, TIDEMARK_PORT: String(port), PORT: String(port) },
      { script: 'scripts/serve.mjs', timeoutMs: 400_000, inherit: false },
    );
    ({ browser, close } = await launchBrowser());
  }, 420_000);
  afterAll(async () => {
    await close?.();
    await server?.stop();
  });

  function filesUnder(dir: string): string[] {
    return fs.readdirSync(dir, { withFileTypes: true }).flatMap((e) => (e.isDirectory() ? filesUnder(path.join(dir, e.name)) : [path.join(dir, e.name)]));
  }
  const text = (dir: string) => filesUnder(path.join(repoRoot, dir)).filter((f) => /\.(m?js|html)$/.test(f)).map((f) => fs.readFileSync(f, 'utf8')).join('\n');

  it('ships neither the test hooks nor the demo generator nor the mailbox (the demo build does, so the markers are real)', () => {
    // The hooks' global and URL flag, the demo generator's task description, the mailbox route.
    const markers = ['__tidemark', 'testhooks', 'a lighthouse lamp blinks a pattern', '/dev/mailbox'];
    const demo = text(process.env.TIDEMARK_OUT_DIR ?? 'dist');
    for (const m of markers) expect(demo.includes(m), `demo build contains ${m}`).toBe(true);
    const production = text(productionOut);
    for (const m of markers) expect(production.includes(m), `production build contains ${m}`).toBe(false);
  });

  it('splits the workspace into client chunks, none of which carries the test hooks or the demo generator', () => {
    // Client chunks of both flavours (this file's production build and the demo build npm test made). Markers are
    // string literals, which survive minification: the hooks' global and URL flag, the demo generator's task text.
    const chunksOf = (out: string) => {
      const dir = path.join(repoRoot, out, 'client', '_astro');
      return fs.readdirSync(dir).filter((f) => f.endsWith('.js')).map((f) => ({ name: f, text: fs.readFileSync(path.join(dir, f), 'utf8') }));
    };
    const markers = ['__tidemark', 'testhooks', 'a lighthouse lamp blinks a pattern'];
    const demo = chunksOf(process.env.TIDEMARK_OUT_DIR ?? 'dist');
    for (const m of markers) expect(demo.some((c) => c.text.includes(m)), `a demo-build chunk contains ${m}`).toBe(true);
    const production = chunksOf(productionOut);
    for (const c of production) for (const m of markers) expect(c.text.includes(m), `${c.name} contains ${m}`).toBe(false);
    // The plot-heavy screens are chunks of their own (React.lazy in Workspace.tsx): the island's chunks do not hold
    // the Maps or Spectrum screen (their plots' test ids), another chunk does.
    const island = production.filter((c) => c.name.startsWith('Workspace.'));
    expect(island.length).toBeGreaterThan(0);
    for (const id of ['map-normalized', 'above-line-plot']) {
      for (const c of island) expect(c.text.includes(id), `${c.name} holds ${id}`).toBe(false);
      expect(production.some((c) => !island.includes(c) && c.text.includes(id)), `no chunk holds ${id}`).toBe(true);
    }
    const sizes = production.map((c) => `${c.name} ${(Buffer.byteLength(c.text) / 1000).toFixed(1)} kB`).sort();
    fs.mkdirSync(path.join(repoRoot, 'test-artifacts'), { recursive: true });
    fs.writeFileSync(path.join(repoRoot, 'test-artifacts', `production-chunks${slot}.txt`), sizes.join('\n') + '\n');
  });

  it('answers 404 for the dev mailbox and demo files, and sends HSTS with the other headers', async () => {
    for (const p of ['/dev/mailbox', '/demo/cohort.json']) {
      const r = await fetch(server.url + p, { redirect: 'manual' });
      expect(r.status, p).toBe(404);
    }
    const page = await fetch(`${server.url}/sign-in`);
    expect(page.headers.get('strict-transport-security')).toBe('max-age=31536000; includeSubDomains');
    expect(page.headers.get('content-security-policy')).toContain("default-src 'self'");
  });

  it('does nothing with ?testhooks and offers no demo cohort in the workspace', async () => {
    const analyst = DEMO_PEOPLE.find((p) => p.role === 'analyst')!;
    const context = await browser.newContext({ viewport: { width: 1440, height: 900 } });
    const page = await context.newPage();
    await page.goto(`${server.url}/sign-in`);
    await page.getByLabel('E-mail').fill(analyst.email);
    await page.getByLabel('Password').fill(analyst.password);
    await page.getByRole('button', { name: 'Sign in' }).click();
    await page.waitForURL(/\/teams\/[0-9a-f-]+$/);
    const study = await page.getByTestId('study-list').getByRole('link').first().getAttribute('href');
    await page.goto(`${server.url}${study}/workspace?testhooks`);
    await page.getByRole('tab', { name: /Source/ }).waitFor();
    await page.waitForLoadState('networkidle');
    expect(await page.evaluate(() => typeof (window as unknown as { __tidemark?: unknown }).__tidemark)).toBe('undefined');
    expect(await page.getByText('Open demo recording').count()).toBe(0);
    await context.close();
  });
});
