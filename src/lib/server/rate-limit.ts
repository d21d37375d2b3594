/**
 * A fixed-window counter kept in memory, per key. Enough for one app process; counts only what the caller
 * reports (failed sign-ins, reset requests), so normal use never trips it.
 * TODO: Assumes a single server process; several processes would each keep their own counts.
 */
export class RateLimit {
  private readonly hits = new Map<string, { count: number; resetAt: number }>();
  constructor(
    private readonly max: number,
    private readonly windowSeconds: number,
  ) {}

  /** true when `key` has used up its allowance in the current window. */
  blocked(key: string, now = Date.now()): boolean {
    const entry = this.hits.get(key);
    return entry !== undefined && entry.resetAt > now && entry.count >= this.max;
  }

  hit(key: string, now = Date.now()): void {
    const entry = this.hits.get(key);
    if (!entry || entry.resetAt <= now) this.hits.set(key, { count: 1, resetAt: now + this.windowSeconds * 1000 });
    else entry.count += 1;
    if (this.hits.size > 10_000) for (const [k, v] of this.hits) if (v.resetAt <= now) this.hits.delete(k);
  }

  clear(key: string): void {
    this.hits.delete(key);
  }
}

export const signInFailures = new RateLimit(10, 15 * 60);
export const resetRequests = new RateLimit(5, 15 * 60);
