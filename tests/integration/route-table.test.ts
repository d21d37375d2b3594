// Every route × every kind of visitor, against the built app (issue 8: "operator vs lead vs analyst vs reviewer vs
// signed-out vs other team, for every route"), and every response's security headers (issue 8, item 4). The routes
// come from the file system (src/pages/** and the demo routes astro.config.mjs injects); the expected outcomes from
// route-table.expected.ts beside this file.
import fs from 'node:fs';
import path from 'node:path';
import { createHash } from 'node:crypto';
import { fileURLToPath } from 'node:url';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { Client, pool, unique } from '../helpers/app';
import { createMember, createOperator, createTeam } from '../helpers/fixtures';
import { demoRecipe, smallSummary } from '../helpers/review';
import { createInvitation } from '../../src/db/queries/invitations';
import { createPasswordReset } from '../../src/db/queries/password-resets';
import { pool as appDbPool } from '../../src/db/client';
import { actors, routeTable, type Actor, type Outcome } from './route-table.expected';

const root = fileURLToPath(new URL('../../', import.meta.url));
const HTTP_METHODS = ['GET', 'POST', 'PUT', 'PATCH', 'DELETE', 'OPTIONS', 'HEAD', 'ALL'];

afterAll(async () => {
  await pool.end();
  await appDbPool.end();
});

// ------------------------------------------------------------------ routes from the file system

/** The methods a route file answers: pages take GET and POST (forms post to the page itself); endpoints what they export. */
function methodsOf(file: string): string[] {
  if (file.endsWith('.astro')) return ['GET', 'POST'];
  const source = fs.readFileSync(file, 'utf8');
  const found = new Set<string>();
  const patterns = [
    /export\s+(?:const|let|var)\s+([A-Z]+)\b/g,
    /export\s+(?:async\s+)?function\s+([A-Z]+)\b/g,
  ];
  for (const re of patterns) for (const m of source.matchAll(re)) if (HTTP_METHODS.includes(m[1])) found.add(m[1]);
  for (const m of source.matchAll(/export\s*\{([^}]*)\}/g)) {
    for (const part of m[1].split(',')) {
      const name = part.trim().split(/\s+as\s+/).pop()!.trim();
      if (HTTP_METHODS.includes(name)) found.add(name);
    }
  }
  if (found.size === 0) throw new Error(`${path.relative(root, file)} exports no HTTP method handler`);
  return [...found].sort();
}

/** Astro's file-based routing: src/pages/a/[b]/index.astro → /a/[b]; files and folders starting with _ are not routes. */
function pageRoutes(): { pattern: string; file: string }[] {
  const pagesDir = path.join(root, 'src', 'pages');
  const out: { pattern: string; file: string }[] = [];
  const walk = (dir: string) => {
    for (const entry of fs.readdirSync(dir, { withFileTypes: true })) {
      if (entry.name.startsWith('_') || entry.name.startsWith('.')) continue;
      const full = path.join(dir, entry.name);
      if (entry.isDirectory()) walk(full);
      else if (/\.(astro|ts|js|md|mdx|html)$/.test(entry.name)) {
        if (!/\.(astro|ts)$/.test(entry.name)) throw new Error(`route table: unexpected page type ${path.relative(root, full)}`);
        const rel = path.relative(pagesDir, full).replace(/\\/g, '/').replace(/\.(astro|ts)$/, '');
        const pattern = `/${rel}`.replace(/\/index$/, '') || '/';
        out.push({ pattern, file: full });
      }
    }
  };
  walk(pagesDir);
  return out;
}

/** The demo build's injected routes, read from astro.config.mjs's injectRoute calls. */
function injectedRoutes(): { pattern: string; file: string }[] {
  const config = fs.readFileSync(path.join(root, 'astro.config.mjs'), 'utf8');
  const out: { pattern: string; file: string }[] = [];
  for (const m of config.matchAll(/injectRoute\(\s*\{\s*pattern:\s*'([^']+)',\s*entrypoint:\s*'([^']+)'\s*\}\s*\)/g)) {
    out.push({ pattern: m[1], file: path.join(root, m[2]) });
  }
  return out;
}

function routesOnDisk(): string[] {
  return [...pageRoutes(), ...injectedRoutes()].flatMap(({ pattern, file }) => methodsOf(file).map((method) => `${method} ${pattern}`)).sort();
}

