// Applies the committed migrations in drizzle/ to DATABASE_URL (called by the lifecycle scripts).
import { drizzle } from 'drizzle-orm/node-postgres';
import { migrate } from 'drizzle-orm/node-postgres/migrator';
import pg from 'pg';
import { fileURLToPath } from 'node:url';

const pool = new pg.Pool({ connectionString: process.env.DATABASE_URL, max: 1 });
try {
  await migrate(drizzle(pool), { migrationsFolder: fileURLToPath(new URL('../drizzle', import.meta.url)) });
} catch (error) {
  const cause = error?.cause?.message ?? '';
  process.stderr.write(`${error.message.split('\n')[0]}${cause ? `: ${cause}` : ''}\n`);
  process.exitCode = 1;
} finally {
  await pool.end();
}
