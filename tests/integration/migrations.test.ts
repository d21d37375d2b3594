// Migrations move today's data over (issue 8, item 7): a database at 0000 with a team "admin" is migrated by 0001 and
// checked row by row. Runs on a scratch database of its own, created and dropped as the owner.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import pg from 'pg';
import { applyMigrationFile, createScratchDatabase, type ScratchDatabase } from '../helpers/scratch-db';

let scratch: ScratchDatabase;
let client: pg.Client;

beforeAll(async () => {
  scratch = await createScratchDatabase('migrate');
  client = new pg.Client({ connectionString: scratch.url });
  await client.connect();
});
afterAll(async () => {
  await client?.end();
  await scratch?.drop();
});

describe('0001 moves team admins to site operators', () => {
  it('makes the admin an operator and a reviewer, expires the admin invitation, ends sessions, and audits the move', async () => {
    await applyMigrationFile(client, '0000_init.sql');
    const team = (await client.query(`INSERT INTO teams (name, slug) VALUES ('Kelp Bed Unit', 'kelp-bed') RETURNING id`)).rows[0].id as string;
    await client.query(`INSERT INTO users (id, email, display_name, password_hash) VALUES
      ('u-admin', 'admin@kelp.example', 'Old Admin', 'x'), ('u-lead', 'lead@kelp.example', 'Old Lead', 'x')`);
    await client.query(`INSERT INTO memberships (user_id, team_id, role) VALUES ('u-admin', $1, 'admin'), ('u-lead', $1, 'lead')`, [team]);
    await client.query(
      `INSERT INTO invitations (team_id, email, role, token_hash, expires_at) VALUES
         ($1, 'next-admin@kelp.example', 'admin', 'hash-admin', now() + interval '5 days'),
         ($1, 'analyst@kelp.example', 'analyst', 'hash-analyst', now() + interval '5 days')`,
      [team],
    );
    await client.query(`INSERT INTO sessions (id, user_id, expires_at) VALUES
      ('raw-session-admin', 'u-admin', now() + interval '1 day'), ('raw-session-lead', 'u-lead', now() + interval '1 day')`);

    await applyMigrationFile(client, '0001_operators_sessions_throttles.sql');

    const users = (await client.query('SELECT id, is_operator, disabled_at FROM users ORDER BY id')).rows;
    expect(users).toEqual([
      { id: 'u-admin', is_operator: true, disabled_at: null },
      { id: 'u-lead', is_operator: false, disabled_at: null },
    ]);
    const members = (await client.query('SELECT user_id, role FROM memberships WHERE team_id = $1 ORDER BY user_id', [team])).rows;
    expect(members).toEqual([{ user_id: 'u-admin', role: 'reviewer' }, { user_id: 'u-lead', role: 'lead' }]);

    const invitations = (await client.query(`SELECT token_hash, role, expires_at <= now() AS expired FROM invitations ORDER BY token_hash`)).rows;
    expect(invitations).toEqual([
      { token_hash: 'hash-admin', role: 'reviewer', expired: true },
      { token_hash: 'hash-analyst', role: 'analyst', expired: false },
    ]);

    expect((await client.query('SELECT count(*)::int AS n FROM sessions')).rows[0].n).toBe(0);

    const audit = (await client.query('SELECT actor_id, action, target_table, target_id, team_id, detail FROM audit_events')).rows;
    expect(audit).toEqual([
      {
        actor_id: null,
        action: 'membership.adminBecameOperator',
        target_table: 'memberships',
        target_id: `${team}:u-admin`,
        team_id: team,
        detail: { from: 'admin', to: 'reviewer', operator: true },
      },
    ]);

    // The team role type no longer has 'admin' (PostgreSQL's own catalogue says so).
    const labels = (await client.query(`SELECT e.enumlabel FROM pg_enum e JOIN pg_type t ON t.oid = e.enumtypid WHERE t.typname = 'team_role' ORDER BY e.enumsortorder`)).rows;
    expect(labels.map((r) => r.enumlabel)).toEqual(['lead', 'analyst', 'reviewer']);
    await expect(client.query(`UPDATE memberships SET role = 'admin' WHERE user_id = 'u-lead'`)).rejects.toThrow(/invalid input value for enum team_role/);
  });
});
