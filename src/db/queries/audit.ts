import type { Db } from '../client';
import { auditEvents } from '../schema';

type Tx = Parameters<Parameters<Db['transaction']>[0]>[0];

export interface AuditInput {
  actorId: string | null;
  action: string;
  targetTable: string;
  targetId: string;
  teamId?: string | null;
  detail?: Record<string, unknown>;
}

/** Appends one audit event inside the caller's transaction. */
export async function recordAudit(tx: Tx | Db, input: AuditInput): Promise<void> {
  await tx.insert(auditEvents).values({
    actorId: input.actorId,
    action: input.action,
    targetTable: input.targetTable,
    targetId: input.targetId,
    teamId: input.teamId ?? null,
    detail: input.detail ?? {},
  });
}
