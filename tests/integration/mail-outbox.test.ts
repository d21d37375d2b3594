// The mail outbox (issue 17): mail is stored in `mail_outbox` in the transaction of the change that causes it and
// sent by the outbox sender of server/main.mjs. Here the app runs on a scratch database of its own with the mail fake
// (scripts/mail-fake.mjs, a real SMTP server) stopped: the note and its mention mail are stored together, the sender
// tries and fails, the app is killed (SIGKILL: a crash) and started again, the fake comes up, and the message arrives
// exactly once. A SIGTERM with mail still waiting stops the sender cleanly and leaves the mail for the next start.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import pg from 'pg';
import { Client } from '../helpers/app';
import { freePort, runToEnd, startInstance, type Instance } from '../helpers/instance';
import { createScratchDatabase, type ScratchDatabase } from '../helpers/scratch-db';
import { retryDelaySeconds } from '../../server/mail-sender.mjs';

let scratch: ScratchDatabase;
let owner: pg.Pool;
let appRoleUrl: string;
let smtpPort: number;
const running: Instance[] = [];
const base = { PATH: process.env.PATH, HOME: process.env.HOME };

beforeAll(async () => {
  scratch = await createScratchDatabase('outbox');
  const migrated = await runToEnd('scripts/migrate.mjs', { ...base, TIDEMARK_OWNER_DATABASE_URL: scratch.url, TIDEMARK_APP_DB_ROLE: 'tidemark_app' });
  expect(migrated.code, migrated.output).toBe(0);
  const seeded = await runToEnd('scripts/seed.ts', { ...base, DATABASE_URL: scratch.url });
  expect(seeded.code, seeded.output).toBe(0);
  const app = new URL(process.env.DATABASE_URL!);
  app.pathname = `/${scratch.name}`;
  appRoleUrl = app.toString();
  owner = new pg.Pool({ connectionString: scratch.url, max: 2 });
  smtpPort = await freePort();
}, 120_000);

afterAll(async () => {
  for (const i of running) await i.stop();
  await owner?.end();
  await scratch?.drop();
});

async function startApp(): Promise<Instance> {
  const app = await startInstance({ DATABASE_URL: appRoleUrl, SMTP_HOST: '127.0.0.1', SMTP_PORT: String(smtpPort), TIDEMARK_SMTP_URL: undefined });
  running.push(app);
  return app;
}

async function startMailFake(): Promise<Instance> {
  const fake = await startInstance({ DATABASE_URL: scratch.url, SMTP_PORT: String(smtpPort) }, { script: 'scripts/mail-fake.mjs', readyLine: 'mail fake listening' });
  running.push(fake);
  return fake;
}

function crash(app: Instance): Promise<void> {
  return new Promise((resolve) => {
    app.child.once('exit', () => resolve());
    app.child.kill('SIGKILL');
  });
}

async function until<T>(what: string, probe: () => Promise<T | null | undefined | false>, timeoutMs = 45_000): Promise<T> {
  const end = Date.now() + timeoutMs;
  for (;;) {
    const value = await probe();
    if (value) return value;
    if (Date.now() > end) throw new Error(`timed out waiting for ${what}`);
    await new Promise((r) => setTimeout(r, 200));
  }
}

/** The analyst posts a note on a new session mentioning the reviewer; returns the note id. */
async function mentionNote(app: Instance, code: string): Promise<{ noteId: string; reviewerEmail: string }> {
  const analyst = new Client(app.url);
  expect((await analyst.signIn('analyst1@saltmarsh.example', 'demo-analyst-pass')).status).toBe(302);
  const me = await (await analyst.request('/api/me')).json();
  const teamId = me.teams[0].id;
  const studies = await (await analyst.request(`/api/teams/${teamId}/studies`)).json();
  const studyId = studies.studies.find((s: { name: string }) => s.name === 'Harbour-bell anticipation').id;
  const members = (await (await analyst.request(`/api/teams/${teamId}/members`)).json()).members as { id: string; role: string }[];
  const reviewer = members.find((m) => m.role === 'reviewer')!;
  const made = await analyst.request(`/api/studies/${studyId}/analysis-sessions`, { method: 'POST', json: { subjectCode: code } });
  expect(made.status).toBe(201);
  const sessionId = (await made.json()).analysisSession.id;
  const posted = await analyst.request(`/api/analysis-sessions/${sessionId}/notes`, { method: 'POST', json: { body: `Please look at ${code}.`, mentions: [reviewer.id] } });
  expect(posted.status).toBe(201);
  const { rows } = await owner.query('SELECT email FROM users WHERE id = $1', [reviewer.id]);
  return { noteId: (await posted.json()).note.id, reviewerEmail: rows[0].email };
}

