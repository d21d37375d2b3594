// `npm run bench:load` (issue 17): the production build under 50 concurrent clients.
//
// 1. A private PostgreSQL cluster (`.tidemark/pg-bench-load`, 127.0.0.1 only) with a fresh database `tidemark_load`,
//    migrated as the owner, the app's own role granted.
// 2. Seeded: one invented team ("Tideline Load Bench") with a lead and 49 other members, one study, 40 subjects, each
//    with an analysis session, a saved recipe version and two notes. People, team and study are written with the
//    app's schema (there is no open sign-up); sessions, versions and notes through the running app's own API.
// 3. The production launcher (`npm run serve`: scripts/serve.mjs → server/main.mjs, `dist-production/`, built when
//    stale) on 127.0.0.1 with the app's least-privilege role. The mail relay setting points at a closed loopback port:
//    no route here mails anyone.
// 4. Each of the 50 clients signs in once as its own account through /sign-in, the way people do (the sign-in limits
//    count failures only, so nothing is loosened), and keeps its own cookie.
// 5. autocannon drives the ROUTES below at once for TIDEMARK_LOAD_SECONDS (default 30): the clients are split over
//    the routes, so 50 connections are open for the whole run. Per route: requests/s, p50/p99 latency, errors.
// 6. Every note post the app acknowledged (201) is looked up in the database by its clientKey: it must be there,
//    exactly once. A missing note counts as an error.
// The last two lines are `errors N` and `p99 X ms` (the largest p99 of the routes). Everything is on loopback, the
// whole run is bounded (TIDEMARK_LOAD_DEADLINE_SECONDS, default 900, build included), and it stops the app and
// PostgreSQL and drops its database on the way out, also on Ctrl-C or failure (TIDEMARK_LOAD_KEEP=1 leaves both for
// inspection, e.g. EXPLAIN ANALYZE of the routes' statements).
//
// Extending: a route is one entry of ROUTES (name, its share of the clients, how to build one request). The
// "cohort overview" entry reads the Cohort screen's own route (/api/studies/<id>/cohort).
import { spawn, type ChildProcess } from 'node:child_process';
import { randomUUID } from 'node:crypto';
import fs from 'node:fs';
import path from 'node:path';
import pg from 'pg';
import autocannon from 'autocannon';
import { assertPortFree, ensureNodeModules, findClusterBase, log, root, startCluster } from './lib/bootstrap.mjs';

const SECONDS = Number(process.env.TIDEMARK_LOAD_SECONDS ?? 30);
const CLIENTS = Number(process.env.TIDEMARK_LOAD_CLIENTS ?? 50);
const DEADLINE_SECONDS = Number(process.env.TIDEMARK_LOAD_DEADLINE_SECONDS ?? 900);
/**
 * App processes (`TIDEMARK_WORKERS` of npm run serve), default 1: on this 2-core machine PostgreSQL and the load
 * generator need the second core (two app processes measured worse: p99 181 ms against 140 ms).
 */
const WORKERS = Number(process.env.TIDEMARK_LOAD_WORKERS ?? 1);
const APP_PORT = Number(process.env.TIDEMARK_LOAD_PORT ?? 4419);
const PG_PORT = Number(process.env.TIDEMARK_LOAD_PG_PORT ?? 54419);
const SUBJECTS = 40;
const DB = 'tidemark_load';
const PASSWORD = 'tideline-load-bench-pass';
const origin = `http://127.0.0.1:${APP_PORT}`;

interface Seeded {
  teamId: string;
  studyId: string;
  sessionIds: string[];
  emails: string[];
}

interface ClientContext {
  cookie?: string;
  [key: string]: unknown;
}

/** Acknowledged note posts: the note id the app answered → the clientKey the post carried. */
const acknowledgedNotes = new Map<string, string>();
const runTag = randomUUID().slice(0, 8);

/**
 * The routes under load. `share` is the part of the clients that hammer it; `request` builds one request for a client
 * (context.cookie is that client's own sign-in). `onResponse` sees each answer.
 */
