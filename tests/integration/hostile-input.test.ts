// Hostile input against every JSON endpoint that writes (found on disk, so a new route is covered the day it lands):
// random JSON of every shape (fast-check), wrong types, deep nesting, duplicate keys, huge strings, NUL and lone
// surrogates, wrong content types. Each answer is a 4xx with a clear JSON message — never a 500 — and nothing is
// written by a refused request.
import { randomUUID } from 'node:crypto';
import fc from 'fast-check';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { Client, pool } from '../helpers/app';
import { createMember, createTeam } from '../helpers/fixtures';
import { apiEndpoints } from '../helpers/routes';
import { demoRecipe } from '../helpers/review';

const WRITES = ['POST', 'PUT', 'PATCH', 'DELETE'];
/** Endpoints that read no body at all (any body is ignored, so nothing in it can be refused). */
const BODYLESS = new Set(['POST /api/session/keep']);
const targets = apiEndpoints().flatMap((e) => e.methods.filter((m) => WRITES.includes(m)).map((method) => ({ method, pattern: e.pattern })));

/** A lead and an analyst of the fixture team: between them every writing route reaches its body parsing. */
let clients: Client[];
let params: Record<string, string>;
let teamId: string;
let studyId: string;

beforeAll(async () => {
  const fixture = await createTeam();
  teamId = fixture.team.id;
  studyId = fixture.study.id;
  clients = [];
  for (const role of ['lead', 'analyst'] as const) {
    const person = await createMember(teamId, role);
    const client = new Client();
    expect((await client.signIn(person.email, person.password)).status).toBe(302);
    clients.push(client);
  }
  // Team review routes: a session of the analyst with recipe version 1 and a note by the lead, so their bodies are read.
  const sessionId = (await (await clients[1].request(`/api/studies/${studyId}/analysis-sessions`, { method: 'POST', json: { subjectCode: 'TM-H01' } })).json()).analysisSession.id;
  expect((await clients[1].request(`/api/analysis-sessions/${sessionId}/recipe-versions`, { method: 'POST', json: { baseVersion: null, recipe: demoRecipe() } })).status).toBe(201);
  const noteId = (await (await clients[0].request(`/api/analysis-sessions/${sessionId}/notes`, { method: 'POST', json: { body: 'hostile fixture' } })).json()).note.id;
  params = { teamId, studyId, sessionId, number: '1', noteId };
});
afterAll(() => pool.end());

/** A concrete path: known parameters from the fixture, any other one a fresh UUID (a row that does not exist). */
const pathOf = (pattern: string) => pattern.replace(/\[(\w+)\]/g, (_, name: string) => params[name] ?? randomUUID());

async function rowsInScope(): Promise<number> {
  const { rows } = await pool.query(
    `SELECT (SELECT count(*) FROM audit_events WHERE team_id = $1) + (SELECT count(*) FROM studies WHERE team_id = $1) + (SELECT count(*) FROM analysis_sessions WHERE study_id = $2) AS n`,
    [teamId, studyId],
  );
  return Number(rows[0].n);
}

type Answer = { status: number; text: string; json: boolean };

async function send(client: Client, method: string, path: string, body: string, type = 'application/json'): Promise<Answer> {
  const response = await client.request(path, { method, body, headers: { 'content-type': type } });
  const text = await response.text();
  return { status: response.status, text, json: (response.headers.get('content-type') ?? '').includes('application/json') };
}

/**
 * Sends `body` as each fixture client. Never a 5xx; a refusal (4xx) carries a message and changes nothing. A body
 * that happens to be valid may be accepted (2xx): random JSON sometimes is.
 */
async function probe(method: string, path: string, body: string, what: string, type?: string): Promise<Answer[]> {
  const answers: Answer[] = [];
  for (const client of clients) {
    const before = await rowsInScope();
    const r = await send(client, method, path, body, type);
    expect(r.status, `${what} → ${r.status}: ${r.text.slice(0, 200)}`).toBeLessThan(500);
    if (r.status >= 400) {
      expectClearRefusal(r, what);
      expect(await rowsInScope(), `${what}: refused (${r.status}) but rows changed`).toBe(before);
    }
    answers.push(r);
  }
  return answers;
}

