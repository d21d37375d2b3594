// `npm run operator`: the one-time command that creates a site's first operator, on a scratch database migrated
// from the committed migrations (the test database already has the demo operator).
import { createHash } from 'node:crypto';
import pg from 'pg';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { runToEnd } from '../helpers/instance';

const ownerUrl = process.env.TIDEMARK_OWNER_DATABASE_URL!;
const scratchName = `tidemark_operator_${process.pid}`;
const scratchUrl = (() => {
  const u = new URL(ownerUrl);
  u.pathname = `/${scratchName}`;
  return u.toString();
})();
const admin = new pg.Pool({ connectionString: ownerUrl, max: 1 });
// Dropping the scratch database ends its connections: an idle client's farewell is expected, not an error.
admin.on('error', () => {});
let scratch: pg.Pool;
const env = { PATH: process.env.PATH, HOME: process.env.HOME, DATABASE_URL: scratchUrl, TIDEMARK_ORIGIN: 'https://tidemark.example.org' };

beforeAll(async () => {
  await admin.query(`DROP DATABASE IF EXISTS ${scratchName} WITH (FORCE)`);
  await admin.query(`CREATE DATABASE ${scratchName}`);
  const migrated = await runToEnd('scripts/migrate.mjs', { PATH: process.env.PATH, TIDEMARK_OWNER_DATABASE_URL: scratchUrl });
  expect(migrated.code, migrated.output).toBe(0);
  scratch = new pg.Pool({ connectionString: scratchUrl, max: 1 });
  scratch.on('error', () => {});
}, 60_000);
afterAll(async () => {
  await scratch?.end();
  await admin.query(`DROP DATABASE IF EXISTS ${scratchName} WITH (FORCE)`);
  await admin.end();
});

describe('npm run operator', () => {
  it('refuses bad input with one line and exit 2, changing nothing', async () => {
    const bad = await runToEnd('scripts/operator.ts', env, ['--email', 'not-an-address', '--name', 'Ada']);
    expect(bad.code).toBe(2);
    expect(bad.output.trim()).toBe('tidemark operator: --email "not-an-address" is not an e-mail address');
    const unknown = await runToEnd('scripts/operator.ts', env, ['--mail', 'a@b.example']);
    expect(unknown.code).toBe(2);
    expect(unknown.output).toContain("Unknown option '--mail'");
    const { rows } = await scratch.query('SELECT count(*)::int AS n FROM users');
    expect(rows[0].n).toBe(0);
  });

  it('creates the first operator with a one-time link whose token only the digest of is stored, then refuses a second', async () => {
    const first = await runToEnd('scripts/operator.ts', env, ['--email', 'Keeper@Lighthouse.example', '--name', 'Ada Keeper']);
    expect(first.code, first.output).toBe(0);
    const link = /https:\/\/tidemark\.example\.org\/reset-password\/([A-Za-z0-9_-]{43})\n/.exec(first.output);
    expect(link).not.toBeNull();
    const { rows } = await scratch.query(
      'SELECT u.email, u.is_operator, u.password_hash, t.token_hash, t.expires_at > now() + interval \'23 hours\' AS long_enough FROM users u JOIN password_reset_tokens t ON t.user_id = u.id',
    );
    expect(rows).toEqual([
      { email: 'keeper@lighthouse.example', is_operator: true, password_hash: null, token_hash: createHash('sha256').update(link![1]).digest('hex'), long_enough: true },
    ]);
    const { rows: audit } = await scratch.query("SELECT action FROM audit_events WHERE action = 'operator.firstCreated'");
    expect(audit).toHaveLength(1);

    const second = await runToEnd('scripts/operator.ts', env, ['--email', 'other@lighthouse.example', '--name', 'Other']);
    expect(second.code).toBe(2);
    expect(second.output).toContain('an operator already exists');
    const { rows: count } = await scratch.query('SELECT count(*)::int AS n FROM users');
    expect(count[0].n).toBe(1);
  });
});
