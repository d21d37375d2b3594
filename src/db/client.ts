import { drizzle } from 'drizzle-orm/node-postgres';
import pg from 'pg';
import * as schema from './schema';

const url = process.env.DATABASE_URL;
if (!url) {
  throw new Error('DATABASE_URL is not set: start the app with `npm start`, which starts PostgreSQL and sets it.');
}

/** The one connection pool of the process. */
export const pool = new pg.Pool({ connectionString: url, max: 10 });
export const db = drizzle(pool, { schema });
export type Db = typeof db;
