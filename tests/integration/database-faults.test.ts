// The app against a PostgreSQL cluster of its own that the test stops and starts (a real server restart, not a
// simulated socket error): API routes answer 503 with Retry-After, pages say the local work is safe, the process
// never exits, and it recovers by itself. Acknowledged writes made around a restart are stored exactly once: new
// analysis sessions, and a stream of note posts whose client resends a refused post with the same clientKey.
import { randomUUID } from 'node:crypto';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import pg from 'pg';
import { Client } from '../helpers/app';
import { runToEnd, startInstance, type Instance } from '../helpers/instance';
import { APP_DB_ROLE, startCluster } from '../../scripts/lib/bootstrap.mjs';

const slot = Number(process.env.TIDEMARK_TEST_SLOT ?? 0);
const PORT = 54369 + slot;
const DB = 'tidemark_faults';
type Cluster = { url: (db: string) => string; appUrl: (db: string) => string; ensureDatabase: (db: string, o?: { fresh?: boolean }) => void; stop: () => void };
let cluster: Cluster;
let app: Instance;
let owner: pg.Pool;
const start = async (): Promise<Cluster> => startCluster({ name: `pg-faults${slot ? `-${slot}` : ''}`, port: PORT, fastAndLoose: true });

beforeAll(async () => {
  cluster = await start();
  cluster.ensureDatabase(DB, { fresh: true });
  const env = { PATH: process.env.PATH, HOME: process.env.HOME };
  const migrated = await runToEnd('scripts/migrate.mjs', { ...env, TIDEMARK_OWNER_DATABASE_URL: cluster.url(DB), TIDEMARK_APP_DB_ROLE: APP_DB_ROLE });
  expect(migrated.code, migrated.output).toBe(0);
  const seeded = await runToEnd('scripts/seed.ts', { ...env, DATABASE_URL: cluster.url(DB) });
  expect(seeded.code, seeded.output).toBe(0);
  app = await startInstance({ DATABASE_URL: cluster.appUrl(DB) });
  owner = new pg.Pool({ connectionString: cluster.url(DB), max: 1 });
  owner.on('error', () => {});
}, 120_000);

afterAll(async () => {
  await owner?.end().catch(() => {});
  await app?.stop();
  cluster?.stop();
});

async function signedInAnalyst(): Promise<{ client: Client; studyId: string }> {
  const client = new Client(app.url);
  expect((await client.signIn('analyst1@saltmarsh.example', 'demo-analyst-pass')).status).toBe(302);
  const me = await (await client.request('/api/me')).json();
  const studies = await (await client.request(`/api/teams/${me.teams[0].id}/studies`)).json();
  return { client, studyId: studies.studies.find((s: { name: string }) => s.name === 'Harbour-bell anticipation').id };
}