function routes(seed: Seeded) {
  const pick = () => seed.sessionIds[Math.floor(Math.random() * seed.sessionIds.length)];
  return [
    {
      name: 'session read',
      share: 0.4,
      request: () => ({ method: 'GET' as const, path: `/api/analysis-sessions/${pick()}` }),
    },
    {
      name: 'note post',
      share: 0.3,
      request: () => {
        const clientKey = randomUUID();
        const body = `load ${runTag} ${clientKey}: theta at Fz looks early`;
        return {
          method: 'POST' as const,
          path: `/api/analysis-sessions/${pick()}/notes`,
          headers: { 'content-type': 'application/json' },
          body: JSON.stringify({ body, clientKey }),
        };
      },
      onResponse: (status: number, body: string) => {
        if (status !== 201) return;
        const note = JSON.parse(body).note as { id: string; body: string };
        acknowledgedNotes.set(note.id, note.body.split(' ')[2].replace(/:$/, ''));
      },
    },
    {
      // The Cohort screen's first data: every session's current recipe, summary outline, band digests and signatures.
      name: 'cohort overview',
      share: 0.3,
      request: () => ({ method: 'GET' as const, path: `/api/studies/${seed.studyId}/cohort` }),
    },
  ];
}

// ---------------------------------------------------------------- setup

async function seedPeople(ownerUrl: string): Promise<{ teamId: string; studyId: string; emails: string[] }> {
  // The app's own schema and password hashing (src/), on the bench database.
  process.env.DATABASE_URL = ownerUrl;
  const { db, pool } = await import('../src/db/client');
  const { memberships, studies, teams, users } = await import('../src/db/schema');
  const { hashPassword } = await import('../src/lib/crypto/password');
  const { newUserId } = await import('../src/lib/crypto/ids');
  try {
    const passwordHash = await hashPassword(PASSWORD);
    const [team] = await db.insert(teams).values({ name: 'Tideline Load Bench', slug: 'tideline-load-bench' }).returning();
    const [study] = await db.insert(studies).values({ teamId: team.id, name: 'Breakwater rhythm check' }).returning();
    const emails: string[] = [];
    for (let i = 0; i < CLIENTS; i++) {
      const role = i === 0 ? 'lead' : i % 3 === 0 ? 'reviewer' : 'analyst';
      const email = `bench-${String(i).padStart(2, '0')}@tideline-load.example`;
      const [user] = await db.insert(users).values({ id: newUserId(), email, displayName: `Bench member ${i}`, passwordHash }).returning();
      await db.insert(memberships).values({ userId: user.id, teamId: team.id, role });
      emails.push(email);
    }
    return { teamId: team.id, studyId: study.id, emails };
  } finally {
    await pool.end();
  }
}

async function signIn(email: string): Promise<string> {
  const response = await fetch(`${origin}/sign-in`, {
    method: 'POST',
    headers: { 'content-type': 'application/x-www-form-urlencoded', origin },
    body: new URLSearchParams({ email, password: PASSWORD }).toString(),
    redirect: 'manual',
  });
  const cookie = response.headers.getSetCookie().map((c) => c.split(';')[0]).find((c) => c.startsWith('tidemark_session='));
  if (response.status !== 302 || !cookie) throw new Error(`sign-in of ${email} answered ${response.status}`);
  return cookie;
}

async function api(cookie: string, method: string, p: string, body?: unknown): Promise<Record<string, unknown>> {
  const response = await fetch(origin + p, {
    method,
    headers: { cookie, origin, ...(body === undefined ? {} : { 'content-type': 'application/json' }) },
    body: body === undefined ? undefined : JSON.stringify(body),
  });
  if (response.status >= 300) throw new Error(`${method} ${p} answered ${response.status}: ${await response.text()}`);
  return (await response.json()) as Record<string, unknown>;
}

