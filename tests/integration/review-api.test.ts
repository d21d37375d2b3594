// Team review API (issue 11) against the built app and real PostgreSQL: every route × role (lead, analyst owner,
// another analyst, reviewer, another team's lead → 404, signed out → 401), optimistic concurrency (409 with the
// current version or note), caps (413/400 naming the field), threads and resolve, status changes only in order,
// signatures bound to a version, self-signing refused, a wrong password at signing refused and audited.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { Client, pool } from '../helpers/app';
import { createMember, createTeam } from '../helpers/fixtures';
import { demoRecipe, signedIn, smallSummary } from '../helpers/review';
import { signedContentHash } from '../../src/lib/crypto/review-hash';
import { SUMMARY_CAPS } from '../../src/lib/schemas/review';

afterAll(() => pool.end());

type Who = 'lead' | 'lead2' | 'owner' | 'analyst2' | 'reviewer' | 'outsider' | 'anonymous';
let clients: Record<Who, Client>;
let people: Record<Exclude<Who, 'anonymous'>, { user: { id: string; displayName: string }; email: string; password: string }>;
let team: { id: string };
let study: { id: string };

async function newSession(subjectCode = `TM-S${Math.floor(Math.random() * 1e6)}`): Promise<string> {
  const r = await clients.owner.request(`/api/studies/${study.id}/analysis-sessions`, { method: 'POST', json: { subjectCode, fingerprint: 'a'.repeat(64) } });
  expect(r.status).toBe(201);
  return (await r.json()).analysisSession.id;
}

async function saveVersion(sessionId: string, baseVersion: number | null, recipe = demoRecipe(), who: Who = 'owner') {
  return clients[who].request(`/api/analysis-sessions/${sessionId}/recipe-versions`, { method: 'POST', json: { baseVersion, recipe } });
}

/** A session with version 1 and its summary, submitted for review. */
async function sessionInReview(): Promise<string> {
  const id = await newSession();
  expect((await saveVersion(id, null)).status).toBe(201);
  expect((await clients.owner.request(`/api/analysis-sessions/${id}/recipe-versions/1/summary`, { method: 'PUT', json: smallSummary() })).status).toBe(201);
  expect((await clients.owner.request(`/api/analysis-sessions/${id}/status`, { method: 'POST', json: { change: 'submit', recipeVersion: 1 } })).status).toBe(200);
  return id;
}

/** GET /api/analysis-sessions/<id> built from drizzle's rows and JSON.stringify, as the route answered before. */
async function objectBuiltSession(id: string) {
  const { getRecipeVersion, listRecipeVersions, listSignatures } = await import('../../src/db/queries/review');
  const { signatureJson, versionJson } = await import('../../src/lib/server/review-api');
  const { rows } = await pool.query('SELECT * FROM analysis_sessions WHERE id = $1', [id]);
  const s = rows[0];
  const current = s.current_version === null ? null : await getRecipeVersion(id, s.current_version);
  const versions = await listRecipeVersions(id);
  const summaryHash = current ? (versions.find((v) => v.number === current.number)?.summaryHash ?? null) : null;
  return JSON.parse(
    JSON.stringify({
      analysisSession: {
        id: s.id, studyId: s.study_id, subjectId: s.subject_id, subjectCode: s.subject_code, fingerprint: s.fingerprint, ownerId: s.owner_id,
        status: s.status, returnReason: s.return_reason, currentVersion: s.current_version, createdAt: s.created_at, updatedAt: s.updated_at,
      },
      current: current ? { ...versionJson(current), summaryHash } : null,
      versions,
      signatures: (await listSignatures(id)).map(signatureJson),
    }),
  );
}

/** Sends the same request as each person and expects the given status from each (refusals first, then the allowed). */
async function expectStatuses(expectations: Partial<Record<Who, number>>, send: (c: Client, who: Who) => Promise<Response>) {
  const order = (Object.keys(expectations) as Who[]).sort((a, b) => Number(expectations[a]! < 300) - Number(expectations[b]! < 300));
  const got: Partial<Record<Who, number>> = {};
  for (const who of order) got[who] = (await send(clients[who], who)).status;
  expect(got).toEqual(expectations);
}

