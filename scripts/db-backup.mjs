// `npm run db:backup [-- <file>]` and `npm run db:restore -- <file> [--into-non-empty]`: a backup of the one place
// that holds state (recordings never reach the server) with Debian's pg_dump / pg_restore of the server's own major
// version, in pg_dump's custom format. Restoring refuses a database that already has tables unless told.
// Connection: TIDEMARK_OWNER_DATABASE_URL (a deployment, as the owner), else the local demo cluster of `npm start`.
// Exit 2 with one line on bad input or failure.
import { spawnSync } from 'node:child_process';
import fs from 'node:fs';
import path from 'node:path';
import pg from 'pg';
import { root } from './lib/bootstrap.mjs';

const [mode, ...rest] = process.argv.slice(2);
function fail(message) {
  process.stderr.write(`tidemark ${mode ?? 'db'}: ${message}\n`);
  process.exit(2);
}

function ownerUrl() {
  if (process.env.TIDEMARK_OWNER_DATABASE_URL) return process.env.TIDEMARK_OWNER_DATABASE_URL;
  // The local demo: the owner password kept beside `npm start`'s cluster (see scripts/lib/bootstrap.mjs).
  for (const base of [path.join(root, '.tidemark', 'pg-dev'), ...fs.readdirSync('/var/tmp').filter((d) => d.startsWith('tidemark-')).map((d) => path.join('/var/tmp', d, 'pg-dev'))]) {
    const file = path.join(base, 'password');
    if (fs.existsSync(file)) return `postgres://tidemark:${encodeURIComponent(fs.readFileSync(file, 'utf8').trim())}@127.0.0.1:${process.env.TIDEMARK_PG_PORT ?? 54329}/tidemark`;
  }
  fail('TIDEMARK_OWNER_DATABASE_URL is not set and no local demo cluster was found');
}

/** Debian's client binary of the server's major version (pg_dump refuses a newer server; an older restore may fail). */
async function tool(name, url) {
  const pool = new pg.Pool({ connectionString: url, max: 1, connectionTimeoutMillis: 5000 });
  pool.on('error', () => {});
  let major;
  try {
    const { rows } = await pool.query('SHOW server_version_num');
    major = Math.floor(Number(rows[0].server_version_num) / 10000);
  } catch (error) {
    fail(`cannot reach the database: ${error.message}`);
  } finally {
    await pool.end().catch(() => {});
  }
  const bin = path.join(process.env.TIDEMARK_PG_BIN ?? `/usr/lib/postgresql/${major}/bin`, name);
  if (!fs.existsSync(bin)) fail(`${bin} is missing: install Debian's postgresql-client-${major}`);
  return bin;
}

function splitUrl(url) {
  const u = new URL(url);
  return {
    args: ['-h', u.hostname, '-p', u.port || '5432', '-U', decodeURIComponent(u.username), '-d', decodeURIComponent(u.pathname.slice(1))],
    env: { ...process.env, PGPASSWORD: decodeURIComponent(u.password) },
  };
}

const url = ownerUrl();
if (mode === 'backup') {
  const stamp = new Date().toISOString().replace(/[:.]/g, '-');
  const file = path.resolve(rest[0] ?? path.join(root, 'backups', `tidemark-${stamp}.dump`));
  fs.mkdirSync(path.dirname(file), { recursive: true });
  const { args, env } = splitUrl(url);
  const result = spawnSync(await tool('pg_dump', url), [...args, '--format=custom', '--no-owner', '--no-privileges', '-f', file], { env, encoding: 'utf8' });
  if (result.status !== 0) fail(`pg_dump failed: ${(result.stderr || '').trim().split('\n').pop()}`);
  fs.chmodSync(file, 0o600);
  process.stdout.write(`${file}\n`);
} else if (mode === 'restore') {
  const file = rest.find((a) => !a.startsWith('--'));
  const force = rest.includes('--into-non-empty');
  if (!file) fail('give the backup file: npm run db:restore -- <file> [--into-non-empty]');
  if (!fs.existsSync(file)) fail(`${file} does not exist`);
  const pool = new pg.Pool({ connectionString: url, max: 1 });
  pool.on('error', () => {});
  const { rows } = await pool.query("SELECT count(*)::int AS n FROM pg_tables WHERE schemaname IN ('public', 'drizzle')");
  await pool.end();
  if (rows[0].n > 0 && !force) fail(`the database already has ${rows[0].n} tables; restore into an empty database, or add --into-non-empty to replace them`);
  const { args, env } = splitUrl(url);
  const result = spawnSync(await tool('pg_restore', url), [...args, '--no-owner', '--no-privileges', '--exit-on-error', '--single-transaction', ...(force ? ['--clean', '--if-exists'] : []), file], { env, encoding: 'utf8' });
  if (result.status !== 0) fail(`pg_restore failed: ${(result.stderr || '').trim().split('\n').pop()}`);
  process.stdout.write(`restored ${file}; grant the app role again: TIDEMARK_APP_DB_ROLE=<role> npm run migrate\n`);
} else {
  fail('usage: npm run db:backup [-- <file>] | npm run db:restore -- <file> [--into-non-empty]');
}
