// A throw-away database in the test cluster, created and dropped as the owner (TIDEMARK_OWNER_DATABASE_URL, which
// scripts/test.mjs sets), for tests that must run migrations or need a site of their own.
import fs from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import pg from 'pg';

export const drizzleDir = fileURLToPath(new URL('../../drizzle/', import.meta.url));

export interface ScratchDatabase {
  name: string;
  /** The owner's connection URL to the scratch database. */
  url: string;
  drop(): Promise<void>;
}

function ownerUrl(): URL {
  const raw = process.env.TIDEMARK_OWNER_DATABASE_URL;
  if (!raw) throw new Error('TIDEMARK_OWNER_DATABASE_URL is not set: run this test through `npm test`.');
  return new URL(raw);
}

async function asOwner<T>(fn: (client: pg.Client) => Promise<T>): Promise<T> {
  const client = new pg.Client({ connectionString: ownerUrl().toString() });
  await client.connect();
  try {
    return await fn(client);
  } finally {
    await client.end();
  }
}

/** Creates an empty database with a unique name; `drop()` removes it, closing any connection left open. */
export async function createScratchDatabase(label: string): Promise<ScratchDatabase> {
  const name = `tidemark_scratch_${label}_${Date.now().toString(36)}_${Math.random().toString(36).slice(2, 8)}`.toLowerCase();
  if (!/^[a-z0-9_]+$/.test(name)) throw new Error(`bad scratch database name ${name}`);
  await asOwner((c) => c.query(`CREATE DATABASE ${name}`));
  const url = ownerUrl();
  url.pathname = `/${name}`;
  return {
    name,
    url: url.toString(),
    drop: () => asOwner((c) => c.query(`DROP DATABASE IF EXISTS ${name} WITH (FORCE)`)).then(() => undefined),
  };
}

/** Runs one generated migration file in one transaction, statement by statement, as drizzle's migrator does. */
export async function applyMigrationFile(client: pg.Client, file: string): Promise<void> {
  const text = fs.readFileSync(path.join(drizzleDir, file), 'utf8');
  await client.query('BEGIN');
  try {
    for (const statement of text.split('--> statement-breakpoint')) {
      if (statement.trim()) await client.query(statement);
    }
    await client.query('COMMIT');
  } catch (error) {
    await client.query('ROLLBACK');
    throw error;
  }
}