beforeAll(async () => {
  const a = await createTeam();
  const b = await createTeam();
  team = a.team;
  study = a.study;
  people = {
    lead: await createMember(a.team.id, 'lead'),
    lead2: await createMember(a.team.id, 'lead'),
    owner: await createMember(a.team.id, 'analyst'),
    analyst2: await createMember(a.team.id, 'analyst'),
    reviewer: await createMember(a.team.id, 'reviewer'),
    outsider: await createMember(b.team.id, 'lead'),
  };
  clients = { anonymous: new Client() } as Record<Who, Client>;
  for (const [who, p] of Object.entries(people)) clients[who as Who] = await signedIn(p.email, p.password);
});

describe('review routes × roles', () => {
  it('lists and creates sessions and subjects: members read, analysts create, other teams 404, signed out 401', async () => {
    await expectStatuses({ lead: 200, owner: 200, reviewer: 200, outsider: 404, anonymous: 401 }, (c) => c.request(`/api/studies/${study.id}/analysis-sessions`));
    await expectStatuses({ lead: 403, reviewer: 403, outsider: 404, anonymous: 401, owner: 201 }, (c) =>
      c.request(`/api/studies/${study.id}/analysis-sessions`, { method: 'POST', json: { subjectCode: 'TM-S77', fingerprint: null } }),
    );
    await expectStatuses({ lead: 200, owner: 200, reviewer: 200, outsider: 404, anonymous: 401 }, (c) => c.request(`/api/studies/${study.id}/subjects`));
    await expectStatuses({ lead: 403, reviewer: 403, outsider: 404, anonymous: 401, analyst2: 201 }, (c) =>
      c.request(`/api/studies/${study.id}/subjects`, { method: 'POST', json: { code: 'TM-S88' } }),
    );
    // The subject made with the session is reused, not duplicated.
    const again = await clients.owner.request(`/api/studies/${study.id}/subjects`, { method: 'POST', json: { code: 'TM-S77' } });
    expect(again.status).toBe(200);
    const { rows } = await pool.query('SELECT count(*)::int AS n FROM subjects WHERE study_id = $1 AND code = $2', [study.id, 'TM-S77']);
    expect(rows[0].n).toBe(1);
    // A name is not a subject code.
    const named = await clients.owner.request(`/api/studies/${study.id}/subjects`, { method: 'POST', json: { code: 'Jane Doe' } });
    expect(named.status).toBe(400);
    expect((await named.json()).error.issues[0].path).toBe('code');
  });

  it('reads a session and its versions: members 200, other teams 404, signed out 401', async () => {
    const id = await newSession();
    expect((await saveVersion(id, null)).status).toBe(201);
    for (const path of [`/api/analysis-sessions/${id}`, `/api/analysis-sessions/${id}/recipe-versions`, `/api/analysis-sessions/${id}/recipe-versions/1`, `/api/analysis-sessions/${id}/signatures`, `/api/analysis-sessions/${id}/notes`]) {
      await expectStatuses({ lead: 200, owner: 200, reviewer: 200, outsider: 404, anonymous: 401 }, (c) => c.request(path));
    }
    await expectStatuses({ lead: 200, owner: 200, reviewer: 200, outsider: 404, anonymous: 401 }, (c) => c.request(`/api/teams/${team.id}/members`));
    const members = await (await clients.reviewer.request(`/api/teams/${team.id}/members`)).json();
    expect(members.members.map((m: { id: string }) => m.id)).toContain(people.owner.user.id);
    expect(JSON.stringify(members)).not.toContain('@fixture.example');
    const read = await (await clients.reviewer.request(`/api/analysis-sessions/${id}`)).json();
    expect(read.current.number).toBe(1);
    expect(read.current.recipe.epochs).toEqual(demoRecipe().epochs);
    expect((await clients.lead.request(`/api/analysis-sessions/${id}/recipe-versions/2`)).status).toBe(404);
    expect((await clients.lead.request(`/api/analysis-sessions/${id}/recipe-versions/x`)).status).toBe(404);
  });

  it('saves recipe versions for the owner only, and uploads each version\'s summary once', async () => {
    const id = await newSession();
    await expectStatuses({ lead: 403, analyst2: 403, reviewer: 403, outsider: 404, anonymous: 401, owner: 201 }, (c) =>
      c.request(`/api/analysis-sessions/${id}/recipe-versions`, { method: 'POST', json: { baseVersion: null, recipe: demoRecipe() } }),
    );
    await expectStatuses({ lead: 403, analyst2: 403, reviewer: 403, outsider: 404, anonymous: 401, owner: 201 }, (c) =>
      c.request(`/api/analysis-sessions/${id}/recipe-versions/1/summary`, { method: 'PUT', json: smallSummary() }),
    );
    await expectStatuses({ lead: 200, reviewer: 200, outsider: 404, anonymous: 401 }, (c) => c.request(`/api/analysis-sessions/${id}/recipe-versions/1/summary`));
    const { rows: stored } = await pool.query('SELECT s.bytes, s.summary_hash FROM summaries s JOIN recipe_versions v ON v.id = s.recipe_version_id WHERE v.analysis_session_id = $1', [id]);
    expect(stored[0].bytes).toBe(Buffer.byteLength(JSON.stringify(smallSummary())));
    const twice = await clients.owner.request(`/api/analysis-sessions/${id}/recipe-versions/1/summary`, { method: 'PUT', json: smallSummary() });
    expect(twice.status).toBe(409);
    expect((await twice.json()).error.code).toBe('summary_exists');
  });
});

