import { sql } from 'drizzle-orm';
import pg from 'pg';
import { PgTransaction } from 'drizzle-orm/pg-core';
import type { Db } from '../client';
import { asJsonValue, CHAIN_GENESIS, chainedForm, holedText } from '../../lib/crypto/audit-chain';

type Tx = Parameters<Parameters<Db['transaction']>[0]>[0];

export interface AuditInput {
  /** A `SqlValue` only through `appendStatements` with a `from`. */
  actorId: string | null | SqlValue;
  action: string;
  targetTable: string;
  targetId: string;
  /** A `SqlValue` only through `appendStatements` with a `from`. */
  teamId?: string | null | SqlValue;
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

/** An SQL literal of a text value (pg's `escapeLiteral`), or NULL. */
export const literal = (value: string | null): string => (value === null ? 'NULL' : pg.escapeLiteral(value));

/**
 * A value PostgreSQL supplies when the event is stored: an SQL expression over `AppendOptions.from` (a team id, or a
 * detail member, the app did not read first). Used by the note post, which checks and stores in one message.
 */
export class SqlValue {
  constructor(readonly expression: string) {}
}

export interface AppendOptions {
  /** An SQL condition: when false as the insert runs, nothing is stored and no id is taken. */
  onlyIf?: string;
  /** A FROM item (one row, or none: then nothing is locked or stored) that `SqlValue` expressions read. */
  from?: string;
  /**
   * How a value goes into the text: an escaped literal (the default), or a parameter placeholder the caller collects
   * (the note post prepares its statements once per connection, so their text must not change with the values).
   */
  value?: (v: string | null) => string;
}

/**
 * The two statements that append `input` to its team's chain, values written as escaped literals (pg's
 * `escapeLiteral`), so the same text serves both ways of sending them. The lock serializes appends to one chain. The
 * insert reads the chain's last hash, fixes the new event's id and time, and stores the event with its SHA-256 taken
 * by PostgreSQL (sha256(), PostgreSQL 11+) over the RFC 8785 text `eventHash` makes (`holedText` cuts it at
 * the values PostgreSQL fills in: time, id, previous hash and any `SqlValue`), so no hash is made in this process
 * while the lock is held. The verifier recomputes every stored hash with `eventHash` (`npm run audit:verify`).
 */
export function appendStatements(input: AuditInput, { onlyIf, from, value = literal }: AppendOptions = {}): { lock: string; insert: string } {
  const { mark, pieces: cut } = holedText();
  const fromSql: Record<string, string> = {};
  const teamSql = input.teamId instanceof SqlValue ? input.teamId.expression : null;
  const teamId = input.teamId instanceof SqlValue ? null : (input.teamId ?? null);
  if (teamSql !== null) fromSql.teamId = teamSql;
  const actorSql = input.actorId instanceof SqlValue ? input.actorId.expression : null;
  const actorId = input.actorId instanceof SqlValue ? null : input.actorId;
  if (actorSql !== null) fromSql.actorId = actorSql;
  const plain: Record<string, unknown> = {};
  const detailForm: Record<string, unknown> = {};
  for (const [key, value] of Object.entries(input.detail ?? {})) {
    if (value instanceof SqlValue) {
      fromSql[`detail.${key}`] = value.expression;
      detailForm[key] = mark(`detail.${key}`);
    } else {
      plain[key] = value;
      detailForm[key] = value;
    }
  }
  const detail = asJsonValue(plain);
  const form = {
    ...chainedForm({ teamId, actorId, action: input.action, targetTable: input.targetTable, targetId: input.targetId, detail: asJsonValue(detailForm), id: 0, at: new Date(0), prevHash: '' }),
    ...(teamSql !== null ? { teamId: mark('teamId') } : {}),
    ...(actorSql !== null ? { actorId: mark('actorId') } : {}),
    at: mark('at'),
    id: mark('id'),
    prevHash: mark('prevHash'),
  };
  const { pieces, holes } = cut(form);
  const holeSql = (name: string): string => {
    if (name === 'at') return `'"' || to_char(n.at AT TIME ZONE 'UTC', 'YYYY-MM-DD"T"HH24:MI:SS.MS"Z"') || '"'`;
    if (name === 'id') return 'n.id::text';
    if (name === 'prevHash') return `'"' || n.prev || '"'`;
    const expression = fromSql[name];
    if (expression === undefined) throw new Error(`audit: no value for the hole ${name}`);
    return `to_json((${expression})::text)::text`;
  };
  const hashed = pieces.map((piece, i) => `${value(piece)}::text${i < holes.length ? ` || ${holeSql(holes[i])}` : ''}`).join(' || ');
  const team = teamSql !== null ? `(${teamSql})::uuid` : `${value(teamId)}::uuid`;
  const last = `(SELECT hash FROM audit_events WHERE team_id ${teamSql === null && teamId === null ? 'IS NULL' : `= ${team}`} ORDER BY id DESC LIMIT 1)`;
  const sqlDetail = Object.entries(fromSql).filter(([k]) => k.startsWith('detail.'));
  const storedDetail = `${value(JSON.stringify(detail))}::jsonb${sqlDetail.length ? ` || jsonb_build_object(${sqlDetail.map(([k, e]) => `${literal(k.slice('detail.'.length))}::text, (${e})::text`).join(', ')})` : ''}`;
  const lockKey = teamSql !== null ? `'tidemark:audit:' || (${teamSql})::text` : literal(`tidemark:audit:${teamId ?? 'site'}`);
  // A value PostgreSQL supplies must be there: a NULL team would take no lock and start a chain of its own.
  const present = Object.values(fromSql).map((e) => `(${e}) IS NOT NULL`);
  const where = [...(onlyIf ? [onlyIf] : []), ...present];
  return {
    lock: `SELECT pg_advisory_xact_lock(hashtextextended(${lockKey}, 0))${from ? ` FROM ${from}${present.length ? ` WHERE ${present.join(' AND ')}` : ''}` : ''}`,
    insert: `INSERT INTO audit_events (id, team_id, actor_id, action, target_table, target_id, detail, at, prev_hash, hash)
     SELECT n.id, ${team}, ${actorSql !== null ? `(${actorSql})::text` : `${value(actorId)}::text`}, ${value(input.action)}::text, ${value(input.targetTable)}::text, ${value(input.targetId)}::text, ${storedDetail}, n.at, n.prev,
       encode(sha256(convert_to(${hashed}, 'UTF8')), 'hex')
     FROM ${from ? `${from} CROSS JOIN LATERAL ` : ''}(SELECT nextval(pg_get_serial_sequence('audit_events', 'id')) AS id, date_trunc('milliseconds', now()) AS at, coalesce(${last}, ${literal(CHAIN_GENESIS)}) AS prev${where.length ? ` WHERE ${where.join(' AND ')}` : ''}) n`,
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