describe('the route table covers the routes on disk', () => {
  it('finds the routes it should (sanity check of the enumeration itself)', () => {
    const onDisk = routesOnDisk();
    // Four kinds the enumeration must see: a page, a .ts endpoint with one method, one with two, an injected route.
    expect(onDisk).toContain('GET /teams/[teamId]');
    expect(onDisk).toContain('POST /sign-out');
    expect(onDisk).not.toContain('GET /sign-out');
    expect(onDisk).toEqual(expect.arrayContaining(['GET /api/teams/[teamId]/studies', 'POST /api/teams/[teamId]/studies']));
    expect(onDisk).toContain('GET /dev/mailbox');
    expect(onDisk).toContain('GET /demo/[file]');
  });

  it('has an entry for every route and method on disk, and no entry without a route', () => {
    const onDisk = new Set(routesOnDisk());
    const inTable = new Set(Object.keys(routeTable));
    const missing = [...onDisk].filter((r) => !inTable.has(r));
    const stale = [...inTable].filter((r) => !onDisk.has(r));
    expect(missing, 'routes on disk without an entry in route-table.expected.ts').toEqual([]);
    expect(stale, 'entries in route-table.expected.ts without a route on disk').toEqual([]);
  });
});

// ------------------------------------------------------------------ security headers

/** The directives of a Content-Security-Policy header (W3C CSP Level 3, §2.2 "Policies": `;`-separated directives). */
function directives(policy: string): Map<string, string[]> {
  const map = new Map<string, string[]>();
  for (const part of policy.split(';')) {
    const [name, ...values] = part.trim().split(/\s+/);
    if (name) map.set(name.toLowerCase(), values);
  }
  return map;
}

/** Problems with a response's security headers; empty when every header issue 8 asks for is there. */
async function headerProblems(response: Response, body: string | null): Promise<string[]> {
  const problems: string[] = [];
  const h = response.headers;
  const csp = h.get('content-security-policy');
  if (!csp) return ['no Content-Security-Policy'];
  const d = directives(csp);
  const exactly = (name: string, values: string[]) => {
    const got = d.get(name);
    if (!got || got.length !== values.length || !values.every((v) => got.includes(v))) problems.push(`${name} is "${got?.join(' ') ?? '(missing)'}", want "${values.join(' ')}"`);
  };
  exactly('default-src', ["'self'"]);
  exactly('connect-src', ["'self'"]);
  exactly('worker-src', ["'self'", 'blob:']);
  exactly('img-src', ["'self'", 'data:', 'blob:']);
  exactly('form-action', ["'self'"]);
  exactly('frame-ancestors', ["'none'"]);
  exactly('base-uri', ["'none'"]);
  exactly('object-src', ["'none'"]);
  const scripts = d.get('script-src') ?? [];
  if (!scripts.includes("'self'")) problems.push("script-src lacks 'self'");
  // Only 'self', 'wasm-unsafe-eval' (WebAssembly compilation alone, for the spectral kernels) and hash-sources
  // (CSP Level 3 §2.3.1 "hash-source"): no keywords that reopen inline code or eval, no hosts, no schemes, no wildcards.
  if (!scripts.includes("'wasm-unsafe-eval'")) problems.push("script-src lacks 'wasm-unsafe-eval' (the analysis could not compile its kernels)");
  for (const source of scripts) {
    if (source !== "'self'" && source !== "'wasm-unsafe-eval'" && !/^'sha(256|384|512)-[A-Za-z0-9+/]+=*'$/.test(source)) problems.push(`script-src allows ${source}`);
  }
  // Every inline script the page carries is allowed by its hash (else the browser would block the page's own code).
  if (body !== null && (h.get('content-type') ?? '').includes('text/html')) {
    for (const m of body.matchAll(/<script\b([^>]*)>([\s\S]*?)<\/script>/gi)) {
      if (/\bsrc\s*=/i.test(m[1]) || m[2].length === 0 || /application\/(ld\+)?json/i.test(m[1])) continue;
      const hash = `'sha256-${createHash('sha256').update(m[2], 'utf8').digest('base64')}'`;
      if (!scripts.includes(hash)) problems.push(`inline script without its hash in script-src: ${m[2].slice(0, 40)}…`);
    }
  }
  if (h.get('x-content-type-options') !== 'nosniff') problems.push(`X-Content-Type-Options is ${h.get('x-content-type-options')}`);
  if (h.get('referrer-policy') !== 'no-referrer') problems.push(`Referrer-Policy is ${h.get('referrer-policy')}`);
  const permissions = h.get('permissions-policy') ?? '';
  // A restrictive Permissions-Policy (W3C Permissions Policy, structured-header allowlists): at least the camera,
  // microphone and geolocation are given to no origin.
  for (const feature of ['camera', 'microphone', 'geolocation']) {
    if (!new RegExp(`(^|,)\\s*${feature}=\\(\\)`).test(permissions)) problems.push(`Permissions-Policy does not deny ${feature}: "${permissions}"`);
  }
  if (h.get('cross-origin-opener-policy') !== 'same-origin') problems.push(`Cross-Origin-Opener-Policy is ${h.get('cross-origin-opener-policy')}`);
  if (h.get('cross-origin-embedder-policy') !== 'require-corp') problems.push(`Cross-Origin-Embedder-Policy is ${h.get('cross-origin-embedder-policy')}`);
  return problems;
}

