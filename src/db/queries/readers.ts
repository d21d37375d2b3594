/**
 * The reader of a statement, as SQL (issue 17): a user id, or a sign-in the statement checks itself, so that the
 * busiest routes make one round trip in all (src/lib/server/request-auth.ts decides which, and falls back to the
 * full check of src/lib/server/sessions.ts when the statement finds nothing).
 */
import { getTableColumns, type InferSelectModel } from 'drizzle-orm';
import type { PgTable } from 'drizzle-orm/pg-core';

/** Who a statement reads for: a user the full check found, or a sign-in its own statement checks (`plainSignIn`). */
export type Reader = { userId: string } | { tokenHash: string; idleMinutes: number };

/**
 * SQL for a statement's FROM list: one row `me` (user_id, email, display_name, is_operator, session_created_at,
 * last_used_at, expires_at) when `tokenParam` (the SHA-256 of the cookie's token) names a session the full check
 * would pass without writing anything, with the idle limit in minutes in `idleParam`; else no row. The same
 * conditions as validateSessionToken, each on the safe side: valid means not disabled, not over the absolute limit,
 * not over the idle limit, not due for a new id, and used within the last minute (else it wants its clock restarted).
 */
export function plainSignIn(tokenParam: string, idleParam: string): string {
  return `(SELECT se.user_id, u.email, u.display_name, u.is_operator, se.created_at AS session_created_at, se.last_used_at, se.expires_at
     FROM sessions se JOIN users u ON u.id = se.user_id
    WHERE se.id = ${tokenParam} AND u.disabled_at IS NULL AND NOT se.rotation_due AND se.expires_at > now()
      AND se.last_used_at > now() - interval '1 minute' AND se.last_used_at > now() - make_interval(mins => ${idleParam}::int)) me`;
}

/** The columns `plainSignIn` adds to a row. */
export interface PlainSignInRow {
  user_id: string;
  email: string;
  display_name: string;
  is_operator: boolean;
  session_created_at: Date;
  last_used_at: Date;
  expires_at: Date;
}

/**
 * The reader's part of a statement: `join` goes in the FROM list before the membership join, `userId` is the SQL
 * of the reader's user id, `columns` adds the sign-in's columns to the select list; `values` are the parameters
 * from `$first` on. `key` names the variant (prepared statements differ by it).
 */
export function readerSql(reader: Reader, first: number): { join: string; userId: string; columns: string; values: unknown[]; key: string } {
  if ('userId' in reader) return { join: '', userId: `$${first}`, columns: '', values: [reader.userId], key: 'user' };
  return { join: `CROSS JOIN ${plainSignIn(`$${first}`, `$${first + 1}`)}`, userId: 'me.user_id', columns: ', me.*', values: [reader.tokenHash, reader.idleMinutes], key: 'sign_in' };
}

/** The reader's part of a statement, as `readerSql` gives it. */
export type ReaderSql = ReturnType<typeof readerSql>;

/**
 * A statement's text per reader variant, built once: the busiest routes would otherwise write several kB of SQL on
 * every request only to find it is the prepared statement's text again.
 */
export function perReader(build: (r: ReaderSql) => string): (r: ReaderSql) => string {
  const texts = new Map<string, string>();
  return (r) => {
    let text = texts.get(r.key);
    if (text === undefined) texts.set(r.key, (text = build(r)));
    return text;
  };
}

/** A self-checking statement's row, split into the answer and the sign-in's columns (null when it read for a user). */
export function splitSignIn<T extends object>(row: (T & Partial<PlainSignInRow>) | undefined): { row: T; signIn: PlainSignInRow | null } | null {
  if (!row) return null;
  const { user_id, email, display_name, is_operator, session_created_at, last_used_at, expires_at, ...rest } = row;
  const signIn = user_id === undefined ? null : ({ user_id, email, display_name, is_operator, session_created_at, last_used_at, expires_at } as PlainSignInRow);
  return { row: rest as T, signIn };
}

/** `alias."column" AS "prefix.key"` for every column of `table`: a raw statement's select list that `rowOf` reads. */
export function columnsOf(table: PgTable, alias: string, prefix: string): string {
  return Object.entries(getTableColumns(table))
    .map(([key, column]) => `${alias}."${column.name}" AS "${prefix}.${key}"`)
    .join(', ');
}

/**
 * The `table` row that a `columnsOf` select list returned, under drizzle's keys. node-postgres has already parsed the
 * values the way drizzle's mapping gives them for these tables' column types (uuid and text as strings, integers as
 * numbers, timestamptz as Date).
 */
export function rowOf<T extends PgTable>(table: T, row: Record<string, unknown>, prefix: string): InferSelectModel<T> {
  const out: Record<string, unknown> = {};
  for (const key of Object.keys(getTableColumns(table))) out[key] = row[`${prefix}.${key}`];
  return out as InferSelectModel<T>;
}
