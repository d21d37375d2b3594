// Team review (issue 11): the tamper-evident audit chain (`npm run audit:verify` names a hand-edited row), review
// e-mail (each kind reaches the mail fake with the right recipient, a text and an HTML part, and a link that opens
// the right place), per-person mutes, and the study page's manifest and activity list.
import { execFile } from 'node:child_process';
import { promisify } from 'node:util';
import pg from 'pg';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { Client, latestMailId, pool, waitForMail } from '../helpers/app';
import { createMember, createTeam } from '../helpers/fixtures';
import { demoRecipe, signedIn, smallSummary } from '../helpers/review';

const run = promisify(execFile);
const owner = new pg.Pool({ connectionString: process.env.TIDEMARK_OWNER_DATABASE_URL, max: 1 });
afterAll(async () => {
  await pool.end();
  await owner.end();
});

/**
 * `npm run audit:verify` on this file's team chain (`--team`): other test files write site events of their own by raw
 * INSERT (to test privileges and paging), which the whole-database run rightly reports as unchained.
 */
async function auditVerify(...args: string[]): Promise<{ code: number; out: string }> {
  try {
    const { stdout } = await run('npm', ['run', '--silent', 'audit:verify', '--', ...(args.length ? args : ['--team', team.id])], { env: process.env });
    return { code: 0, out: stdout };
  } catch (error) {
    const e = error as { code: number; stdout: string; stderr: string };
    return { code: e.code, out: e.stdout + e.stderr };
  }
}

let team: { id: string; name: string };
let study: { id: string };
let lead: Awaited<ReturnType<typeof createMember>>;
let lead2: Awaited<ReturnType<typeof createMember>>;
let analyst: Awaited<ReturnType<typeof createMember>>;
let reviewer: Awaited<ReturnType<typeof createMember>>;
let c: { lead: Client; lead2: Client; analyst: Client; reviewer: Client };

async function sessionWithVersion(code: string): Promise<string> {
  const id = (await (await c.analyst.request(`/api/studies/${study.id}/analysis-sessions`, { method: 'POST', json: { subjectCode: code, fingerprint: 'b'.repeat(64) } })).json()).analysisSession.id;
  expect((await c.analyst.request(`/api/analysis-sessions/${id}/recipe-versions`, { method: 'POST', json: { baseVersion: null, recipe: demoRecipe() } })).status).toBe(201);
  expect((await c.analyst.request(`/api/analysis-sessions/${id}/recipe-versions/1/summary`, { method: 'PUT', json: smallSummary() })).status).toBe(201);
  return id;
}

/** The message's link (with its #fragment), checked to open a page holding the element the fragment names. */
async function followLink(text: string, as: Client): Promise<{ path: string; fragment: string; html: string }> {
  const match = /https?:\/\/\S+\/teams\/\S+#\S+/.exec(text);
  if (!match) throw new Error(`no study link in: ${text}`);
  const url = new URL(match[0]);
  const response = await as.request(url.pathname);
  expect(response.status).toBe(200);
  const html = await response.text();
  expect(html).toContain(`id="${url.hash.slice(1)}"`);
  return { path: url.pathname, fragment: url.hash, html };
}

async function rawOf(id: number): Promise<string> {
  const { rows } = await pool.query('SELECT raw FROM mail_messages WHERE id = $1', [id]);
  return rows[0].raw;
}

beforeAll(async () => {
  const t = await createTeam();
  team = t.team;
  study = t.study;
  lead = await createMember(team.id, 'lead');
  lead2 = await createMember(team.id, 'lead');
  analyst = await createMember(team.id, 'analyst');
  reviewer = await createMember(team.id, 'reviewer');
  c = {
    lead: await signedIn(lead.email, lead.password),
    lead2: await signedIn(lead2.email, lead2.password),
    analyst: await signedIn(analyst.email, analyst.password),
    reviewer: await signedIn(reviewer.email, reviewer.password),
  };
});

