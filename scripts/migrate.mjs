// Applies the committed migrations in drizzle/ as the database owner, then grants the app's own role exactly what
// it needs. Called by the lifecycle scripts, or by hand for a deployment (`npm run migrate`):
//   TIDEMARK_OWNER_DATABASE_URL  the owner's connection (runs the DDL)
//   TIDEMARK_APP_DB_ROLE         the role the app connects as (gets SELECT/INSERT/UPDATE/DELETE on the tables and
//                                sequences it uses, nothing on the audit but SELECT and INSERT, no DDL)
import { drizzle } from 'drizzle-orm/node-postgres';
import { migrate } from 'drizzle-orm/node-postgres/migrator';
import pg from 'pg';
import { fileURLToPath } from 'node:url';

const url = process.env.TIDEMARK_OWNER_DATABASE_URL;
const appRole = process.env.TIDEMARK_APP_DB_ROLE ?? '';
if (!url) {
  process.stderr.write('TIDEMARK_OWNER_DATABASE_URL is not set: give the database owner\'s connection URL (migrations run as the owner)\n');
  process.exit(2);
}
if (appRole && !/^[a-z_][a-z0-9_]{0,62}$/.test(appRole)) {
  process.stderr.write(`TIDEMARK_APP_DB_ROLE "${appRole}" is not a plain lower-case role name\n`);
  process.exit(2);
}

const pool = new pg.Pool({ connectionString: url, max: 1 });
try {
  await migrate(drizzle(pool), { migrationsFolder: fileURLToPath(new URL('../drizzle', import.meta.url)) });
  if (appRole) {
    const role = `"${appRole}"`;
    await pool.query(`
      REVOKE CREATE ON SCHEMA public FROM PUBLIC;
      GRANT USAGE ON SCHEMA public TO ${role};
      GRANT SELECT, INSERT, UPDATE, DELETE ON ALL TABLES IN SCHEMA public TO ${role};
      GRANT USAGE, SELECT ON ALL SEQUENCES IN SCHEMA public TO ${role};
      REVOKE UPDATE, DELETE, TRUNCATE ON audit_events FROM ${role};
      REVOKE TRUNCATE, REFERENCES, TRIGGER ON ALL TABLES IN SCHEMA public FROM ${role};
    `);
  }
} catch (error) {
  const cause = error?.cause?.message ?? '';
  process.stderr.write(`${error.message.split('\n')[0]}${cause ? `: ${cause}` : ''}\n`);
  process.exitCode = 1;
} finally {
  await pool.end();
}