/** Sessions, recipe versions and notes through the app's API, by the analysts. */
async function seedWork(cookies: string[], studyId: string): Promise<string[]> {
  const recipe = JSON.parse(fs.readFileSync(path.join(root, 'public', 'recipes', 'harbour-lights.json'), 'utf8'));
  const sessionIds: string[] = [];
  for (let s = 0; s < SUBJECTS; s++) {
    const cookie = cookies[1 + (s % 2)]; // bench-01 and bench-02 are analysts
    const made = await api(cookie, 'POST', `/api/studies/${studyId}/analysis-sessions`, { subjectCode: `TL-${String(s + 1).padStart(3, '0')}` });
    const id = (made.analysisSession as { id: string }).id;
    await api(cookie, 'POST', `/api/analysis-sessions/${id}/recipe-versions`, { baseVersion: null, recipe });
    for (const n of [1, 2]) await api(cookies[3 + ((s + n) % 10)], 'POST', `/api/analysis-sessions/${id}/notes`, { body: `seed note ${n} on TL-${s + 1}` });
    sessionIds.push(id);
  }
  return sessionIds;
}

function startApp(appUrl: string, smtpPort: number): Promise<ChildProcess> {
  return new Promise((resolve, reject) => {
    const child = spawn(process.execPath, [path.join(root, 'scripts', 'serve.mjs')], {
      cwd: root,
      env: {
        PATH: process.env.PATH,
        HOME: process.env.HOME,
        DATABASE_URL: appUrl,
        TIDEMARK_SMTP_URL: `smtp://127.0.0.1:${smtpPort}`,
        TIDEMARK_ORIGIN: origin,
        TIDEMARK_TRUSTED_PROXIES: 'none',
        TIDEMARK_HOST: '127.0.0.1',
        TIDEMARK_PORT: String(APP_PORT),
        TIDEMARK_WORKERS: String(WORKERS),
        // TIDEMARK_LOAD_PROFILE=<dir>: a CPU profile of the app under load (open it in Chromium's DevTools).
        ...(process.env.TIDEMARK_LOAD_PROFILE ? { TIDEMARK_CPU_PROFILE_DIR: process.env.TIDEMARK_LOAD_PROFILE } : {}),
      },
      stdio: ['ignore', 'pipe', 'pipe'],
    });
    let out = '';
    const onData = (c: Buffer) => {
      out += c.toString();
      if (out.includes('Server listening')) resolve(child);
    };
    child.stdout!.on('data', onData);
    child.stderr!.on('data', (c: Buffer) => {
      out += c.toString();
    });
    child.on('exit', (code) => reject(new Error(`npm run serve exited (${code}) before it listened:\n${out.split('\n').slice(-15).join('\n')}`)));
  });
}

// ---------------------------------------------------------------- CPU time (Linux /proc)

/** Parent pid and CPU seconds (user + system) of every process, from /proc/<pid>/stat (proc(5); 100 ticks/s). */
function processTable(): Map<number, { ppid: number; cpu: number }> {
  const table = new Map<number, { ppid: number; cpu: number }>();
  for (const entry of fs.readdirSync('/proc')) {
    if (!/^\d+$/.test(entry)) continue;
    try {
      const stat = fs.readFileSync(`/proc/${entry}/stat`, 'utf8');
      const fields = stat.slice(stat.lastIndexOf(')') + 2).split(' ');
      table.set(Number(entry), { ppid: Number(fields[1]), cpu: (Number(fields[11]) + Number(fields[12])) / 100 });
    } catch {
      // the process ended while we looked
    }
  }
  return table;
}

/** CPU seconds used so far by `pid` and all its descendants that are still running. */
function treeCpu(pid: number, table = processTable()): number {
  let total = table.get(pid)?.cpu ?? 0;
  for (const [child, info] of table) if (info.ppid === pid) total += treeCpu(child, table);
  return total;
}

function postmasterPid(): number {
  const base = findClusterBase('pg-bench-load');
  try {
    return Number(fs.readFileSync(path.join(base!, 'data', 'postmaster.pid'), 'utf8').split('\n')[0]);
  } catch {
    return 0;
  }
}

// ---------------------------------------------------------------- load

interface RouteResult {
  name: string;
  connections: number;
  requests: number;
  rps: number;
  p50: number;
  p99: number;
  errors: number;
}

