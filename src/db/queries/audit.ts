import { sql } from 'drizzle-orm';
import pg from 'pg';
import { PgTransaction } from 'drizzle-orm/pg-core';
import type { Db } from '../client';
import { auditEvents } from '../schema';
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
  const teamId = input.teamId ?? null;
  const detail = asJsonValue(input.detail ?? {});
  // Everything of the hashed text but the three values fixed under the lock, made before it is taken.
  const [beforeAt, beforeId, beforePrev, afterPrev] = hashedTextAround({ teamId, actorId: input.actorId, action: input.action, targetTable: input.targetTable, targetId: input.targetId, detail });
  await tx.execute(sql`SELECT pg_advisory_xact_lock(hashtextextended(${`tidemark:audit:${teamId ?? 'site'}`}, 0))`);
  // After the lock (its own statement, so this one's snapshot sees every event committed before it), one statement
  // reads the chain's last hash, fixes the new event's id and time, and stores the event with its SHA-256 taken by
  // PostgreSQL (sha256(), PostgreSQL 11+) over the same RFC 8785 text `eventHash` makes: the lock is held for one
  // round trip and the commit, not for a read, a hash in this process and a write. The verifier recomputes the hash
  // from the stored row with `eventHash` (tests/integration compare them for every event they make).
  const last = teamId === null
    ? sql`(SELECT ${auditEvents.hash} FROM ${auditEvents} WHERE ${auditEvents.teamId} IS NULL ORDER BY ${auditEvents.id} DESC LIMIT 1)`
    : sql`(SELECT ${auditEvents.hash} FROM ${auditEvents} WHERE ${auditEvents.teamId} = ${teamId} ORDER BY ${auditEvents.id} DESC LIMIT 1)`;
  await tx.execute(sql`
    INSERT INTO audit_events (id, team_id, actor_id, action, target_table, target_id, detail, at, prev_hash, hash)
    SELECT n.id, ${teamId}, ${input.actorId}, ${input.action}, ${input.targetTable}, ${input.targetId}, ${JSON.stringify(detail)}::jsonb, n.at, n.prev,
      encode(sha256(convert_to(${beforeAt} || to_char(n.at AT TIME ZONE 'UTC', 'YYYY-MM-DD"T"HH24:MI:SS.MS"Z"') || ${beforeId} || n.id::text || ${beforePrev} || n.prev || ${afterPrev}, 'UTF8')), 'hex')
    FROM (SELECT nextval(pg_get_serial_sequence('audit_events', 'id')) AS id, date_trunc('milliseconds', now()) AS at, coalesce(${last}, ${CHAIN_GENESIS}) AS prev) n`);
}

const literal = (value: string | null): string => (value === null ? 'NULL' : pg.escapeLiteral(value));

/**
 * The last step of a change's transaction, for the routes that many people hit at once (note posts): the chain lock,
 * the event and the COMMIT go to PostgreSQL as one message (the simple query protocol, values written as escaped
 * literals with pg's `escapeLiteral`). PostgreSQL runs the three statements one after another, each with a snapshot
 * of its own (so the event still links to every event committed before the lock), and the lock is held only while
 * the server inserts and commits: never across a round trip to this process, which may be busy with other requests.
 * The message ends with a BEGIN, so the transaction drizzle then COMMITs is an empty one. Nothing may follow this call
 * in the transaction. If any statement fails, the ones after it do not run and the whole change rolls back.
 */
export async function recordAuditAndCommit(tx: Tx, input: AuditInput): Promise<void> {
  const teamId = input.teamId ?? null;
  const detail = asJsonValue(input.detail ?? {});
  const [beforeAt, beforeId, beforePrev, afterPrev] = hashedTextAround({ teamId, actorId: input.actorId, action: input.action, targetTable: input.targetTable, targetId: input.targetId, detail });
  const last = `(SELECT hash FROM audit_events WHERE team_id ${teamId === null ? 'IS NULL' : `= ${literal(teamId)}::uuid`} ORDER BY id DESC LIMIT 1)`;
  const text = [
    `SELECT pg_advisory_xact_lock(hashtextextended(${literal(`tidemark:audit:${teamId ?? 'site'}`)}, 0))`,
    `INSERT INTO audit_events (id, team_id, actor_id, action, target_table, target_id, detail, at, prev_hash, hash)
     SELECT n.id, ${literal(teamId)}::uuid, ${literal(input.actorId)}::text, ${literal(input.action)}::text, ${literal(input.targetTable)}::text, ${literal(input.targetId)}::text, ${literal(JSON.stringify(detail))}::jsonb, n.at, n.prev,
       encode(sha256(convert_to(${literal(beforeAt)}::text || to_char(n.at AT TIME ZONE 'UTC', 'YYYY-MM-DD"T"HH24:MI:SS.MS"Z"') || ${literal(beforeId)} || n.id::text || ${literal(beforePrev)} || n.prev || ${literal(afterPrev)}, 'UTF8')), 'hex')
     FROM (SELECT nextval(pg_get_serial_sequence('audit_events', 'id')) AS id, date_trunc('milliseconds', now()) AS at, coalesce(${last}, ${literal(CHAIN_GENESIS)}) AS prev) n`,
    'COMMIT',
    'BEGIN',
  ].join(';\n');
  await tx.execute(sql.raw(text));
}
