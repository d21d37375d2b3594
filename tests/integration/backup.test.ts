// `npm run db:backup` / `npm run db:restore`: a quiet scratch database (migrated, seeded, with a team's and the site's audit chains) is backed
// up, restored into a fresh one, and compared table by table: row counts and an md5 over every row's text equal;
// `npm run audit:verify` passes on the restored database.
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import pg from 'pg';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { drizzle } from 'drizzle-orm/node-postgres';
import { runToEnd } from '../helpers/instance';
import * as schema from '../../src/db/schema';
import { recordAudit } from '../../src/db/queries/audit';

const ownerUrl = process.env.TIDEMARK_OWNER_DATABASE_URL!;
const names = { from: `tidemark_backup_from_${process.pid}`, into: `tidemark_backup_into_${process.pid}` };
const urlOf = (db: string) => {
  const u = new URL(ownerUrl);
  u.pathname = `/${db}`;
  return u.toString();
};
const admin = new pg.Pool({ connectionString: ownerUrl, max: 1 });
admin.on('error', () => {});
const base = { PATH: process.env.PATH, HOME: process.env.HOME };
const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'tidemark-backup-'));

beforeAll(async () => {
  for (const db of Object.values(names)) {
    await admin.query(`DROP DATABASE IF EXISTS ${db} WITH (FORCE)`);
    await admin.query(`CREATE DATABASE ${db}`);
  }
  expect((await runToEnd('scripts/migrate.mjs', { ...base, TIDEMARK_OWNER_DATABASE_URL: urlOf(names.from) })).code).toBe(0);
  expect((await runToEnd('scripts/seed.ts', { ...base, DATABASE_URL: urlOf(names.from) })).code).toBe(0);
  // Audit chains to carry across: a team's and the site's, written by the app's one audit writer.
  const source = new pg.Pool({ connectionString: urlOf(names.from), max: 1 });
  try {
    const scratch = drizzle(source, { schema });
    const { rows } = await source.query('SELECT t.id AS team, u.id AS actor FROM teams t, users u ORDER BY t.created_at, u.created_at LIMIT 1');
    for (let n = 1; n <= 5; n++) {
      await recordAudit(scratch, { actorId: rows[0].actor, action: 'backup.fixture', targetTable: 'teams', targetId: rows[0].team, teamId: rows[0].team, detail: { n } });
      await recordAudit(scratch, { actorId: rows[0].actor, action: 'backup.fixture', targetTable: 'users', targetId: rows[0].actor, detail: { n } });
    }
  } finally {
    await source.end();
  }
}, 60_000);
afterAll(async () => {
  for (const db of Object.values(names)) await admin.query(`DROP DATABASE IF EXISTS ${db} WITH (FORCE)`);
  await admin.end();
  fs.rmSync(dir, { recursive: true, force: true });
});

async function fingerprint(db: string): Promise<Record<string, { rows: number; md5: string | null }>> {
  const pool = new pg.Pool({ connectionString: urlOf(db), max: 1 });
  pool.on('error', () => {});
  try {
    const { rows: tables } = await pool.query("SELECT schemaname, tablename FROM pg_tables WHERE schemaname IN ('public', 'drizzle') ORDER BY 1, 2");
    const out: Record<string, { rows: number; md5: string | null }> = {};
    for (const t of tables) {
      const name = `"${t.schemaname}"."${t.tablename}"`;
      const { rows } = await pool.query(`SELECT count(*)::int AS n, md5(string_agg(x::text, '|' ORDER BY x::text)) AS md5 FROM ${name} x`);
      out[name] = { rows: rows[0].n, md5: rows[0].md5 };
    }
    return out;
  } finally {
    await pool.end();
  }
}

describe('backup and restore', () => {
  it('restores into a fresh database with every table equal, and refuses a non-empty one unless told', async () => {
    const file = path.join(dir, 'scratch.dump');
    const backup = await runToEnd('scripts/db-backup.mjs', { ...base, TIDEMARK_OWNER_DATABASE_URL: urlOf(names.from) }, ['backup', file]);
    expect(backup.code, backup.output).toBe(0);
    expect(fs.statSync(file).mode & 0o777).toBe(0o600);

    const restore = await runToEnd('scripts/db-backup.mjs', { ...base, TIDEMARK_OWNER_DATABASE_URL: urlOf(names.into) }, ['restore', file]);
    expect(restore.code, restore.output).toBe(0);
    const before = await fingerprint(names.from);
    expect(Object.keys(before)).toContain('"public"."users"');
    expect(before['"public"."users"'].rows).toBeGreaterThan(0);
    expect(await fingerprint(names.into)).toEqual(before);
    // The restored audit chains verify with the app's own checker: every event of the source, hashes and links intact.
    const events = before['"public"."audit_events"'].rows;
    expect(events).toBeGreaterThan(0);
    const verified = await runToEnd('scripts/audit-verify.ts', { ...base, DATABASE_URL: urlOf(names.into) });
    expect(verified.output.trim()).toMatch(new RegExp(`^audit:verify: \\d+ chains? holds?, ${events} events checked, 0 written before the chain started \\(not checked\\)$`));
    expect(verified.code).toBe(0);

    const again = await runToEnd('scripts/db-backup.mjs', { ...base, TIDEMARK_OWNER_DATABASE_URL: urlOf(names.into) }, ['restore', file]);
    expect(again.code).toBe(2);
    expect(again.output).toMatch(/the database already has \d+ tables; restore into an empty database, or add --into-non-empty/);
    const replace = await runToEnd('scripts/db-backup.mjs', { ...base, TIDEMARK_OWNER_DATABASE_URL: urlOf(names.into) }, ['restore', file, '--into-non-empty']);
    expect(replace.code, replace.output).toBe(0);
    expect(await fingerprint(names.into)).toEqual(before);
  }, 60_000);

  it('names a missing file', async () => {
    const r = await runToEnd('scripts/db-backup.mjs', { ...base, TIDEMARK_OWNER_DATABASE_URL: urlOf(names.into) }, ['restore', path.join(dir, 'nope.dump')]);
    expect(r.code).toBe(2);
    expect(r.output.trim()).toBe(`tidemark restore: ${path.join(dir, 'nope.dump')} does not exist`);
  });
});