describe('optimistic concurrency', () => {
  it('answers a stale base version with 409 and the current version, and keeps what was saved', async () => {
    const id = await newSession();
    expect((await saveVersion(id, null)).status).toBe(201);
    const changed = { ...demoRecipe(), baseline: { ...(demoRecipe().baseline as object), start: -0.4, end: -0.1, method: 'percent-change' } };
    const second = await saveVersion(id, 1, changed);
    expect(second.status).toBe(201);
    expect((await second.json()).version.number).toBe(2);
    // Another tab still based on version 1.
    const stale = await saveVersion(id, 1, demoRecipe());
    expect(stale.status).toBe(409);
    const body = await stale.json();
    expect(body.error.code).toBe('stale_version');
    expect(body.current.number).toBe(2);
    expect(body.current.recipe.baseline.method).toBe('percent-change');
    const fromNothing = await saveVersion(id, null);
    expect(fromNothing.status).toBe(409);
    const { rows } = await pool.query('SELECT number FROM recipe_versions WHERE analysis_session_id = $1 ORDER BY number', [id]);
    expect(rows.map((r) => r.number)).toEqual([1, 2]);
  });

  it('refuses a bad recipe with the field named, and saves nothing', async () => {
    const id = await newSession();
    const otherRecording = await saveVersion(id, null, { ...demoRecipe(), recording: { fingerprint: 'd'.repeat(64) } });
    expect(otherRecording.status).toBe(400);
    expect((await otherRecording.json()).error.issues[0].path).toBe('recipe.recording.fingerprint');
    const bad = { ...demoRecipe(), frequencies: { min: 4, max: 40, count: 0 } };
    const r = await saveVersion(id, null, bad as Record<string, unknown>);
    expect(r.status).toBe(400);
    expect((await r.json()).error.issues.map((i: { path: string }) => i.path)).toContain('recipe.frequencies.count');
    const { rows } = await pool.query('SELECT count(*)::int AS n FROM recipe_versions WHERE analysis_session_id = $1', [id]);
    expect(rows[0].n).toBe(0);
  });
});

