/**
 * Benjamini–Hochberg adjusted p values (Benjamini & Hochberg, 1995, J R Stat Soc B 57:289–300, step-up procedure):
 * with the M finite p values sorted ascending, q_(i) = min over j ≥ i of p_(j)·M/j, capped at 1. A hypothesis is a
 * discovery at level `fdr` when q ≤ fdr. NaN entries (untestable cells) stay NaN and do not count in M.
 */
export function benjaminiHochberg(p: ArrayLike<number>): Float64Array {
  const q = new Float64Array(p.length).fill(NaN);
  const order: number[] = [];
  for (let i = 0; i < p.length; i++) if (!Number.isNaN(p[i])) order.push(i);
  order.sort((a, b) => p[a] - p[b] || a - b);
  const m = order.length;
  let running = Infinity;
  for (let k = m - 1; k >= 0; k--) {
    const i = order[k];
    running = Math.min(running, (p[i] * m) / (k + 1));
    q[i] = Math.min(1, running);
  }
  return q;
}

/** How many of `q` are discoveries at level `fdr` (q ≤ fdr). */
export function countDiscoveries(q: ArrayLike<number>, fdr: number): number {
  let k = 0;
  for (let i = 0; i < q.length; i++) if (q[i] <= fdr) k++;
  return k;
}
