import { sql } from 'drizzle-orm';
import { PgTransaction } from 'drizzle-orm/pg-core';
import type { Db } from '../client';
import { auditEvents } from '../schema';
import { asJsonValue, CHAIN_GENESIS, eventHash } from '../../lib/crypto/audit-chain';

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
  await tx.execute(sql`SELECT pg_advisory_xact_lock(hashtextextended(${`tidemark:audit:${teamId ?? 'site'}`}, 0))`);
  // After the lock (its own statement, so this one's snapshot sees every event committed before it): the chain's
  // last hash, and the new event's id and time, fixed before the insert so the hash can cover them (the app may not
  // UPDATE audit rows). One round trip while the chain is locked.
  const last = teamId === null
    ? sql`(SELECT ${auditEvents.hash} FROM ${auditEvents} WHERE ${auditEvents.teamId} IS NULL ORDER BY ${auditEvents.id} DESC LIMIT 1)`
    : sql`(SELECT ${auditEvents.hash} FROM ${auditEvents} WHERE ${auditEvents.teamId} = ${teamId} ORDER BY ${auditEvents.id} DESC LIMIT 1)`;
  const next = await tx.execute<{ id: string; at: Date; previous: string | null }>(
    sql`SELECT nextval(pg_get_serial_sequence('audit_events', 'id')) AS id, date_trunc('milliseconds', now()) AS at, ${last} AS previous`,
  );
  const id = Number(next.rows[0].id);
  const at = new Date(next.rows[0].at);
  const previous = next.rows[0].previous === null ? undefined : { hash: next.rows[0].previous };
  const detail = asJsonValue(input.detail ?? {});
  const prevHash = previous?.hash ?? CHAIN_GENESIS;
  const fields = { id, teamId, actorId: input.actorId, action: input.action, targetTable: input.targetTable, targetId: input.targetId, detail, at, prevHash };
  await tx.insert(auditEvents).values({ ...fields, hash: eventHash(fields) });
}