// ------------------------------------------------------------------ the fixture site

interface Fixture {
  clients: Record<Exclude<Actor, 'signedOut'>, Client>;
  credentials: Record<Exclude<Actor, 'signedOut'>, { email: string; password: string }>;
  params: Record<string, string>;
}
let fx: Fixture;

beforeAll(async () => {
  const { team, study } = await createTeam();
  const other = await createTeam();
  const lead = await createMember(team.id, 'lead');
  const analyst = await createMember(team.id, 'analyst');
  const reviewer = await createMember(team.id, 'reviewer');
  const operator = await createOperator();
  const otherLead = await createMember(other.team.id, 'lead');
  const credentials = { operator, lead, analyst, reviewer, otherTeam: otherLead };
  const clients = {} as Fixture['clients'];
  for (const [actor, person] of Object.entries(credentials) as [keyof Fixture['clients'], { email: string; password: string }][]) {
    const client = new Client();
    const response = await client.signIn(person.email, person.password);
    if (response.status !== 302) throw new Error(`fixture ${actor} could not sign in (${response.status})`);
    clients[actor] = client;
  }
  const { token: invitationToken } = await createInvitation(team.id, lead.user.id, { email: `${unique('route-table')}@fixture.example`, role: 'reviewer' });
  const resetPerson = await createMember(other.team.id, 'reviewer');
  const resetToken = await createPasswordReset(resetPerson.user.id);
  // Team review rows: a session of the analyst with version 1 and its summary, and a note by the reviewer.
  const sessionId = (await (await clients.analyst.request(`/api/studies/${study.id}/analysis-sessions`, { method: 'POST', json: { subjectCode: 'TM-RT01' } })).json()).analysisSession.id;
  await clients.analyst.request(`/api/analysis-sessions/${sessionId}/recipe-versions`, { method: 'POST', json: { baseVersion: null, recipe: demoRecipe() } });
  await clients.analyst.request(`/api/analysis-sessions/${sessionId}/recipe-versions/1/summary`, { method: 'PUT', json: smallSummary() });
  const noteId = (await (await clients.reviewer.request(`/api/analysis-sessions/${sessionId}/notes`, { method: 'POST', json: { body: 'route table' } })).json()).note.id;
  fx = {
    clients,
    credentials,
    params: {
      teamId: team.id,
      studyId: study.id,
      sessionId,
      number: '1',
      noteId,
      otherTeamId: other.team.id,
      file: 'cohort.json',
      // One {token} per route that takes one; the pattern decides which.
      'invitations:token': invitationToken,
      'reset-password:token': resetToken,
    },
  };
});

function fillPattern(pattern: string): string {
  return pattern.replace(/\[([a-zA-Z]+)\]/g, (_, name: string) => {
    const scoped = fx.params[`${pattern.split('/')[1]}:${name}`];
    const value = scoped ?? fx.params[name];
    if (!value) throw new Error(`no fixture value for [${name}] in ${pattern}`);
    return value;
  });
}

function fillOutcome(outcome: Outcome): Outcome {
  return typeof outcome === 'number' ? outcome : outcome.replace(/\{([a-zA-Z]+)\}/g, (_, name: string) => fx.params[name] ?? `{${name}}`);
}

