import { drizzle } from 'drizzle-orm/node-postgres';
import pg from 'pg';
import * as schema from './schema';

const url = process.env.DATABASE_URL;
if (!url) {
  throw new Error('DATABASE_URL is not set: start the app with `npm start`, which starts PostgreSQL and sets it.');
}

/**
 * The one connection pool of the process. Bounded waits everywhere: a connection attempt gives up after 5 s, a
 * statement after 15 s (server side, `statement_timeout`), a transaction left idle after 30 s. An idle connection the
 * server drops (a restart, a failover) is reported and replaced, never fatal: without the `error` listener node-postgres
 * would throw it as an uncaught exception and end the process.
 */
export const pool = new pg.Pool({
  connectionString: url,
  // 10, or this process's share when several serve (server/main.mjs sets it for each).
  max: Number(process.env.TIDEMARK_DB_POOL_SIZE ?? 10),
  connectionTimeoutMillis: 5_000,
  idleTimeoutMillis: 30_000,
  statement_timeout: 15_000,
  idle_in_transaction_session_timeout: 30_000,
});
pool.on('error', (error) => {
  console.error(`[tidemark] database connection lost while idle (${(error as { code?: string }).code ?? error.message}); it will be replaced`);
});
// The pool listens only to idle clients. A client checked out for a transaction sits between two statements while
// the app computes; a server shutdown then arrives as an 'error' event with no query to take it,
// and an 'error' event nobody listens to ends the process. Every client gets its own listener: the statement that
// follows fails as unavailable (503), and the pool drops the broken client when it is released.
pool.on('connect', (client) => {
  client.on('error', (error) => {
    console.error(`[tidemark] database connection lost (${(error as { code?: string }).code ?? error.message}); a request using it fails as unavailable`);
  });
});
export const db = drizzle(pool, { schema });
export type Db = typeof db;
/** A transaction handed to a `db.transaction` callback. */
export type Tx = Parameters<Parameters<Db['transaction']>[0]>[0];
// server/app-process.mjs closes the pool after the last request in flight on SIGTERM.
(globalThis as { __closeTidemarkDatabasePool?: () => Promise<void> }).__closeTidemarkDatabasePool = () => pool.end();

const UNAVAILABLE_CODES = new Set([
  'ECONNREFUSED', 'ECONNRESET', 'ETIMEDOUT', 'EPIPE', 'ENOTFOUND', 'EHOSTUNREACH',
  '57P01', // admin_shutdown
  '57P02', // crash_shutdown
  '57P03', // cannot_connect_now (starting up, shutting down)
  '08000', '08001', '08003', '08004', '08006', // connection exceptions (PostgreSQL Appendix A, class 08)
  '53300', // too_many_connections
]);

/** true when `error` (or its cause) says the database cannot be reached right now, rather than that a query is wrong. */
export function isDatabaseUnavailable(error: unknown): boolean {
  for (let e = error as { code?: string; message?: string; cause?: unknown } | undefined, depth = 0; e && depth < 5; e = e.cause as typeof e, depth++) {
    if (e.code && UNAVAILABLE_CODES.has(e.code)) return true;
    if (typeof e.message === 'string' && /Connection terminated|timeout exceeded when trying to connect|Connection ended unexpectedly|encountered a connection error and is not queryable|Client was closed and is not queryable/i.test(e.message)) return true;
  }
  return false;
}