describe('review e-mail', () => {
  it('mails the leads when review is requested, with text and HTML parts and a link to the session', async () => {
    const id = await sessionWithVersion('TM-M01');
    const since = await latestMailId();
    expect((await c.analyst.request(`/api/analysis-sessions/${id}/status`, { method: 'POST', json: { change: 'submit', recipeVersion: 1 } })).status).toBe(200);
    for (const l of [lead, lead2]) {
      const mail = await waitForMail(l.email, since);
      expect(mail.subject).toBe(`Review requested: TM-M01 in ${team.name} study`);
      expect(mail.text).toContain(`${analyst.user.displayName} asks for a review of subject TM-M01, recipe version 1`);
      const link = await followLink(mail.text, l === lead ? c.lead : c.lead2);
      expect(link.fragment).toBe(`#session-${id}`);
      expect(link.path).toBe(`/teams/${team.id}/studies/${study.id}`);
      expect(await rawOf(mail.id)).toMatch(/Content-Type: text\/html/i);
    }
    const { rows } = await pool.query('SELECT count(*)::int AS n FROM mail_messages WHERE id > $1 AND (to_addresses ILIKE $2 OR to_addresses ILIKE $3)', [since, `%${analyst.email}%`, `%${reviewer.email}%`]);
    expect(rows[0].n).toBe(0);
  });

  it('mails the owner when the session is returned (with the reason) and when it is signed off', async () => {
    const id = await sessionWithVersion('TM-M02');
    await c.analyst.request(`/api/analysis-sessions/${id}/status`, { method: 'POST', json: { change: 'submit', recipeVersion: 1 } });
    let since = await latestMailId();
    expect((await c.lead.request(`/api/analysis-sessions/${id}/status`, { method: 'POST', json: { change: 'return', recipeVersion: 1, password: lead.password, reason: 'Widen the theta band to 3–8 Hz.' } })).status).toBe(200);
    const returned = await waitForMail(analyst.email, since);
    expect(returned.subject).toBe(`Returned: TM-M02 in ${team.name} study`);
    expect(returned.text).toContain('Reason: Widen the theta band to 3–8 Hz.');
    const page = await followLink(returned.text, c.analyst);
    expect(page.fragment).toBe(`#session-${id}`);
    expect(page.html).toContain('Returned: Widen the theta band to 3–8 Hz.');

    await c.analyst.request(`/api/analysis-sessions/${id}/recipe-versions`, { method: 'POST', json: { baseVersion: 1, recipe: demoRecipe() } });
    await c.analyst.request(`/api/analysis-sessions/${id}/status`, { method: 'POST', json: { change: 'submit', recipeVersion: 2 } });
    since = await latestMailId();
    expect((await c.lead2.request(`/api/analysis-sessions/${id}/status`, { method: 'POST', json: { change: 'signOff', recipeVersion: 2, password: lead2.password } })).status).toBe(200);
    const signed = await waitForMail(analyst.email, since);
    expect(signed.subject).toBe(`Signed off: TM-M02 in ${team.name} study`);
    expect(signed.text).toContain(`${lead2.user.displayName} signed off subject TM-M02, recipe version 2`);
    await followLink(signed.text, c.analyst);
  });

  it('mails each person mentioned in a note, linking to the note', async () => {
    const id = await sessionWithVersion('TM-M03');
    const since = await latestMailId();
    const posted = await c.reviewer.request(`/api/analysis-sessions/${id}/notes`, {
      method: 'POST',
      json: { body: 'The burst at Fz looks early — can you check the epoch window?', recipeVersion: 1, anchor: { channel: 'Fz', condition: 'lamp', timeS: [0.05, 0.3], frequencyHz: [5, 7] }, mentions: [analyst.user.id, lead.user.id] },
    });
    expect(posted.status).toBe(201);
    const noteId = (await posted.json()).note.id;
    for (const [person, client] of [[analyst, c.analyst], [lead, c.lead]] as const) {
      const mail = await waitForMail(person.email, since);
      expect(mail.subject).toBe(`${reviewer.user.displayName} mentioned you: TM-M03 in ${team.name} study`);
      expect(mail.text).toContain('The burst at Fz looks early');
      const link = await followLink(mail.text, client);
      expect(link.fragment).toBe(`#note-${noteId}`);
      expect(link.html).toContain('channel Fz, condition lamp, 0.05…0.3 s, 5…7 Hz');
    }
  });

  it('sends nothing of a kind the person muted on the notifications page, and still sends the others', async () => {
    const form = await c.analyst.request('/account/notifications');
    expect(form.status).toBe(200);
    // The account page carries the same boxes, posting here.
    const account = await (await c.analyst.request('/account')).text();
    expect(account).toContain('action="/account/notifications"');
    expect(account).toContain('name="note-mention" checked');
    // Untick "my session was returned or signed off"; keep the other two.
    const saved = await c.analyst.post('/account/notifications', { form: 'mail-preferences', 'review-requested': 'on', 'note-mention': 'on' });
    expect(saved.status).toBe(200);
    expect(await saved.text()).toContain('data-testid="mutes-saved"');
    const { rows: mutes } = await pool.query('SELECT kind FROM mail_mutes WHERE user_id = $1', [analyst.user.id]);
    expect(mutes.map((r) => r.kind)).toEqual(['review-outcome']);

    const id = await sessionWithVersion('TM-M04');
    await c.analyst.request(`/api/analysis-sessions/${id}/status`, { method: 'POST', json: { change: 'submit', recipeVersion: 1 } });
    const since = await latestMailId();
    expect((await c.lead.request(`/api/analysis-sessions/${id}/status`, { method: 'POST', json: { change: 'signOff', recipeVersion: 1, password: lead.password } })).status).toBe(200);
    // A mention sent after the sign-off still arrives: once it has, the (muted) sign-off mail would have come before it.
    await c.lead.request(`/api/analysis-sessions/${id}/notes`, { method: 'POST', json: { body: 'Signed; thanks.', mentions: [analyst.user.id] } });
    const mention = await waitForMail(analyst.email, since);
    expect(mention.subject).toContain('mentioned you');
    const { rows } = await pool.query("SELECT subject FROM mail_messages WHERE id > $1 AND to_addresses ILIKE $2", [since, `%${analyst.email}%`]);
    expect(rows.map((r) => r.subject)).toEqual([mention.subject]);

    // Unmuting brings it back.
    await c.analyst.post('/account/notifications', { form: 'mail-preferences', 'review-requested': 'on', 'review-outcome': 'on', 'note-mention': 'on' });
    const { rows: after } = await pool.query('SELECT count(*)::int AS n FROM mail_mutes WHERE user_id = $1', [analyst.user.id]);
    expect(after[0].n).toBe(0);
    // An empty post (no form marker) changes nothing.
    const empty = await c.analyst.post('/account/notifications', {});
    expect(empty.status).toBe(400);
    const { rows: still } = await pool.query('SELECT count(*)::int AS n FROM mail_mutes WHERE user_id = $1', [analyst.user.id]);
    expect(still[0].n).toBe(0);
    const signedOut = await new Client().request('/account/notifications');
    expect(signedOut.status).toBe(302);
  });
});