function expectClearRefusal(r: Answer, what: string) {
  expect(r.status, `${what} → ${r.status}: ${r.text.slice(0, 200)}`).toBeGreaterThanOrEqual(400);
  expect(r.status, `${what} → ${r.status}: ${r.text.slice(0, 200)}`).toBeLessThan(500);
  if (r.json) {
    const message = JSON.parse(r.text).error?.message;
    expect(typeof message === 'string' && message.length > 5, `${what}: no message in ${r.text.slice(0, 200)}`).toBe(true);
  } else {
    expect(r.text.length, `${what}: empty refusal`).toBeGreaterThan(5);
  }
}

// Strings that have broken servers: NUL (PostgreSQL text cannot hold it), lone surrogates, bidi controls, combining
// runs, very long ones.
const nasty = fc.oneof(
  fc.string(),
  fc.constantFrom('\u0000', 'a\u0000b', '\ud800', '\udfff\ud800', '\u202e\u2066', 'e\u0301'.repeat(500), '🌊'.repeat(300), ' ', ''),
  fc.string({ minLength: 5_000, maxLength: 20_000 }),
);
const hostileJson = fc.letrec((tie) => ({
  value: fc.oneof(
    { depthSize: 'small' },
    nasty,
    fc.double(),
    fc.integer(),
    fc.boolean(),
    fc.constant(null),
    fc.array(tie('value'), { maxLength: 5 }),
    fc.dictionary(fc.oneof(nasty, fc.constantFrom('subjectCode', 'fingerprint', 'name', 'description', '__proto__', 'constructor')), tie('value'), { maxKeys: 5 }),
  ),
})).value;

describe('hostile input on every writing JSON endpoint', () => {
  it('finds the endpoints it should', () => {
    expect(targets.map((t) => `${t.method} ${t.pattern}`)).toEqual(expect.arrayContaining(['POST /api/studies/[studyId]/analysis-sessions', 'POST /api/teams/[teamId]/studies']));
  });

  for (const target of targets) {
    it(`${target.method} ${target.pattern}: random JSON never gets a 5xx; each refusal has a message and writes nothing`, async () => {
      await fc.assert(
        fc.asyncProperty(hostileJson, async (value) => {
          await probe(target.method, pathOf(target.pattern), JSON.stringify(value), `${target.method} ${target.pattern} ${JSON.stringify(value).slice(0, 80)}`);
        }),
        { numRuns: 40, seed: 20261202 },
      );
    }, 180_000);

    it(`${target.method} ${target.pattern}: broken JSON, deep nesting, duplicate keys, huge strings and wrong types`, async () => {
      const before = await rowsInScope();
      const path = pathOf(target.pattern);
      const cases: [string, string, string?][] = [
        ['truncated JSON', '{"subjectCode": "TM-'],
        ['not JSON at all', 'subjectCode=TM-S01', 'application/x-www-form-urlencoded'],
        ['plain text', 'hello', 'text/plain'],
        ['deep nesting (10,000 arrays)', '['.repeat(10_000) + ']'.repeat(10_000)],
        ['duplicate keys, the second hostile', '{"subjectCode":"TM-S01","subjectCode":"\\u0000"}'],
        ['NUL in every field', JSON.stringify({ subjectCode: 'a\u0000', name: 'x\u0000y', description: '\u0000', fingerprint: '\u0000' })],
        ['a 300 KiB string', JSON.stringify({ subjectCode: 'x'.repeat(300_000), name: 'x'.repeat(300_000) })],
        ['numbers where strings go', JSON.stringify({ subjectCode: 1e308, name: -0, description: 1, fingerprint: 0 })],
        ['an array body', '[]'],
        ['a bare string', '"TM-S01"'],
        ['null', 'null'],
        ['empty body', ''],
      ];
      for (const [what, body, type] of cases) {
        for (const r of await probe(target.method, path, body, `${target.method} ${target.pattern}: ${what}`, type)) {
          if (!BODYLESS.has(`${target.method} ${target.pattern}`)) expectClearRefusal(r, `${target.method} ${target.pattern}: ${what}`);
        }
      }
      expect(await rowsInScope()).toBe(before);
    }, 60_000);
  }
});
