import { desc, eq, isNull, sql } from 'drizzle-orm';
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
  const [previous] = await tx
    .select({ hash: auditEvents.hash })
    .from(auditEvents)
    .where(teamId === null ? isNull(auditEvents.teamId) : eq(auditEvents.teamId, teamId))
    .orderBy(desc(auditEvents.id))
    .limit(1);
  // The id and the time are fixed before the insert so the hash can cover them (the app may not UPDATE audit rows).
  const next = await tx.execute<{ id: string; at: Date }>(
    sql`SELECT nextval(pg_get_serial_sequence('audit_events', 'id')) AS id, date_trunc('milliseconds', now()) AS at`,
  );
  const id = Number(next.rows[0].id);
  const at = new Date(next.rows[0].at);
  const detail = asJsonValue(input.detail ?? {});
  const prevHash = previous?.hash ?? CHAIN_GENESIS;
  const fields = { id, teamId, actorId: input.actorId, action: input.action, targetTable: input.targetTable, targetId: input.targetId, detail, at, prevHash };
  await tx.insert(auditEvents).values({ ...fields, hash: eventHash(fields) });
}