function drive(seed: Seeded, cookies: string[]): Promise<RouteResult[]> {
  const table = routes(seed);
  let next = 0;
  const shares = table.map((r) => Math.max(1, Math.round(r.share * CLIENTS)));
  shares[0] += CLIENTS - shares.reduce((a, b) => a + b, 0); // exactly CLIENTS connections in all
  return Promise.all(
    table.map(
      (route, i) =>
        new Promise<RouteResult>((resolve, reject) => {
          const instance = autocannon(
            {
              url: origin,
              connections: shares[i],
              duration: SECONDS,
              timeout: 10,
              // One context per connection: each client gets its own signed-in account's cookie on its first request.
              requests: [
                {
                  setupRequest: (req: autocannon.Request, context: object) => {
                    const client = context as ClientContext;
                    client.cookie ??= cookies[next++ % cookies.length];
                    const r = route.request() as Partial<autocannon.Request>;
                    return { ...req, ...r, headers: { ...(r.headers ?? {}), cookie: client.cookie, origin } };
                  },
                  ...(route.onResponse ? { onResponse: (status: number, body: string) => route.onResponse!(status, body) } : {}),
                },
              ],
            },
            (error: Error | null, result: autocannon.Result) => {
              if (error) return reject(error);
              resolve({
                name: route.name,
                connections: shares[i],
                requests: result.requests.total,
                rps: result.requests.average,
                p50: result.latency.p50,
                p99: result.latency.p99,
                errors: result.errors + result.timeouts + result.non2xx,
              });
            },
          );
          instance.on('error', reject);
        }),
    ),
  );
}

// ---------------------------------------------------------------- main

const children: ChildProcess[] = [];
let cluster: Awaited<ReturnType<typeof startCluster>> | null = null;
let cleaned = false;

async function cleanUp(): Promise<void> {
  if (cleaned) return;
  cleaned = true;
  for (const child of children) {
    if (child.exitCode !== null || child.signalCode !== null) continue;
    await new Promise<void>((resolve) => {
      const timer = setTimeout(() => child.kill('SIGKILL'), 12_000);
      child.once('exit', () => {
        clearTimeout(timer);
        resolve();
      });
      child.kill('SIGTERM');
    });
  }
  if (cluster && process.env.TIDEMARK_LOAD_KEEP === '1') {
    log(`TIDEMARK_LOAD_KEEP=1: PostgreSQL keeps running with the database ${DB} for inspection (${cluster.url(DB).replace(/:[^:@]*@/, ':…@')})`);
  } else if (cluster) {
    const admin = new pg.Client({ connectionString: cluster.url('postgres') });
    await admin.connect().then(() => admin.query(`DROP DATABASE IF EXISTS ${DB} WITH (FORCE)`)).catch(() => {});
    await admin.end().catch(() => {});
    cluster.stop();
  }
}

