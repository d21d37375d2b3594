/**
 * Derived results kept in memory under a byte budget, least recently used first out. The workspace's caches
 * (decompositions, spectra, fits, band summaries) are all re-computable from the recording and the recipe, so
 * evicting one costs time, never data.
 */

/** Bytes held by typed arrays reachable from `value` (plain objects and arrays walked; other values count 8). */
export function bytesOf(value: unknown, seen: Set<unknown> = new Set()): number {
  if (value === null || typeof value !== 'object') return 8;
  if (seen.has(value)) return 0;
  seen.add(value);
  if (ArrayBuffer.isView(value)) return value.byteLength;
  let total = 0;
  for (const v of Array.isArray(value) ? value : Object.values(value)) total += bytesOf(v, seen);
  return total;
}

/** The size of one cached decomposition: its typed arrays (power maps, spectra, masks, epoch starts). */
export const sizeOfDecomposition = (d: object): number => bytesOf(d);

/**
 * Which entries stay: walking from the most recently used (`order` ends with it), keeps entries while the total
 * stays within `budgetBytes`; `pinned` keys always stay (and count). Returns the kept order and the evicted keys.
 */
export function fitBudget(order: readonly string[], sizeOf: (key: string) => number, budgetBytes: number, pinned: ReadonlySet<string> = new Set()): { kept: string[]; evicted: string[] } {
  let total = 0;
  for (const key of order) if (pinned.has(key)) total += sizeOf(key);
  const keep = new Set(pinned);
  for (let i = order.length - 1; i >= 0; i--) {
    const key = order[i];
    if (pinned.has(key)) continue;
    const size = sizeOf(key);
    if (total + size <= budgetBytes) {
      total += size;
      keep.add(key);
    }
  }
  return { kept: order.filter((k) => keep.has(k)), evicted: order.filter((k) => !keep.has(k)) };
}

/** A Map with least-recently-used eviction under a byte budget (for the screens' derived values). */
export class BudgetCache<V> {
  private readonly entries = new Map<string, { value: V; bytes: number }>();
  private total = 0;

  constructor(
    readonly budgetBytes: number,
    private readonly sizeOf: (value: V) => number = bytesOf,
  ) {}

  get(key: string): V | undefined {
    const hit = this.entries.get(key);
    if (hit === undefined) return undefined;
    // Map keeps insertion order: re-inserting marks it the most recently used.
    this.entries.delete(key);
    this.entries.set(key, hit);
    return hit.value;
  }

  set(key: string, value: V): void {
    const old = this.entries.get(key);
    if (old !== undefined) {
      this.total -= old.bytes;
      this.entries.delete(key);
    }
    const bytes = this.sizeOf(value);
    this.entries.set(key, { value, bytes });
    this.total += bytes;
    for (const [k, e] of this.entries) {
      if (this.total <= this.budgetBytes || k === key) break;
      this.entries.delete(k);
      this.total -= e.bytes;
    }
  }

  has(key: string): boolean {
    return this.entries.has(key);
  }

  get size(): number {
    return this.entries.size;
  }

  get bytes(): number {
    return this.total;
  }

  clear(): void {
    this.entries.clear();
    this.total = 0;
  }

  /** Moves every entry whose key `rename` changes to its new key (recency kept); `rename` returns null to keep one. */
  rekey(rename: (key: string) => string | null): void {
    const moved = new Map<string, { value: V; bytes: number }>();
    for (const [key, entry] of this.entries) {
      const next = rename(key);
      moved.set(next ?? key, entry);
    }
    this.entries.clear();
    for (const [key, entry] of moved) this.entries.set(key, entry);
    this.total = 0;
    for (const entry of this.entries.values()) this.total += entry.bytes;
  }
}
