// Batch import of command-line summaries (issue 11 item 10): three files written by the real `analyze --summary`
// on three EDF recordings import together, in one transaction; one malformed file among them imports nothing and
// the answer names the file and the field. Checked in PostgreSQL directly. Fingerprints against node:crypto.
import { execFile } from 'node:child_process';
import { createHash } from 'node:crypto';
import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { promisify } from 'node:util';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { writeEdf } from '../../src/lib/formats';
import { Client, pool } from '../helpers/app';
import { createMember, createTeam } from '../helpers/fixtures';
import { seededNormal } from '../helpers/seeded-random';

const exec = promisify(execFile);
const dir = mkdtempSync(join(tmpdir(), 'tidemark-import-'));
const FS = 100;
const NAMES = ['Fz', 'Cz', 'Pz'];
const recipe = {
  format: 2,
  epochs: { events: ['tug', 'slack'], start: -0.6, end: 1.4 },
  frequencies: { min: 4, max: 40, count: 10, spacing: 'log' },
  cycles: { min: 3, max: 6 },
  baseline: { start: -0.5, end: -0.2, method: 'decibel', scope: 'average' },
  spectrum: { segment: 1, overlap: 0.5, range: [1, 45], source: 'epochs' },
  aperiodic: { range: [2, 40], model: 'power-law' },
};
const SUBJECTS = ['KT-01', 'KT-02', 'KT-03'];
const files: { name: string; bytes: Buffer; fingerprint: string }[] = [];

function edf(seed: number): Uint8Array {
  const normal = seededNormal(seed);
  const n = FS * 50;
  const data = NAMES.map(() => Float32Array.from({ length: n }, () => Math.round(5 * normal() * 100) / 100));
  return writeEdf({
    patientIdentification: 'X X X Imogen_Trevallion',
    start: { year: 2024, month: 5, day: 1, hour: 9, minute: 0, second: 0 },
    recordDurationSeconds: 1,
    signals: NAMES.map((name, c) => ({ label: `EEG ${name}`, physicalDimension: 'uV', physicalMin: -100, physicalMax: 100, samplesPerRecord: FS, samples: data[c] })),
    annotations: Array.from({ length: 23 }, (_, k) => ({ onsetSeconds: 2 + 2 * k, texts: [k % 2 === 0 ? 'tug' : 'slack'] })),
  });
}

let teamId: string;
let studyId: string;
let analyst: Client;
let lead: Client;
let reviewer: Client;
let outsider: Client;

async function as(role: 'lead' | 'analyst' | 'reviewer', team = teamId): Promise<Client> {
  const person = await createMember(team, role);
  const c = new Client();
  expect((await c.signIn(person.email, person.password)).status).toBe(302);
  return c;
}

function batch(intent: string, parts: { name: string; bytes: Buffer | string }[]): FormData {
  const form = new FormData();
  form.append('intent', intent);
  for (const p of parts) form.append('files', new Blob([typeof p.bytes === 'string' ? p.bytes : new Uint8Array(p.bytes)], { type: 'application/json' }), p.name);
  return form;
}

async function post(client: Client, form: FormData | string, type?: string) {
  const response = await client.request(`/api/studies/${studyId}/summary-imports`, { method: 'POST', body: form, ...(type ? { headers: { 'content-type': type } } : {}) });
  return { status: response.status, body: await response.json() };
}

async function counts() {
  const { rows } = await pool.query(
    `SELECT (SELECT count(*) FROM analysis_sessions WHERE study_id = $1)::int AS sessions,
            (SELECT count(*) FROM subjects WHERE study_id = $1)::int AS subjects,
            (SELECT count(*) FROM recipe_versions v JOIN analysis_sessions s ON s.id = v.analysis_session_id WHERE s.study_id = $1)::int AS versions,
            (SELECT count(*) FROM audit_events WHERE team_id = $2)::int AS events`,
    [studyId, teamId],
  );
  return rows[0];
}