function describeResponse(response: Response): Outcome {
  const location = response.headers.get('location');
  if (response.status >= 300 && response.status < 400 && location) return `${response.status} ${decodeURIComponent(location)}`;
  return response.status;
}

function matches(actual: Outcome, expected: Outcome): boolean {
  if (typeof expected === 'string' && expected.endsWith('*')) return typeof actual === 'string' && actual.startsWith(expected.slice(0, -1));
  return actual === expected;
}

async function send(actor: Actor, method: string, url: string, endsSession: boolean): Promise<Response> {
  let client: Client;
  if (actor === 'signedOut') client = new Client();
  else if (endsSession) {
    client = new Client();
    const person = fx.credentials[actor];
    await client.signIn(person.email, person.password);
  } else client = fx.clients[actor];
  const api = url.startsWith('/api/');
  if (method === 'GET' || method === 'HEAD') return client.request(url, { method });
  return api ? client.request(url, { method, json: {} }) : client.request(url, { method, form: {} });
}

describe('every route answers each kind of visitor as the table says, with every security header', () => {
  for (const [key, expected] of Object.entries(routeTable)) {
    it(key, async () => {
      const [method, pattern] = key.split(' ');
      const url = fillPattern(pattern);
      const got: Partial<Record<Actor, Outcome>> = {};
      const want: Partial<Record<Actor, Outcome>> = {};
      const headerIssues: string[] = [];
      for (const actor of actors) {
        const response = await send(actor, method, url, expected.endsSession === true);
        const body = method === 'HEAD' ? null : await response.text();
        const outcome = describeResponse(response);
        const wanted = fillOutcome(expected.outcomes[actor]);
        want[actor] = wanted;
        got[actor] = matches(outcome, wanted) ? wanted : outcome;
        for (const problem of await headerProblems(response, body)) headerIssues.push(`${actor}: ${problem}`);
      }
      expect(got, `${key} (${url})`).toEqual(want);
      expect(headerIssues, `security headers of ${key}`).toEqual([]);
    });
  }

  it('the fixture sessions are still signed in after the table ran (no entry signed a shared client out)', async () => {
    for (const actor of Object.keys(fx.clients) as (keyof Fixture['clients'])[]) {
      expect((await fx.clients[actor].request('/api/me')).status, actor).toBe(200);
    }
  });
});

describe('security headers on responses outside the table', () => {
  const cases: { name: string; request: (c: Client) => Promise<Response>; status: number }[] = [
    { name: 'a page that does not exist (404)', request: (c) => c.request('/no-such-page'), status: 404 },
    { name: 'an API path that does not exist (404)', request: (c) => c.request('/api/no-such-thing'), status: 404 },
    {
      name: 'a cross-site form post refused by the middleware (403)',
      request: (c) => c.request('/sign-in', { method: 'POST', form: { email: 'x@fixture.example', password: 'x' }, headers: { 'sec-fetch-site': 'cross-site', origin: 'http://elsewhere.example' } }),
      status: 403,
    },
    { name: 'a body over the form cap (413, from the page)', request: (c) => c.request('/sign-in', { method: 'POST', form: { email: 'x'.repeat(20_000), password: 'x' } }), status: 413 },
    {
      name: 'a body over the server\'s cap (413, from the Node wrapper before Astro)',
      request: (c) => c.request('/sign-in', { method: 'POST', form: { email: 'x'.repeat(1_100_000), password: 'x' } }),
      status: 413,
    },
  ];
  for (const c of cases) {
    it(c.name, async () => {
      const response = await c.request(new Client());
      expect(response.status).toBe(c.status);
      expect(await headerProblems(response, await response.text())).toEqual([]);
    });
  }
});

describe('security headers on static files', () => {
  it('the favicon and a built script carry them too', async () => {
    const client = new Client();
    const home = await (await client.request('/sign-in')).text();
    const script = /<script[^>]+src="(\/_astro\/[^"]+\.js)"/.exec(home)?.[1];
    for (const url of ['/favicon.svg', ...(script ? [script] : [])]) {
      const response = await client.request(url);
      expect(response.status, url).toBe(200);
      expect(await headerProblems(response, null), url).toEqual([]);
    }
  });
});