describe('caps and what may reach the server', () => {
  it('answers 413 for a summary body over its cap, and 400 naming the array over its cap', async () => {
    const id = await newSession();
    await saveVersion(id, null);
    const huge = smallSummary();
    huge.trialValues[0].values = Array.from({ length: 200_000 }, (_, i) => i * 1.000001);
    const tooLarge = await clients.owner.request(`/api/analysis-sessions/${id}/recipe-versions/1/summary`, { method: 'PUT', json: huge });
    expect(tooLarge.status).toBe(413);
    const long = smallSummary();
    long.trialValues[0].values = Array.from({ length: SUMMARY_CAPS.trialsPerRow + 1 }, () => 1);
    const r = await clients.owner.request(`/api/analysis-sessions/${id}/recipe-versions/1/summary`, { method: 'PUT', json: long });
    expect(r.status).toBe(400);
    const body = await r.json();
    expect(body.error.issues.map((i: { path: string }) => i.path)).toEqual(['trialValues.0.values']);
    expect(body.error.message).toMatch(/raw samples/);
    const { rows } = await pool.query('SELECT count(*)::int AS n FROM summaries s JOIN recipe_versions v ON v.id = s.recipe_version_id WHERE v.analysis_session_id = $1', [id]);
    expect(rows[0].n).toBe(0);
  });

  it('refuses a summary or a note carrying a patient field or a file name, naming it', async () => {
    const id = await newSession();
    await saveVersion(id, null);
    const r = await clients.owner.request(`/api/analysis-sessions/${id}/recipe-versions/1/summary`, { method: 'PUT', json: { ...smallSummary(), patient: 'X X X DEMO', fileName: 'harbour-lights-01.edf' } });
    expect(r.status).toBe(400);
    expect((await r.json()).error.message).toMatch(/patient/);
    const labelled = smallSummary();
    labelled.channels[0] = 'harbour-lights-01.edf';
    const r2 = await clients.owner.request(`/api/analysis-sessions/${id}/recipe-versions/1/summary`, { method: 'PUT', json: labelled });
    expect(r2.status).toBe(400);
    expect((await r2.json()).error.issues.map((i: { path: string }) => i.path)).toContain('channels.0');
    const note = await clients.reviewer.request(`/api/analysis-sessions/${id}/notes`, { method: 'POST', json: { body: 'ok', fileName: 'a.edf' } });
    expect(note.status).toBe(400);
  });

  it('caps note bodies and mentions, and refuses mentioning someone outside the team', async () => {
    const id = await newSession();
    const long = await clients.reviewer.request(`/api/analysis-sessions/${id}/notes`, { method: 'POST', json: { body: 'x'.repeat(4001) } });
    expect(long.status).toBe(400);
    expect((await long.json()).error.issues[0].path).toBe('body');
    const many = await clients.reviewer.request(`/api/analysis-sessions/${id}/notes`, { method: 'POST', json: { body: 'hi', mentions: Array.from({ length: 21 }, (_, i) => `u${i}`) } });
    expect(many.status).toBe(400);
    expect((await many.json()).error.issues[0].path).toBe('mentions');
    const huge = await clients.reviewer.request(`/api/analysis-sessions/${id}/notes`, { method: 'POST', json: { body: 'y'.repeat(20_000) } });
    expect(huge.status).toBe(413);
    const stranger = await clients.reviewer.request(`/api/analysis-sessions/${id}/notes`, { method: 'POST', json: { body: 'hi', mentions: [people.owner.user.id, people.outsider.user.id] } });
    expect(stranger.status).toBe(400);
    expect((await stranger.json()).error.issues[0].path).toBe('mentions.1');
    const { rows } = await pool.query('SELECT count(*)::int AS n FROM notes WHERE analysis_session_id = $1', [id]);
    expect(rows[0].n).toBe(0);
  });
});