async function main(): Promise<number> {
  ensureNodeModules();
  await assertPortFree(APP_PORT, 'the load bench app');
  await assertPortFree(PG_PORT, 'the load bench PostgreSQL');
  const smtpPort = APP_PORT + 1; // nothing listens there: no route under load sends mail
  cluster = await startCluster({ name: 'pg-bench-load', port: PG_PORT });
  cluster.ensureDatabase(DB, { fresh: true });
  const ownerUrl = cluster.url(DB);
  const { migrate } = await import('./lib/bootstrap.mjs');
  migrate(ownerUrl);
  const people = await seedPeople(ownerUrl);
  log(`seeded ${people.emails.length} members of one team; starting the production build with npm run serve (builds when stale)…`);
  const app = await startApp(cluster.appUrl(DB), smtpPort);
  children.push(app);
  const cookies: string[] = [];
  for (const email of people.emails) cookies.push(await signIn(email));
  const sessionIds = await seedWork(cookies, people.studyId);
  const seed: Seeded = { ...people, sessionIds };
  log(`${cookies.length} clients signed in, ${sessionIds.length} sessions with a recipe version and 2 notes each; ${CLIENTS} clients for ${SECONDS} s against ${WORKERS} app process(es)…`);

  // CPU time of the app (the launcher and server/main.mjs) and of PostgreSQL during the run: what each request cost,
  // whatever else the machine is doing.
  const pgPid = postmasterPid();
  const ownBefore = process.cpuUsage();
  const cpuBefore = { app: treeCpu(app.pid!), db: pgPid ? treeCpu(pgPid) : NaN, wall: performance.now() };
  const results = await drive(seed, cookies);
  const own = process.cpuUsage(ownBefore);
  const cpu = {
    app: treeCpu(app.pid!) - cpuBefore.app,
    db: pgPid ? treeCpu(pgPid) - cpuBefore.db : NaN,
    // This process: autocannon's 50 clients (and the acknowledgement bookkeeping) share the same 2 cores.
    clients: (own.user + own.system) / 1e6,
    wall: (performance.now() - cpuBefore.wall) / 1000,
  };

  // Every acknowledged note, in the database, exactly once.
  const owner = new pg.Client({ connectionString: ownerUrl });
  await owner.connect();
  const acknowledged = [...acknowledgedNotes.entries()];
  const { rows } = await owner.query('SELECT id, client_key FROM notes WHERE id = ANY($1::uuid[])', [acknowledged.map(([id]) => id)]);
  const storedKeys = new Map(rows.map((r) => [r.id as string, r.client_key as string]));
  const { rows: copies } = await owner.query('SELECT client_key, count(*)::int AS n FROM notes WHERE body LIKE $1 GROUP BY client_key', [`load ${runTag} %`]);
  const { rows: all } = await owner.query('SELECT count(*)::int AS n FROM notes WHERE body LIKE $1', [`load ${runTag} %`]);
  await owner.end();
  const stored = acknowledged.filter(([id, key]) => storedKeys.get(id) === key).length;
  const missing = acknowledged.length - stored;
  const duplicated = copies.filter((r) => r.n > 1).length;

  const pad = (s: string | number, n: number) => String(s).padStart(n);
  process.stdout.write(`\nroute            clients  requests    req/s   p50 ms   p99 ms  errors\n`);
  for (const r of results) {
    process.stdout.write(`${r.name.padEnd(16)} ${pad(r.connections, 7)} ${pad(r.requests, 9)} ${pad(r.rps.toFixed(1), 8)} ${pad(r.p50, 8)} ${pad(r.p99, 8)} ${pad(r.errors, 7)}\n`);
  }
  // Posts still in flight when autocannon stops are never answered; some of them were stored all the same.
  process.stdout.write(`notes acknowledged ${acknowledged.length}, stored once ${stored}, missing ${missing}, stored twice ${duplicated}; stored but unanswered at the end of the run ${all[0].n - stored}\n`);
  const requests = results.reduce((a, r) => a + r.requests, 0);
  process.stdout.write(
    `cpu during the run (${cpu.wall.toFixed(1)} s): app ${cpu.app.toFixed(1)} s (${((cpu.app / requests) * 1000).toFixed(1)} ms a request), ` +
      `PostgreSQL ${cpu.db.toFixed(1)} s (${((cpu.db / requests) * 1000).toFixed(1)} ms a request), ` +
      `load generator ${cpu.clients.toFixed(1)} s (${((cpu.clients / requests) * 1000).toFixed(1)} ms a request); load average ${fs.readFileSync('/proc/loadavg', 'utf8').split(' ').slice(0, 3).join(' ')}\n`,
  );
  const errors = results.reduce((a, r) => a + r.errors, 0) + missing + duplicated;
  const p99 = Math.max(...results.map((r) => r.p99));
  process.stdout.write(`errors ${errors}\np99 ${p99} ms\n`);
  return errors === 0 ? 0 : 1;
}

const deadline = setTimeout(() => {
  process.stderr.write(`tidemark: bench:load ran over ${DEADLINE_SECONDS} s; stopping\n`);
  cleanUp().finally(() => process.exit(1));
}, DEADLINE_SECONDS * 1000);
deadline.unref();
for (const signal of ['SIGINT', 'SIGTERM'] as const) {
  process.on(signal, () => {
    cleanUp().finally(() => process.exit(130));
  });
}
main()
  .then(async (code) => {
    await cleanUp();
    process.exit(code);
  })
  .catch(async (error) => {
    process.stderr.write(`tidemark: bench:load failed: ${error instanceof Error ? error.message : String(error)}\n`);
    await cleanUp();
    process.exit(1);
  });