beforeAll(async () => {
  const fixture = await createTeam();
  teamId = fixture.team.id;
  studyId = fixture.study.id;
  [analyst, lead, reviewer] = [await as('analyst'), await as('lead'), await as('reviewer')];
  outsider = await as('lead', (await createTeam()).team.id);
  writeFileSync(join(dir, 'recipe.json'), JSON.stringify(recipe));
  await Promise.all(
    SUBJECTS.map(async (code, i) => {
      const rec = join(dir, `trevallion-${i}.edf`);
      const bytes = edf(40 + i);
      writeFileSync(rec, bytes);
      const out = join(dir, `${code}.json`);
      await exec(process.execPath, ['--import', 'tsx', 'src/cli/analyze.ts', rec, '--recipe', join(dir, 'recipe.json'), '--out', join(dir, `result-${i}.json`), '--summary', out, '--subject', code]);
      files[i] = { name: `${code}.json`, bytes: readFileSync(out), fingerprint: createHash('sha256').update(bytes).digest('hex') };
    }),
  );
}, 120_000);
afterAll(() => pool.end());

describe('batch import of command-line summaries', () => {
  it('previews subjects and per-file problems, writing nothing', async () => {
    const before = await counts();
    const { status, body } = await post(analyst, batch('preview', files));
    expect(status).toBe(200);
    expect(body.ready).toBe(true);
    expect(body.files.map((f: { subjectCode: string }) => f.subjectCode)).toEqual(SUBJECTS);
    expect(body.files.map((f: { fingerprint: string }) => f.fingerprint)).toEqual(files.map((f) => f.fingerprint));
    expect(body.files[0]).toMatchObject({ name: 'KT-01.json', conditions: ['tug', 'slack'], channels: 3, normalizedUnit: 'decibel', problems: [] });
    expect(await counts()).toEqual(before);
  });

  it('one malformed file among three imports nothing and names the file and the field', async () => {
    const before = await counts();
    const broken = JSON.parse(files[1].bytes.toString('utf8'));
    broken.summary.aperiodic[0].exponent = 'steep';
    const parts = [files[0], { name: 'KT-02-edited.json', bytes: JSON.stringify(broken) }, files[2]];
    const { status, body } = await post(analyst, batch('import', parts));
    expect(status).toBe(400);
    expect(body.error.message).toMatch(/^Nothing was imported: 1 of 3 files has a problem\. KT-02-edited\.json: summary\.aperiodic\[0\]\.exponent: .*expected number/);
    const report = body.files[1];
    expect(report.name).toBe('KT-02-edited.json');
    expect(report.subjectCode).toBe('KT-02');
    expect(report.problems.map((p: { path: string }) => p.path)).toEqual(['summary.aperiodic[0].exponent']);
    expect(body.files[0].problems).toEqual([]);
    expect(await counts()).toEqual(before);
    // a file that is not JSON, and one from another program, are named too
    const unknownChannel = JSON.parse(files[2].bytes.toString('utf8'));
    unknownChannel.summary.bandValues[3].channel = 'T9';
    const other = await post(analyst, batch('preview', [{ name: 'notes.txt', bytes: 'subject KT-09, looked fine' }, { name: 'x.json', bytes: JSON.stringify({ format: 'something-else' }) }, { name: 'KT-03b.json', bytes: JSON.stringify(unknownChannel) }]));
    expect(other.status).toBe(200);
    expect(other.body.ready).toBe(false);
    expect(other.body.files[0].problems[0]).toEqual({ path: '(file)', message: expect.stringMatching(/^is not valid JSON/) });
    expect(other.body.files[1].problems[0]).toEqual({ path: 'format', message: 'must be "tidemark-cli-summary-1" (a file written by analyze --summary)' });
    expect(other.body.files[2].problems).toEqual([{ path: 'summary.bandValues[3].channel', message: '"T9" is not among the summary\'s channels' }]);
    expect(await counts()).toEqual(before);
  });

  it('three command-line summaries import together, each a draft with version 1 and its summary', async () => {
    const before = await counts();
    const { status, body } = await post(analyst, batch('import', files));
    expect(status, JSON.stringify(body).slice(0, 300)).toBe(201);
    expect(body.imported.map((s: { subjectCode: string }) => s.subjectCode)).toEqual(SUBJECTS);
    const after = await counts();
    expect(after.sessions - before.sessions).toBe(3);
    expect(after.subjects - before.subjects).toBe(3);
    expect(after.versions - before.versions).toBe(3);
    // three events per file (session, version, summary), three new subjects, one for the batch
    expect(after.events - before.events).toBe(3 * 3 + 3 + 1);
    const { rows } = await pool.query(
      `SELECT s.subject_code, s.fingerprint, s.status, s.current_version, u.email, v.recipe, m.summary
         FROM analysis_sessions s JOIN users u ON u.id = s.owner_id
         JOIN recipe_versions v ON v.analysis_session_id = s.id AND v.number = 1
         JOIN summaries m ON m.recipe_version_id = v.id
        WHERE s.study_id = $1 ORDER BY s.subject_code`,
      [studyId],
    );
    expect(rows.map((r) => r.subject_code)).toEqual(SUBJECTS);
    rows.forEach((r, i) => {
      const file = JSON.parse(files[i].bytes.toString('utf8'));
      expect(r.fingerprint).toBe(files[i].fingerprint);
      expect(r.status).toBe('draft');
      expect(r.current_version).toBe(1);
      expect(r.recipe.recording.fingerprint).toBe(files[i].fingerprint);
      expect(r.summary).toEqual(file.summary);
      expect(JSON.stringify(r)).not.toMatch(/trevallion|imogen/i);
    });
  });

  it('refuses a second session for the same subject and recording, importing nothing', async () => {
    const before = await counts();
    const { status, body } = await post(analyst, batch('import', files));
    expect(status).toBe(400);
    expect(body.error.message).toMatch(/^Nothing was imported: 3 of 3 files have problems\. KT-01\.json: subjectCode: Subject KT-01 already has an analysis session for this recording \(draft, Fixture analyst, recipe version 1\)/);
    expect(await counts()).toEqual(before);
    // and a session made by hand for the same subject and recording
    const byHand = await analyst.request(`/api/studies/${studyId}/analysis-sessions`, { method: 'POST', json: { subjectCode: 'KT-02', fingerprint: files[1].fingerprint } });
    expect(byHand.status).toBe(409);
    const refusal = await byHand.json();
    expect(refusal.error.code).toBe('session_exists');
    expect(refusal.error.message).toMatch(/^Subject KT-02 already has an analysis session for this recording \(draft, Fixture analyst, recipe version 1\)\. Open that session and save a new recipe version there instead of starting a second one\. Nothing was created\.$/);
    expect(await counts()).toEqual(before);
    // another recording of the same subject is a new session
    expect((await analyst.request(`/api/studies/${studyId}/analysis-sessions`, { method: 'POST', json: { subjectCode: 'KT-02', fingerprint: 'e'.repeat(64) } })).status).toBe(201);
    // and the same file twice in one batch
    const twice = await post(lead, batch('preview', [files[0], { ...files[0], name: 'again.json' }]));
    expect(twice.body.files[1].problems.map((p: { message: string }) => p.message)).toContain("subject KT-01's recording is also in KT-01.json; import it once");
  });

  it('asks for multipart, a known intent and at least one file; reviewers and other teams are refused', async () => {
    expect((await post(analyst, JSON.stringify({ files: [] }), 'application/json')).status).toBe(415);
    const noIntent = await post(analyst, batch('maybe', files.slice(0, 1)));
    expect(noIntent.status).toBe(400);
    expect(noIntent.body.error.message).toMatch(/^intent: must be "preview" or "import"/);
    const none = await post(lead, batch('import', []));
    expect(none.status).toBe(400);
    expect(none.body.error.message).toMatch(/^files: choose at least one summary file/);
    const broken = await post(analyst, '--x\r\nnot multipart at all', 'multipart/form-data; boundary=x');
    expect(broken.status).toBe(400);
    expect((await post(reviewer, batch('preview', files))).status).toBe(403);
    expect((await post(outsider, batch('preview', files))).status).toBe(404);
  });
});