describe('notes: threads, edits, resolve', () => {
  it('posts anchored notes for every role, threads replies, edits with 409 on a stale revision, resolves', async () => {
    const id = await newSession();
    await saveVersion(id, null);
    const anchor = { channel: 'Fz', condition: 'lamp', timeS: [0.1, 0.4], frequencyHz: [4, 8] };
    await expectStatuses({ outsider: 404, anonymous: 401, reviewer: 201, lead: 201, owner: 201 }, (c, who) =>
      c.request(`/api/analysis-sessions/${id}/notes`, { method: 'POST', json: { body: `note by ${who}`, recipeVersion: 1, anchor } }),
    );
    const noVersion = await clients.reviewer.request(`/api/analysis-sessions/${id}/notes`, { method: 'POST', json: { body: 'x', recipeVersion: 5, anchor } });
    expect(noVersion.status).toBe(400);
    expect((await noVersion.json()).error.issues[0].path).toBe('recipeVersion');
    const listed = (await (await clients.owner.request(`/api/analysis-sessions/${id}/notes`)).json()).notes;
    const byReviewer = listed.find((n: { body: string }) => n.body === 'note by reviewer');
    expect(byReviewer).toMatchObject({ recipeVersion: 1, anchor, revision: 1, parentId: null });

    await expectStatuses({ outsider: 404, anonymous: 401, owner: 201, lead: 201, reviewer: 201 }, (c, who) =>
      c.request(`/api/notes/${byReviewer.id}/replies`, { method: 'POST', json: { body: `reply by ${who}` } }),
    );
    const thread = (await (await clients.owner.request(`/api/analysis-sessions/${id}/notes`)).json()).notes.filter((n: { parentId: string }) => n.parentId === byReviewer.id);
    expect(thread.map((n: { body: string }) => n.body).sort()).toEqual(['reply by lead', 'reply by owner', 'reply by reviewer']);
    // A reply to a reply joins the same thread.
    const deeper = await clients.reviewer.request(`/api/notes/${thread[0].id}/replies`, { method: 'POST', json: { body: 'and me' } });
    expect((await deeper.json()).note.parentId).toBe(byReviewer.id);

    await expectStatuses({ outsider: 404, anonymous: 401, owner: 403, lead: 403, reviewer: 200 }, (c) =>
      c.request(`/api/notes/${byReviewer.id}`, { method: 'PATCH', json: { revision: 1, body: 'edited once' } }),
    );
    const stale = await clients.reviewer.request(`/api/notes/${byReviewer.id}`, { method: 'PATCH', json: { revision: 1, body: 'edited from an old tab' } });
    expect(stale.status).toBe(409);
    const staleBody = await stale.json();
    expect(staleBody.error.code).toBe('stale_note');
    expect(staleBody.current).toMatchObject({ body: 'edited once', revision: 2 });

    await expectStatuses({ lead: 200, owner: 200, reviewer: 200, outsider: 404, anonymous: 401 }, (c) => c.request(`/api/notes/${byReviewer.id}`));
    await expectStatuses({ outsider: 404, anonymous: 401, owner: 200 }, (c) => c.request(`/api/notes/${byReviewer.id}/resolution`, { method: 'PUT', json: { resolved: true } }));
    const resolved = (await (await clients.lead.request(`/api/notes/${byReviewer.id}`)).json()).note;
    expect(resolved.resolvedBy).toBe(people.owner.user.id);
    expect(resolved.resolvedAt).not.toBeNull();
    const reply = await clients.lead.request(`/api/notes/${thread[0].id}/resolution`, { method: 'PUT', json: { resolved: true } });
    expect(reply.status).toBe(400);
    await expectStatuses({ lead: 200, reviewer: 200 }, (c) => c.request(`/api/notes/${byReviewer.id}/resolution`, { method: 'PUT', json: { resolved: true } }));
    const reopened = await clients.reviewer.request(`/api/notes/${byReviewer.id}/resolution`, { method: 'PUT', json: { resolved: false } });
    expect((await reopened.json()).note.resolvedAt).toBeNull();
    const { rows } = await pool.query("SELECT action FROM audit_events WHERE target_id = $1 ORDER BY id", [byReviewer.id]);
    expect(rows.map((r) => r.action)).toEqual(['note.create', 'note.edit', 'note.resolve', 'note.resolve', 'note.resolve', 'note.reopen']);
  });
});

describe('notes sent again', () => {
  it('stores one note for a post sent twice with the same clientKey (also at once), and refuses the key for another post', async () => {
    const id = await newSession();
    const clientKey = crypto.randomUUID();
    const post = () => clients.reviewer.request(`/api/analysis-sessions/${id}/notes`, { method: 'POST', json: { body: 'Check the 20 Hz drop at C3.', clientKey } });
    const first = await post();
    expect(first.status).toBe(201);
    const again = await post();
    expect(again.status).toBe(200);
    expect((await again.json()).note.id).toBe((await first.json()).note.id);
    const other = await clients.reviewer.request(`/api/analysis-sessions/${id}/notes`, { method: 'POST', json: { body: 'Something else.', clientKey } });
    expect(other.status).toBe(409);
    expect((await other.json()).error.code).toBe('client_key_reused');
    const key2 = crypto.randomUUID();
    const together = await Promise.all([0, 1, 2].map(() => clients.lead.request(`/api/analysis-sessions/${id}/notes`, { method: 'POST', json: { body: 'Once.', clientKey: key2 } })));
    expect(together.map((r) => r.status).sort()).toEqual([200, 200, 201]);
    const elsewhere = await newSession();
    const reused = await clients.reviewer.request(`/api/analysis-sessions/${elsewhere}/notes`, { method: 'POST', json: { body: 'x', clientKey } });
    expect(reused.status).toBe(409);
    expect((await reused.json()).error.code).toBe('client_key_reused');
    const { rows } = await pool.query('SELECT body FROM notes WHERE analysis_session_id = $1 ORDER BY created_at', [id]);
    expect(rows.map((r) => r.body)).toEqual(['Check the 20 Hz drop at C3.', 'Once.']);
    const { rows: audit } = await pool.query("SELECT count(*)::int AS n FROM audit_events WHERE action = 'note.create' AND detail->>'analysisSessionId' = $1", [id]);
    expect(audit[0].n).toBe(2);
    const bad = await clients.reviewer.request(`/api/analysis-sessions/${id}/notes`, { method: 'POST', json: { body: 'x', clientKey: 'not-a-uuid' } });
    expect(bad.status).toBe(400);
    expect((await bad.json()).error.issues[0].path).toBe('clientKey');
  });
});

