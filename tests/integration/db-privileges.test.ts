// Least privilege in the database (issue 8, item 10): the app's own role (DATABASE_URL, as the app connects) is no
// superuser, has no DDL rights, may append to the audit and read it but never rewrite or delete it; the cluster's
// password files are readable by their owner only. Every refusal is SQLSTATE 42501, insufficient_privilege
// (PostgreSQL manual, appendix A "Error Codes"; DROP and ALTER by a non-owner report it as "must be owner").
import fs from 'node:fs';
import path from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import pg from 'pg';
import { findClusterBase } from '../../scripts/lib/bootstrap.mjs';

const app = new pg.Pool({ connectionString: process.env.DATABASE_URL, max: 2 });
afterAll(() => app.end());

async function sqlState(statement: string, params: unknown[] = []): Promise<string | null> {
  try {
    await app.query(statement, params);
    return null;
  } catch (error) {
    return (error as { code?: string }).code ?? 'unknown';
  }
}

describe('the app connects as a least-privilege role', () => {
  it('is not a superuser and may not create roles or databases', async () => {
    const { rows } = await app.query(
      'SELECT current_user AS name, rolsuper, rolcreatedb, rolcreaterole, rolbypassrls FROM pg_roles WHERE rolname = current_user',
    );
    expect(rows[0]).toEqual({ name: 'tidemark_app', rolsuper: false, rolcreatedb: false, rolcreaterole: false, rolbypassrls: false });
    expect((await app.query('SHOW is_superuser')).rows[0].is_superuser).toBe('off');
  });

  it('cannot CREATE, ALTER or DROP tables', async () => {
    expect(await sqlState('CREATE TABLE app_may_not_create (id int)')).toBe('42501');
    expect(await sqlState('ALTER TABLE users ADD COLUMN app_may_not_add int')).toBe('42501');
    expect(await sqlState('DROP TABLE mail_messages')).toBe('42501');
    const { rows } = await app.query("SELECT count(*)::int AS n FROM pg_tables WHERE tablename = 'app_may_not_create'");
    expect(rows[0].n).toBe(0);
  });

  it('may INSERT and SELECT audit events but never UPDATE, DELETE or TRUNCATE them', async () => {
    // Inside a transaction that is rolled back: the probe row proves the INSERT right and then vanishes, so the test
    // database's site chain stays whole (every real audit write goes through recordAudit; `audit:verify` checks it).
    const client = await app.connect();
    const refused = async (statement: string, params: unknown[] = []) => {
      await client.query('SAVEPOINT probe');
      try {
        await client.query(statement, params);
        return null;
      } catch (error) {
        return (error as { code?: string }).code ?? 'unknown';
      } finally {
        await client.query('ROLLBACK TO SAVEPOINT probe');
      }
    };
    try {
      await client.query('BEGIN');
      const marker = `privilege-check-${Date.now()}`;
      const inserted = await client.query(
        "INSERT INTO audit_events (actor_id, action, target_table, target_id) VALUES (NULL, 'test.privileges', 'audit_events', $1) RETURNING id",
        [marker],
      );
      const id = inserted.rows[0].id;
      expect((await client.query('SELECT target_id FROM audit_events WHERE id = $1', [id])).rows).toEqual([{ target_id: marker }]);
      expect(await refused("UPDATE audit_events SET action = 'test.rewritten' WHERE id = $1", [id])).toBe('42501');
      expect(await refused('DELETE FROM audit_events WHERE id = $1', [id])).toBe('42501');
      expect(await refused('TRUNCATE audit_events')).toBe('42501');
      expect((await client.query('SELECT action FROM audit_events WHERE id = $1', [id])).rows).toEqual([{ action: 'test.privileges' }]);
      await client.query('ROLLBACK');
      expect((await app.query('SELECT count(*)::int AS n FROM audit_events WHERE target_id = $1', [marker])).rows[0].n).toBe(0);
    } finally {
      await client.query('ROLLBACK').catch(() => {});
      client.release();
    }
  });
});

describe('the cluster keeps its passwords to itself', () => {
  it('stores the owner\'s and the app\'s database passwords in files of mode 0600', () => {
    const slot = Number(process.env.TIDEMARK_TEST_SLOT ?? 0);
    const base = findClusterBase(slot ? `pg-test-${slot}` : 'pg-test');
    expect(base, 'the test cluster folder').not.toBeNull();
    for (const name of ['password', 'app-password']) {
      const mode = fs.statSync(path.join(base!, name)).mode & 0o777;
      expect(mode.toString(8), name).toBe('600');
    }
    // PostgreSQL itself refuses a data folder anyone else may read (0700, or 0750 with group access).
    const dataMode = fs.statSync(path.join(base!, 'data')).mode & 0o077;
    expect(dataMode & 0o007).toBe(0);
  });
});