describe('tamper-evident audit', () => {
  it('chains every event of a team to the one before, even when many are written at once', async () => {
    const id = await sessionWithVersion('TM-A01');
    // A request that restarts the reviewer's idle clock first, so the posts below are checked in their own statement.
    expect((await c.reviewer.request(`/api/analysis-sessions/${id}/notes`)).status).toBe(200);
    const posts = await Promise.all(Array.from({ length: 12 }, (_, i) => c.reviewer.request(`/api/analysis-sessions/${id}/notes`, { method: 'POST', json: { body: `concurrent ${i}` } })));
    expect(posts.map((p) => p.status)).toEqual(Array(12).fill(201));
    expect(posts.map((p) => p.headers.get('x-tidemark-sign-in-check'))).toEqual(Array(12).fill('statement'));
    // The event's hashed text takes values PostgreSQL writes with to_json (db/queries/audit.ts): the same JSON text as
    // JSON.stringify (RFC 8785 §3.2.2.2 takes ECMAScript's string escaping), for quotes, backslashes and control characters.
    const tricky = ['TM-"A\\1', 'tab\there', '\u0001\u001f\u007f', 'é ü € 𝄞', '</script>', '\u2028\u2029'];
    const { rows: escaped } = await pool.query('SELECT to_json(t)::text AS j FROM unnest($1::text[]) WITH ORDINALITY u(t, i) ORDER BY i', [tricky]);
    expect(escaped.map((r) => r.j)).toEqual(tricky.map((t) => JSON.stringify(t)));
    // These posts were checked and stored in one message each (createNoteAsSignedIn): the event's actor, team, study
    // and subject code were read by PostgreSQL in that message, and are the poster's and the session's.
    const noteIds = await Promise.all(posts.map(async (p) => (await p.json()).note.id as string));
    const { rows: events } = await pool.query(
      `SELECT e.target_id, e.actor_id, e.team_id, e.detail, s.study_id FROM audit_events e JOIN analysis_sessions s ON s.id = $2 WHERE e.action = 'note.create' AND e.target_id = ANY($1)`,
      [noteIds, id],
    );
    expect(events.map((e) => e.target_id).sort()).toEqual(noteIds.slice().sort());
    for (const e of events) {
      expect(e).toMatchObject({ team_id: team.id, detail: { analysisSessionId: id, studyId: e.study_id, subjectCode: 'TM-A01', mentions: [] } });
      expect(e.actor_id).toBe((await pool.query('SELECT author_id FROM notes WHERE id = $1', [e.target_id])).rows[0].author_id);
    }
    const { rows } = await pool.query('SELECT id, prev_hash, hash FROM audit_events WHERE team_id = $1 ORDER BY id', [team.id]);
    expect(rows.length).toBeGreaterThan(12);
    for (let i = 1; i < rows.length; i++) expect(rows[i].prev_hash).toBe(rows[i - 1].hash);
    expect(rows[0].prev_hash).toBe('0'.repeat(64));
    const verified = await auditVerify();
    expect(verified.out).toMatch(/^audit:verify: 1 chain holds?, \d+ events checked/);
    expect(verified.code).toBe(0);
    const bad = await auditVerify('--team', 'not-a-team');
    expect(bad.code).toBe(1);
    expect(bad.out).toContain('--team "not-a-team" is neither a team id (UUID) nor "site"');
  });

  it('names the team and the event when one audit row is edited by hand, and the app role cannot edit it at all', async () => {
    const { rows } = await pool.query("SELECT id, detail FROM audit_events WHERE team_id = $1 AND action = 'recipeVersion.save' ORDER BY id LIMIT 1", [team.id]);
    const target = rows[0];
    await expect(pool.query('UPDATE audit_events SET detail = $2 WHERE id = $1', [target.id, { tampered: true }])).rejects.toThrow(/permission denied/);
    // The database owner can; the chain shows it.
    await owner.query(`UPDATE audit_events SET detail = jsonb_set(detail, '{number}', '7') WHERE id = $1`, [target.id]);
    try {
      const broken = await auditVerify();
      expect(broken.code).toBe(2);
      expect(broken.out.trim().split('\n')).toHaveLength(1);
      expect(broken.out).toContain(`team ${team.id} at event ${target.id}:`);
      expect(broken.out).toMatch(/differs from the hash of its contents/);
    } finally {
      await owner.query('UPDATE audit_events SET detail = $2 WHERE id = $1', [target.id, target.detail]);
    }
    expect((await auditVerify()).code).toBe(0);
  });

  it('names the next event when a row is deleted by hand', async () => {
    const { rows } = await pool.query('SELECT * FROM audit_events WHERE team_id = $1 ORDER BY id DESC LIMIT 2', [team.id]);
    const [last, removed] = rows;
    await owner.query('DELETE FROM audit_events WHERE id = $1', [removed.id]);
    try {
      const broken = await auditVerify();
      expect(broken.code).toBe(2);
      expect(broken.out).toContain(`team ${team.id} at event ${last.id}: prev_hash`);
    } finally {
      await owner.query(
        'INSERT INTO audit_events (id, actor_id, action, target_table, target_id, team_id, detail, at, prev_hash, hash) VALUES ($1,$2,$3,$4,$5,$6,$7,$8,$9,$10)',
        [removed.id, removed.actor_id, removed.action, removed.target_table, removed.target_id, removed.team_id, removed.detail, removed.at, removed.prev_hash, removed.hash],
      );
    }
    expect((await auditVerify()).code).toBe(0);
  });

  it('holds on the whole test database, the site chain included: every test writes audit rows through recordAudit', async () => {
    const whole = await run('npm', ['run', '--silent', 'audit:verify'], { env: process.env }).catch((e: { code: number; stdout: string; stderr: string }) => ({ stdout: `exit ${e.code}: ${e.stdout}${e.stderr}` }));
    expect(whole.stdout).toMatch(/^audit:verify: \d+ chains? holds?, \d+ events checked/);
  });
});