describe('status changes and signatures', () => {
  it('moves only in order: submit needs draft or returned; return and sign-off need in review', async () => {
    const id = await newSession();
    const noVersion = await clients.owner.request(`/api/analysis-sessions/${id}/status`, { method: 'POST', json: { change: 'submit', recipeVersion: 1 } });
    expect(noVersion.status).toBe(409);
    await saveVersion(id, null);
    const early = await clients.lead.request(`/api/analysis-sessions/${id}/status`, { method: 'POST', json: { change: 'signOff', recipeVersion: 1, password: people.lead.password } });
    expect(early.status).toBe(409);
    expect((await early.json()).error.code).toBe('out_of_order');
    await expectStatuses({ outsider: 404, anonymous: 401, reviewer: 403, lead: 403, analyst2: 403, owner: 200 }, (c) =>
      c.request(`/api/analysis-sessions/${id}/status`, { method: 'POST', json: { change: 'submit', recipeVersion: 1 } }),
    );
    const twice = await clients.owner.request(`/api/analysis-sessions/${id}/status`, { method: 'POST', json: { change: 'submit', recipeVersion: 1 } });
    expect(twice.status).toBe(409);
    // While in review the recipe cannot change.
    const locked = await saveVersion(id, 1);
    expect(locked.status).toBe(409);
    expect((await locked.json()).error.code).toBe('in_review');
    await expectStatuses({ outsider: 404, anonymous: 401, reviewer: 403, owner: 403, analyst2: 403, lead: 200 }, (c, who) =>
      c.request(`/api/analysis-sessions/${id}/status`, { method: 'POST', json: { change: 'return', recipeVersion: 1, password: people[who as 'lead']?.password ?? 'x', reason: 'Baseline overlaps the cue; use -0.5…-0.2 s.' } }),
    );
    const read = (await (await clients.owner.request(`/api/analysis-sessions/${id}`)).json()).analysisSession;
    expect(read).toMatchObject({ status: 'returned', returnReason: 'Baseline overlaps the cue; use -0.5…-0.2 s.' });
    const again = await clients.lead2.request(`/api/analysis-sessions/${id}/status`, { method: 'POST', json: { change: 'return', recipeVersion: 1, password: people.lead2.password, reason: 'x' } });
    expect(again.status).toBe(409);
    // Fixed and resubmitted; then signed off by the other lead.
    expect((await saveVersion(id, 1)).status).toBe(201);
    expect((await clients.owner.request(`/api/analysis-sessions/${id}/status`, { method: 'POST', json: { change: 'submit', recipeVersion: 2 } })).status).toBe(200);
    const noReason = await clients.lead.request(`/api/analysis-sessions/${id}/status`, { method: 'POST', json: { change: 'return', recipeVersion: 2, password: people.lead.password, reason: '  ' } });
    expect(noReason.status).toBe(400);
    expect((await noReason.json()).error.issues[0].path).toBe('reason');
    const staleSign = await clients.lead2.request(`/api/analysis-sessions/${id}/status`, { method: 'POST', json: { change: 'signOff', recipeVersion: 1, password: people.lead2.password } });
    expect(staleSign.status).toBe(409);
    expect((await staleSign.json()).currentVersion).toBe(2);
    const signed = await clients.lead2.request(`/api/analysis-sessions/${id}/status`, { method: 'POST', json: { change: 'signOff', recipeVersion: 2, password: people.lead2.password } });
    expect(signed.status).toBe(200);
    expect((await signed.json()).status).toBe('signed off');
    const { rows } = await pool.query('SELECT action FROM audit_events WHERE target_id = $1 AND action LIKE $2 ORDER BY id', [id, 'analysisSession.%']);
    expect(rows.map((r) => r.action)).toEqual(['analysisSession.create', 'analysisSession.submit', 'analysisSession.return', 'analysisSession.submit', 'analysisSession.signOff']);
  });

  it('records who, printed name, when, meaning and a SHA-256 bound to the version; a later change leaves it on the old version', async () => {
    const id = await sessionInReview();
    await expectStatuses({ outsider: 404, anonymous: 401, reviewer: 403, owner: 403, lead: 201 }, (c, who) =>
      c.request(`/api/analysis-sessions/${id}/signatures`, { method: 'POST', json: { meaning: 'reviewed', recipeVersion: 1, password: people[who as 'lead']?.password ?? 'x' } }),
    );
    const signOff = await clients.lead2.request(`/api/analysis-sessions/${id}/status`, { method: 'POST', json: { change: 'signOff', recipeVersion: 1, password: people.lead2.password } });
    const { signature } = await signOff.json();
    expect(signature).toMatchObject({ meaning: 'approved', recipeVersion: 1, printedName: people.lead2.user.displayName, signerId: people.lead2.user.id });
    // The hash is recomputed here from what the API serves (independently of the stored rows).
    const version = (await (await clients.reviewer.request(`/api/analysis-sessions/${id}/recipe-versions/1`)).json()).version;
    const summary = (await (await clients.reviewer.request(`/api/analysis-sessions/${id}/recipe-versions/1/summary`)).json()).summary;
    expect(signature.contentHash).toBe(signedContentHash({ analysisSessionId: id, fingerprint: 'a'.repeat(64), recipeVersion: 1, recipe: version.recipe, summary }));
    const { rows: clock } = await pool.query('SELECT abs(extract(epoch from now() - $1::timestamptz)) AS s', [signature.signedAt]);
    expect(Number(clock[0].s)).toBeLessThan(60);

    // A later change makes version 2, unsigned; the session is a draft again and both signatures stay on version 1.
    const next = await saveVersion(id, 1);
    expect(next.status).toBe(201);
    expect((await next.json()).status).toBe('draft');
    const manifest = (await (await clients.reviewer.request(`/api/analysis-sessions/${id}/signatures`)).json());
    expect(manifest.contentHash.canonicalization).toMatch(/RFC 8785/);
    expect(manifest.signatures.map((s: { meaning: string; recipeVersion: number }) => `${s.meaning}@${s.recipeVersion}`)).toEqual(['reviewed@1', 'approved@1']);
    // The session read is PostgreSQL's own JSON text (db/queries/json-answers.ts): the same answer, key for key and
    // time for time, as building it from the rows node-postgres parses (what the route did before).
    const read = await (await clients.reviewer.request(`/api/analysis-sessions/${id}`)).json();
    expect(read).toEqual(await objectBuiltSession(id));
    expect(read.versions).toHaveLength(2);
    expect(read.signatures).toHaveLength(2);
    expect(read.current).toMatchObject({ number: 2, summaryHash: null });
    // Stored signatures cannot be rewritten, not even by the app's database role.
    await expect(pool.query("UPDATE signatures SET printed_name = 'Someone else' WHERE analysis_session_id = $1", [id])).rejects.toThrow(/written once/);
  });

  it('refuses signing one\'s own session', async () => {
    const { team: t, study: s } = await createTeam();
    const analyst = await createMember(t.id, 'analyst');
    const c = await signedIn(analyst.email, analyst.password);
    const created = await (await c.request(`/api/studies/${s.id}/analysis-sessions`, { method: 'POST', json: { subjectCode: 'TM-S01' } })).json();
    const id = created.analysisSession.id;
    await c.request(`/api/analysis-sessions/${id}/recipe-versions`, { method: 'POST', json: { baseVersion: null, recipe: demoRecipe() } });
    await c.request(`/api/analysis-sessions/${id}/status`, { method: 'POST', json: { change: 'submit', recipeVersion: 1 } });
    // The analyst is promoted to lead: still may not sign what they made.
    await pool.query("UPDATE memberships SET role = 'lead' WHERE user_id = $1 AND team_id = $2", [analyst.user.id, t.id]);
    const lead = await signedIn(analyst.email, analyst.password);
    for (const json of [{ change: 'signOff', recipeVersion: 1, password: analyst.password }, { change: 'return', recipeVersion: 1, password: analyst.password, reason: 'x' }]) {
      const r = await lead.request(`/api/analysis-sessions/${id}/status`, { method: 'POST', json });
      expect(r.status).toBe(403);
      expect((await r.json()).error.code).toBe('own_session');
    }
    const reviewed = await lead.request(`/api/analysis-sessions/${id}/signatures`, { method: 'POST', json: { meaning: 'reviewed', recipeVersion: 1, password: analyst.password } });
    expect(reviewed.status).toBe(403);
    const { rows } = await pool.query('SELECT count(*)::int AS n FROM signatures WHERE analysis_session_id = $1', [id]);
    expect(rows[0].n).toBe(0);
  });

  it('refuses a wrong password at signing, audits it, and locks signing after five', async () => {
    const { team: t, study: s } = await createTeam();
    const analyst = await createMember(t.id, 'analyst');
    const leadP = await createMember(t.id, 'lead');
    const a = await signedIn(analyst.email, analyst.password);
    const l = await signedIn(leadP.email, leadP.password);
    const id = (await (await a.request(`/api/studies/${s.id}/analysis-sessions`, { method: 'POST', json: { subjectCode: 'TM-S02' } })).json()).analysisSession.id;
    await a.request(`/api/analysis-sessions/${id}/recipe-versions`, { method: 'POST', json: { baseVersion: null, recipe: demoRecipe() } });
    await a.request(`/api/analysis-sessions/${id}/status`, { method: 'POST', json: { change: 'submit', recipeVersion: 1 } });
    const wrong = await l.request(`/api/analysis-sessions/${id}/status`, { method: 'POST', json: { change: 'signOff', recipeVersion: 1, password: 'not-my-password' } });
    expect(wrong.status).toBe(403);
    expect((await wrong.json()).error.code).toBe('wrong_password');
    const { rows: audit } = await pool.query("SELECT actor_id, detail FROM audit_events WHERE action = 'signature.refused' AND target_id = $1", [id]);
    expect(audit).toHaveLength(1);
    expect(audit[0]).toMatchObject({ actor_id: leadP.user.id, detail: { meaning: 'approved', why: 'wrong password' } });
    const { rows: state } = await pool.query('SELECT status FROM analysis_sessions WHERE id = $1', [id]);
    expect(state[0].status).toBe('in review');
    // limits.signingAccount: 5 per 15 minutes; the fifth locks, and then even the right password is refused.
    const statuses: number[] = [];
    for (let i = 0; i < 4; i++) statuses.push((await l.request(`/api/analysis-sessions/${id}/status`, { method: 'POST', json: { change: 'signOff', recipeVersion: 1, password: `wrong-${i}` } })).status);
    expect(statuses).toEqual([403, 403, 403, 429]);
    const right = await l.request(`/api/analysis-sessions/${id}/status`, { method: 'POST', json: { change: 'signOff', recipeVersion: 1, password: leadP.password } });
    expect(right.status).toBe(429);
    expect((await right.json()).error.message).toMatch(/Wait 15 minutes/);
    const { rows: refused } = await pool.query("SELECT detail->>'why' AS why FROM audit_events WHERE action = 'signature.refused' AND target_id = $1 ORDER BY id", [id]);
    expect(refused.map((r) => r.why)).toEqual(['wrong password', 'wrong password', 'wrong password', 'wrong password', 'wrong password', 'locked']);
    const { rows: sigs } = await pool.query('SELECT count(*)::int AS n FROM signatures WHERE analysis_session_id = $1', [id]);
    expect(sigs[0].n).toBe(0);
  });
});
