// The site always keeps an active operator, even when two operators act on each other at the same moment. The
// app's own query module runs against a scratch database of its own (migrated like a real one), so the seeded demo
// operator does not count and the two fixture operators are the only ones.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import pg from 'pg';
import { drizzle } from 'drizzle-orm/node-postgres';
import { migrate } from 'drizzle-orm/node-postgres/migrator';
import { createScratchDatabase, drizzleDir, type ScratchDatabase } from '../helpers/scratch-db';

let scratch: ScratchDatabase;
let owner: pg.Pool;
let site: typeof import('../../src/db/queries/site');
let appPool: pg.Pool;

beforeAll(async () => {
  scratch = await createScratchDatabase('operators');
  owner = new pg.Pool({ connectionString: scratch.url, max: 2 });
  await migrate(drizzle(owner), { migrationsFolder: drizzleDir });
  // The app's db client reads DATABASE_URL when first imported: point it at the scratch database first.
  process.env.DATABASE_URL = scratch.url;
  site = await import('../../src/db/queries/site');
  appPool = (await import('../../src/db/client')).pool;
});
afterAll(async () => {
  await appPool?.end();
  await owner?.end();
  await scratch?.drop();
});

async function twoOperators() {
  await owner.query('DELETE FROM users');
  await owner.query(`INSERT INTO users (id, email, display_name, password_hash, is_operator) VALUES
    ('op-a', 'a@fixture.example', 'Operator A', 'x', true), ('op-b', 'b@fixture.example', 'Operator B', 'x', true)`);
}

/** Holds both operators' rows locked while `start` begins, so the two changes overlap for certain, then lets go. */
async function overlapping<T>(start: () => Promise<T>[]): Promise<T[]> {
  const blocker = await owner.connect();
  try {
    await blocker.query('BEGIN');
    await blocker.query("SELECT id FROM users WHERE id IN ('op-a', 'op-b') FOR UPDATE");
    const pending = start();
    await new Promise((r) => setTimeout(r, 300));
    await blocker.query('COMMIT');
    return await Promise.all(pending);
  } finally {
    blocker.release();
  }
}

describe('two operators acting on each other at once', () => {
  it('mutual revocation: exactly one succeeds and one active operator remains', async () => {
    await twoOperators();
    const results = await overlapping(() => [site.changeAccount('op-a', 'op-b', 'revokeOperator'), site.changeAccount('op-b', 'op-a', 'revokeOperator')]);
    expect(results.filter((r) => r.ok)).toHaveLength(1);
    const refused = results.find((r) => !r.ok);
    expect(refused).toMatchObject({ ok: false, status: 403, problem: 'You are no longer an operator. Nothing was changed.' });
    const { rows } = await owner.query('SELECT count(*)::int AS n FROM users WHERE is_operator AND disabled_at IS NULL');
    expect(rows[0].n).toBe(1);
    const { rows: audit } = await owner.query("SELECT count(*)::int AS n FROM audit_events WHERE action = 'site.revokeOperator'");
    expect(audit[0].n).toBe(1);
  });

  it('mutual suspension: exactly one succeeds and one active operator remains', async () => {
    await twoOperators();
    const results = await overlapping(() => [site.changeAccount('op-a', 'op-b', 'suspend'), site.changeAccount('op-b', 'op-a', 'suspend')]);
    expect(results.filter((r) => r.ok)).toHaveLength(1);
    const { rows } = await owner.query('SELECT count(*)::int AS n FROM users WHERE is_operator AND disabled_at IS NULL');
    expect(rows[0].n).toBe(1);
  });

  it('a suspended operator cannot act, and the last active operator cannot be revoked by one who is not active', async () => {
    await twoOperators();
    await owner.query("UPDATE users SET disabled_at = now() WHERE id = 'op-b'");
    expect(await site.changeAccount('op-b', 'op-a', 'revokeOperator')).toMatchObject({ ok: false, status: 403 });
    expect(await site.changeAccount('op-a', 'op-a', 'revokeOperator')).toMatchObject({ ok: false, status: 400 });
    const { rows } = await owner.query("SELECT is_operator FROM users WHERE id = 'op-a'");
    expect(rows[0].is_operator).toBe(true);
  });
});