describe('the study page', () => {
  it('lists sessions with status, owner, version and the signature manifest, and an activity list from the chain', async () => {
    const id = await sessionWithVersion('TM-P01');
    await c.analyst.request(`/api/analysis-sessions/${id}/status`, { method: 'POST', json: { change: 'submit', recipeVersion: 1 } });
    expect((await c.lead2.request(`/api/analysis-sessions/${id}/status`, { method: 'POST', json: { change: 'signOff', recipeVersion: 1, password: 'wrong' } })).status).toBe(403);
    const signed = await (await c.lead.request(`/api/analysis-sessions/${id}/status`, { method: 'POST', json: { change: 'signOff', recipeVersion: 1, password: lead.password } })).json();
    const html = await (await c.reviewer.request(`/teams/${team.id}/studies/${study.id}`)).text();
    const section = html.slice(html.indexOf(`id="session-${id}"`));
    expect(section).toContain(signed.signature.contentHash);
    expect(section).toContain(lead.user.displayName);
    expect(section).toContain('approved (signed off)');
    expect(html).toContain('data-testid="activity-list"');
    expect(html).toContain('signed off a session TM-P01');
    // Refused signing attempts show to leads only.
    expect(html).not.toContain('was refused at signing');
    expect(await (await c.lead.request(`/teams/${team.id}/studies/${study.id}`)).text()).toContain('was refused at signing');
  });
});
