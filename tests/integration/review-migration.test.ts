// Migration 0002 (team review) on a database that already holds work: every session's subject code becomes a subject
// of its study, the audit chain starts after the events that exist (they are counted, not checked, by
// `npm run audit:verify`), the first chained event of a team links to 64 zeros even when older unchained events
// exist, and recipe versions, summaries and signatures refuse UPDATE. Scratch database of its own, as the owner.
import { execFile } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { promisify } from 'node:util';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import pg from 'pg';
import { applyMigrationFile, createScratchDatabase, type ScratchDatabase } from '../helpers/scratch-db';

const run = promisify(execFile);
let scratch: ScratchDatabase;
let client: pg.Client;

beforeAll(async () => {
  scratch = await createScratchDatabase('review');
  client = new pg.Client({ connectionString: scratch.url });
  await client.connect();
});
afterAll(async () => {
  await client?.end();
  await scratch?.drop();
});

async function verify(): Promise<{ code: number; out: string }> {
  try {
    const { stdout } = await run('npm', ['run', '--silent', 'audit:verify'], { env: { ...process.env, DATABASE_URL: scratch.url } });
    return { code: 0, out: stdout };
  } catch (error) {
    const e = error as { code: number; stdout: string; stderr: string };
    return { code: e.code, out: e.stdout + e.stderr };
  }
}

describe('0002 review', () => {
  it('makes subjects of existing sessions, starts the chain after existing events, and keeps signed rows unchanged', async () => {
    await applyMigrationFile(client, '0000_init.sql');
    await applyMigrationFile(client, '0001_operators_sessions_throttles.sql');
    const team = (await client.query(`INSERT INTO teams (name, slug) VALUES ('Eelgrass Group', 'eelgrass') RETURNING id`)).rows[0].id as string;
    const study = (await client.query(`INSERT INTO studies (team_id, name) VALUES ($1, 'Tide pools') RETURNING id`, [team])).rows[0].id as string;
    await client.query(`INSERT INTO users (id, email, display_name, password_hash) VALUES ('u-a', 'a@eel.example', 'Ana', 'x'), ('u-b', 'b@eel.example', 'Bo', 'x')`);
    await client.query(
      `INSERT INTO analysis_sessions (study_id, owner_id, subject_code) VALUES ($1, 'u-a', 'EG-01'), ($1, 'u-b', 'EG-01'), ($1, 'u-b', 'EG-02')`,
      [study],
    );
    await client.query(`INSERT INTO audit_events (actor_id, action, target_table, target_id, team_id) VALUES ('u-a', 'study.create', 'studies', $1, $2), ('u-a', 'x.y', 'studies', $1, $2)`, [study, team]);
    const lastBefore = Number((await client.query('SELECT max(id) AS id FROM audit_events')).rows[0].id);

    await applyMigrationFile(client, '0002_review.sql');

    const subjects = (await client.query('SELECT code, created_by FROM subjects WHERE study_id = $1 ORDER BY code', [study])).rows;
    expect(subjects).toEqual([{ code: 'EG-01', created_by: 'u-a' }, { code: 'EG-02', created_by: 'u-b' }]);
    const linked = (await client.query('SELECT s.subject_code, j.code FROM analysis_sessions s JOIN subjects j ON j.id = s.subject_id ORDER BY s.owner_id, s.subject_code')).rows;
    expect(linked).toEqual([
      { subject_code: 'EG-01', code: 'EG-01' },
      { subject_code: 'EG-01', code: 'EG-01' },
      { subject_code: 'EG-02', code: 'EG-02' },
    ]);
    await expect(client.query(`INSERT INTO analysis_sessions (study_id, owner_id, subject_code) VALUES ($1, 'u-a', 'EG-03')`, [study])).rejects.toThrow(/subject_id/);
    expect(Number((await client.query('SELECT last_unchained_id FROM audit_chain_start')).rows[0].last_unchained_id)).toBe(lastBefore);

    const before = await verify();
    expect(before).toEqual({ code: 0, out: `audit:verify: 0 chains hold, 0 events checked, ${lastBefore} written before the chain started (not checked)\n` });

    // recordAudit itself, run against this database: the team's first chained event links to 64 zeros.
    const code = `import { db, pool } from '${path.resolve('src/db/client.ts')}'; import { recordAudit } from '${path.resolve('src/db/queries/audit.ts')}';
      await recordAudit(db, { actorId: 'u-b', action: 'note.create', targetTable: 'notes', targetId: 'n1', teamId: '${team}', detail: { studyId: '${study}' } });
      await recordAudit(db, { actorId: 'u-b', action: 'note.edit', targetTable: 'notes', targetId: 'n1', teamId: '${team}', detail: { studyId: '${study}' } });
      await pool.end();`;
    const file = path.join(fs.mkdtempSync(path.join(os.tmpdir(), 'tidemark-chain-')), 'append.mts');
    fs.writeFileSync(file, code);
    await run('npx', ['tsx', file], { env: { ...process.env, DATABASE_URL: scratch.url } });
    fs.rmSync(path.dirname(file), { recursive: true });
    const chained = (await client.query('SELECT id, prev_hash, hash FROM audit_events WHERE id > $1 ORDER BY id', [lastBefore])).rows;
    expect(chained).toHaveLength(2);
    expect(chained[0].prev_hash).toBe('0'.repeat(64));
    expect(chained[1].prev_hash).toBe(chained[0].hash);
    const after = await verify();
    expect(after.code).toBe(0);
    expect(after.out).toContain('1 chain holds, 2 events checked');

    // A hash blanked by hand is a break, not a way back to "before the chain".
    await client.query('UPDATE audit_events SET hash = NULL, prev_hash = NULL WHERE id = $1', [chained[1].id]);
    const blanked = await verify();
    expect(blanked.code).toBe(2);
    expect(blanked.out).toContain(`at event ${chained[1].id}: has no hash`);

    // Written once: even the owner's plain UPDATE is refused by the trigger.
    const session = (await client.query(`SELECT id FROM analysis_sessions LIMIT 1`)).rows[0].id;
    const version = (await client.query(`INSERT INTO recipe_versions (analysis_session_id, number, recipe, recipe_hash, created_by) VALUES ($1, 1, '{}', 'h', 'u-a') RETURNING id`, [session])).rows[0].id;
    await expect(client.query(`UPDATE recipe_versions SET recipe = '{"x":1}' WHERE id = $1`, [version])).rejects.toThrow(/recipe_versions rows are written once/);
    await client.query(`INSERT INTO summaries (recipe_version_id, summary, summary_hash, bytes, uploaded_by) VALUES ($1, '{}', 'h', 2, 'u-a')`, [version]);
    await expect(client.query(`UPDATE summaries SET summary_hash = 'other' WHERE recipe_version_id = $1`, [version])).rejects.toThrow(/written once/);
  });
});
