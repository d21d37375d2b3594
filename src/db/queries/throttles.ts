import { createHash } from 'node:crypto';
import { and, eq, sql } from 'drizzle-orm';
import { db } from '../client';
import { throttles } from '../schema';

/** A rate-limit rule: at most `max` counted attempts per `windowMinutes`; reaching it locks for `lockMinutes`. */
export interface ThrottleRule {
  bucket: string;
  max: number;
  windowMinutes: number;
  lockMinutes: number;
}

/** The stored subject: a SHA-256 of the bucket and the lower-cased value (an e-mail, address or token). */
export function throttleSubject(rule: ThrottleRule, value: string): string {
  return createHash('sha256').update(`${rule.bucket}\0${value.trim().toLowerCase()}`).digest('hex');
}

/** Seconds until `value` may try again under `rule`; 0 when it may try now. */
export async function throttleWait(rule: ThrottleRule, value: string): Promise<number> {
  const rows = await db
    .select({ wait: sql<number>`ceil(extract(epoch from ${throttles.lockedUntil} - now()))::int` })
    .from(throttles)
    .where(and(eq(throttles.bucket, rule.bucket), eq(throttles.subject, throttleSubject(rule, value)), sql`${throttles.lockedUntil} > now()`))
    .limit(1);
  return rows[0]?.wait ?? 0;
}

/**
 * Counts one attempt in one statement (concurrent requests cannot both slip under the limit) and returns the
 * seconds to wait when this attempt used up the allowance, else 0. A window older than `windowMinutes` restarts.
 */
export async function throttleHit(rule: ThrottleRule, value: string): Promise<number> {
  const subject = throttleSubject(rule, value);
  const win = sql`make_interval(mins => ${rule.windowMinutes})`;
  const lock = sql`make_interval(mins => ${rule.lockMinutes})`;
  const restart = sql`${throttles.windowStartedAt} <= now() - ${win}`;
  const nextCount = sql`(CASE WHEN ${restart} THEN 1 ELSE ${throttles.count} + 1 END)`;
  const result = await db.execute<{ wait: number }>(sql`
    INSERT INTO ${throttles} (bucket, subject, window_started_at, count, locked_until)
    VALUES (${rule.bucket}, ${subject}, now(), 1, CASE WHEN 1 >= ${rule.max} THEN now() + ${lock} END)
    ON CONFLICT (bucket, subject) DO UPDATE SET
      window_started_at = CASE WHEN ${restart} THEN now() ELSE ${throttles.windowStartedAt} END,
      count = ${nextCount},
      locked_until = CASE WHEN ${nextCount} >= ${rule.max} THEN now() + ${lock} ELSE ${throttles.lockedUntil} END
    RETURNING coalesce(ceil(extract(epoch from locked_until - now()))::int, 0) AS wait`);
  // Now and then, forget rows whose window and lock are both long over.
  if (Math.random() < 0.01) {
    await db.execute(sql`DELETE FROM ${throttles} WHERE window_started_at < now() - interval '1 day' AND (locked_until IS NULL OR locked_until < now())`);
  }
  return Math.max(0, Number(result.rows[0]?.wait ?? 0));
}

export async function throttleClear(rule: ThrottleRule, value: string): Promise<void> {
  await db.delete(throttles).where(and(eq(throttles.bucket, rule.bucket), eq(throttles.subject, throttleSubject(rule, value))));
}