describe('PostgreSQL stopped and started under the app', () => {
  it('answers 503 with Retry-After while the database is down, shows a safe-work page, and recovers by itself', async () => {
    const { client } = await signedInAnalyst();
    cluster.stop();
    const api = await client.request('/api/me');
    expect(api.status).toBe(503);
    expect(api.headers.get('retry-after')).toBe('5');
    expect((await api.json()).error.code).toBe('database_unavailable');
    const page = await client.request('/');
    expect(page.status).toBe(503);
    expect(await page.text()).toContain('Your local work is safe');
    expect(page.headers.get('content-security-policy')).toContain("default-src 'self'");
    expect(app.child.exitCode).toBeNull();

    cluster = await start();
    let status = 0;
    for (let i = 0; i < 50 && status !== 200; i++) {
      status = (await client.request('/api/me')).status;
      if (status !== 200) await new Promise((r) => setTimeout(r, 200));
    }
    expect(status).toBe(200);
    expect(app.child.exitCode).toBeNull();
  }, 90_000);

  it('keeps every acknowledged write exactly once across a restart in the middle of a stream of writes', async () => {
    const { client, studyId } = await signedInAnalyst();
    const acknowledged: string[] = [];
    const refused: number[] = [];
    let restarted = false;
    for (let i = 0; i < 40; i++) {
      if (i === 15) {
        cluster.stop();
        cluster = await start();
        restarted = true;
      }
      const code = `FLT-${slot}-${Date.now().toString(36)}-${i}`;
      const r = await client.request(`/api/studies/${studyId}/analysis-sessions`, { method: 'POST', json: { subjectCode: code } });
      if (r.status === 201) acknowledged.push(code);
      else refused.push(r.status);
    }
    expect(restarted).toBe(true);
    expect(refused.every((s) => s === 503)).toBe(true);
    expect(acknowledged.length).toBeGreaterThan(20);
    const { rows } = await owner.query('SELECT subject_code, count(*)::int AS n FROM analysis_sessions WHERE subject_code = ANY($1) GROUP BY subject_code', [acknowledged]);
    expect(rows.length).toBe(acknowledged.length);
    expect(rows.every((r) => r.n === 1)).toBe(true);
    expect(app.child.exitCode).toBeNull();
  }, 90_000);
  it('stores every note post exactly once when PostgreSQL restarts under four streams of posts that resend on refusal', async () => {
    const { client, studyId } = await signedInAnalyst();
    const made = await client.request(`/api/studies/${studyId}/analysis-sessions`, { method: 'POST', json: { subjectCode: `NOTE-${slot}-${Date.now().toString(36)}` } });
    expect(made.status).toBe(201);
    const sessionId = (await made.json()).analysisSession.id;
    const run = randomUUID().slice(0, 8);
    const streams = 4;
    const perStream = 10;
    const acknowledged = new Map<string, string>();
    const answers: number[] = [];
    let phase: 'before' | 'down' | 'after' = 'before';
    let refusedWhileDown = 0;

    // Each stream posts its notes one after another; a refused post (503, or a connection that failed) is sent again
    // with the same clientKey after a short wait, as the workspace's outbound queue does, until it is stored.
    const stream = async (s: number) => {
      for (let i = 0; i < perStream; i++) {
        const body = `restart stream ${run} ${s}/${i}`;
        const key = randomUUID();
        const first = Date.now();
        for (let tries = 1; ; tries++) {
          let status: number;
          try {
            status = (await client.request(`/api/analysis-sessions/${sessionId}/notes`, { method: 'POST', json: { body, clientKey: key } })).status;
          } catch {
            status = -1;
          }
          answers.push(status);
          if (status === 201 || status === 200) {
            acknowledged.set(body, key);
            break;
          }
          expect([503, -1], `post ${s}/${i} answered ${status}`).toContain(status);
          if (phase === 'down') refusedWhileDown++;
          // A bound in time, not in tries: on a loaded machine the restart and the pool's recovery take a while.
          if (Date.now() - first >= 75_000) {
            // What the app said, to tell a dead app from one whose pool did not recover.
            expect.fail(`post ${s}/${i} still refused after ${tries} tries (last answer ${status}, database ${phase}, app exit code ${app.child.exitCode}); the app's last output:\n${app.output().slice(-1500)}`);
          }
          await new Promise((r) => setTimeout(r, 50));
        }
      }
    };
    // The restart: once a quarter of the posts are stored, stop PostgreSQL with posts in flight; start it again after
    // the streams have met the stopped database a few times.
    const restart = (async () => {
      while (acknowledged.size < (streams * perStream) / 4) await new Promise((r) => setTimeout(r, 20));
      cluster.stop();
      phase = 'down';
      while (refusedWhileDown < 8) await new Promise((r) => setTimeout(r, 20));
      cluster = await start();
      phase = 'after';
    })();
    await Promise.all([restart, ...Array.from({ length: streams }, (_, s) => stream(s))]);

    expect(phase).toBe('after');
    expect(answers.filter((a) => a === 503).length).toBeGreaterThanOrEqual(8);
    expect(acknowledged.size).toBe(streams * perStream);
    const { rows } = await owner.query('SELECT body, client_key FROM notes WHERE analysis_session_id = $1 AND body LIKE $2', [sessionId, `restart stream ${run} %`]);
    expect(rows.length).toBe(streams * perStream);
    expect(new Set(rows.map((r) => r.body)).size).toBe(rows.length);
    for (const row of rows) expect(row.client_key).toBe(acknowledged.get(row.body));
    // One audit event per note too: a resent post that was already stored answers 200 and writes nothing more.
    const { rows: audit } = await owner.query("SELECT count(*)::int AS n FROM audit_events WHERE action = 'note.create' AND detail->>'analysisSessionId' = $1", [sessionId]);
    expect(audit[0].n).toBe(streams * perStream);
    expect(app.child.exitCode).toBeNull();
  }, 180_000);
});