const outboxRow = async (noteId: string) =>
  (await owner.query("SELECT * FROM mail_outbox WHERE position($1 in coalesce(text_body, '')) > 0", [`#note-${noteId}`])).rows[0];
const delivered = async (noteId: string) => (await owner.query('SELECT id, raw FROM mail_messages WHERE position($1 in text_body) > 0', [`#note-${noteId}`])).rows;

describe('the mail outbox', () => {
  it('waits 1, 2, 4 … seconds between tries, at most 15 minutes', () => {
    expect([1, 2, 3, 4, 5, 10, 11, 40].map(retryDelaySeconds)).toEqual([1, 2, 4, 8, 16, 512, 900, 900]);
  });

  it('keeps a mention mail through a crash while the relay is down, and delivers it exactly once when the relay is back', async () => {
    const first = await startApp();
    const { noteId, reviewerEmail } = await mentionNote(first, 'OBX-1');
    // Stored with the note, before the answer: the outbox row is there as soon as the post is acknowledged.
    const queued = await outboxRow(noteId);
    expect(queued).toBeTruthy();
    expect(queued.to_address).toBe(reviewerEmail);
    const messageId = queued.message_id as string;
    // The sender tried the stopped relay, counted the attempt and set a later try.
    const tried = await until('a failed attempt', async () => {
      const { rows } = await owner.query('SELECT attempts, last_error, sent_at, next_attempt_at FROM mail_outbox WHERE message_id = $1', [messageId]);
      return rows[0].attempts >= 1 ? rows[0] : null;
    });
    expect(tried.sent_at).toBeNull();
    expect(tried.last_error).toMatch(/ECONNREFUSED|connect/i);
    expect(first.output()).toMatch(/mail outbox: message \d+ not sent \(attempt 1:/);

    await crash(first);
    const second = await startApp();
    await startMailFake();
    const rows = await until('the mention mail', async () => {
      const r = await delivered(noteId);
      return r.length ? r : null;
    });
    expect(rows[0].raw).toContain(`Message-ID: ${messageId}`);
    const sent = await until('the outbox row marked sent', async () => {
      const { rows: o } = await owner.query('SELECT sent_at, text_body, html_body, claimed_until FROM mail_outbox WHERE message_id = $1', [messageId]);
      return o[0].sent_at ? o[0] : null;
    });
    // The bodies (which may carry a sign-in link) are cleared once the relay accepted the message.
    expect(sent).toMatchObject({ text_body: null, html_body: null, claimed_until: null });
    // Exactly once: nothing more arrives after a few more of the sender's rounds.
    await new Promise((r) => setTimeout(r, 3000));
    expect((await delivered(noteId)).length).toBe(1);
    expect(second.child.exitCode).toBeNull();
  }, 120_000);

  it('on SIGTERM stops the sender cleanly, leaving queued mail in the outbox for the next start', async () => {
    for (const i of running.splice(0)) await i.stop();
    const app = await startApp();
    const { noteId } = await mentionNote(app, 'OBX-2');
    const queued = await outboxRow(noteId);
    await until('a failed attempt', async () => (await owner.query('SELECT attempts FROM mail_outbox WHERE id = $1', [queued.id])).rows[0].attempts >= 1);
    const exited = new Promise<number | null>((resolve) => app.child.once('exit', (code) => resolve(code)));
    app.child.kill('SIGTERM');
    expect(await exited).toBe(0);
    expect(app.output()).toContain('mail outbox sender stopped; 1 message(s) wait in the outbox for the next start');
    const { rows: left } = await owner.query('SELECT sent_at, claimed_until, text_body FROM mail_outbox WHERE id = $1', [queued.id]);
    expect(left[0]).toMatchObject({ sent_at: null, claimed_until: null });
    expect(left[0].text_body).toContain(`#note-${noteId}`);

    await startMailFake();
    await startApp();
    await until('the mention mail', async () => (await delivered(noteId)).length > 0);
    await new Promise((r) => setTimeout(r, 3000));
    expect((await delivered(noteId)).length).toBe(1);
  }, 120_000);
});
