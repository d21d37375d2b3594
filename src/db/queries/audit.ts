import { sql } from 'drizzle-orm';
import pg from 'pg';
import { PgTransaction } from 'drizzle-orm/pg-core';
import type { Db } from '../client';
import { asJsonValue, CHAIN_GENESIS, hashedTextAround } from '../../lib/crypto/audit-chain';

type Tx = Parameters<Parameters<Db['transaction']>[0]>[0];

export interface AuditInput {
  actorId: string | null;
  action: string;
  targetTable: string;
  targetId: string;
  teamId?: string | null;
  detail?: Record<string, unknown>;
}

/**
 * Appends one audit event to its team's hash chain (src/lib/crypto/audit-chain.ts). Inside the caller's transaction
 * when given one (the event commits or rolls back with the change it records), else in a transaction of its own.
 * Appends to one chain are serialized by a transaction-scoped advisory lock on the team, held until commit, so two
 * concurrent changes cannot both link to the same previous event.
 */
export async function recordAudit(tx: Tx | Db, input: AuditInput): Promise<void> {
  if (tx instanceof PgTransaction) return append(tx as Tx, input);
  return (tx as Db).transaction((inner) => append(inner, input));
}

async function append(tx: Tx, input: AuditInput): Promise<void> {
  const { lock, insert } = appendStatements(input);
  await tx.execute(sql.raw(lock));
  // After the lock (its own statement, so the insert's snapshot sees every event committed before it).
  await tx.execute(sql.raw(insert));
}

const literal = (value: string | null): string => (value === null ? 'NULL' : pg.escapeLiteral(value));

/**
 * The two statements that append `input` to its team's chain, values written as escaped literals (pg's
 * `escapeLiteral`), so the same text serves both ways of sending them. The lock serializes appends to one chain. The
 * insert reads the chain's last hash, fixes the new event's id and time, and stores the event with its SHA-256 taken
 * by PostgreSQL (sha256(), PostgreSQL 11+) over the RFC 8785 text `eventHash` makes (`hashedTextAround` gives the
 * text around the time, id and previous hash), so no hash is made in this process while the lock is held. The
 * verifier recomputes every stored hash with `eventHash` (`npm run audit:verify`). With `onlyIf` (an SQL condition)
 * the insert stores nothing, and takes no id, when the condition is false when it runs.
 */
export function appendStatements(input: AuditInput, onlyIf?: string): { lock: string; insert: string } {
  const teamId = input.teamId ?? null;
  const detail = asJsonValue(input.detail ?? {});
  const [beforeAt, beforeId, beforePrev, afterPrev] = hashedTextAround({ teamId, actorId: input.actorId, action: input.action, targetTable: input.targetTable, targetId: input.targetId, detail });
  const last = `(SELECT hash FROM audit_events WHERE team_id ${teamId === null ? 'IS NULL' : `= ${literal(teamId)}::uuid`} ORDER BY id DESC LIMIT 1)`;
  return {
    lock: `SELECT pg_advisory_xact_lock(hashtextextended(${literal(`tidemark:audit:${teamId ?? 'site'}`)}, 0))`,
    insert: `INSERT INTO audit_events (id, team_id, actor_id, action, target_table, target_id, detail, at, prev_hash, hash)
     SELECT n.id, ${literal(teamId)}::uuid, ${literal(input.actorId)}::text, ${literal(input.action)}::text, ${literal(input.targetTable)}::text, ${literal(input.targetId)}::text, ${literal(JSON.stringify(detail))}::jsonb, n.at, n.prev,
       encode(sha256(convert_to(${literal(beforeAt)}::text || to_char(n.at AT TIME ZONE 'UTC', 'YYYY-MM-DD"T"HH24:MI:SS.MS"Z"') || ${literal(beforeId)} || n.id::text || ${literal(beforePrev)} || n.prev || ${literal(afterPrev)}, 'UTF8')), 'hex')
     FROM (SELECT nextval(pg_get_serial_sequence('audit_events', 'id')) AS id, date_trunc('milliseconds', now()) AS at, coalesce(${last}, ${literal(CHAIN_GENESIS)}) AS prev${onlyIf ? ` WHERE ${onlyIf}` : ''}) n`,
  };
}

/**
 * The last step of a change's transaction, for the routes that many people hit at once (note posts): the chain lock,
 * the event and the COMMIT go to PostgreSQL as one message (the simple query protocol). PostgreSQL runs the
 * statements one after another, each with a snapshot of its own (so the event still links to every event committed
 * before the lock), and the lock is held only while the server inserts and commits: never across a round trip to
 * this process, which may be busy with other requests. The message ends with a BEGIN, so the transaction drizzle then
 * COMMITs is an empty one. Nothing may follow this call in the transaction. If any statement fails, the ones after
 * it do not run and the whole change rolls back.
 */
export async function recordAuditAndCommit(tx: Tx, input: AuditInput): Promise<void> {
  const { lock, insert } = appendStatements(input);
  await tx.execute(sql.raw([lock, insert, 'COMMIT', 'BEGIN'].join(';\n')));
}
