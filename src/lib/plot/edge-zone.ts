/**
 * Edge zones of a time-frequency map (analysis contract: time points closer than `edgeSeconds[f]` = 3σ to either
 * epoch edge are edge-affected). Per frequency row, `left[f]` points at the start and `right[f]` at the end.
 */
export interface EdgeZones {
  left: Int32Array;
  right: Int32Array;
}

/** Counts, per frequency, the leading and trailing grid times t with t − t₀ < edge or t_last − t < edge. */
export function edgeZones(times: ArrayLike<number>, edgeSeconds: ArrayLike<number>): EdgeZones {
  const nt = times.length;
  const nf = edgeSeconds.length;
  const left = new Int32Array(nf);
  const right = new Int32Array(nf);
  if (nt === 0) return { left, right };
  const t0 = times[0];
  const t1 = times[nt - 1];
  for (let f = 0; f < nf; f++) {
    const e = edgeSeconds[f];
    let l = 0;
    while (l < nt && times[l] - t0 < e) l++;
    let r = 0;
    while (r < nt && t1 - times[nt - 1 - r] < e) r++;
    left[f] = l;
    right[f] = r;
  }
  return { left, right };
}

/** A mask `[f·nt + t]`: 1 inside an edge zone, 0 elsewhere. */
export function edgeMask(zones: EdgeZones, nt: number): Uint8Array {
  const nf = zones.left.length;
  const mask = new Uint8Array(nf * nt);
  for (let f = 0; f < nf; f++) {
    const off = f * nt;
    const l = Math.min(nt, zones.left[f]);
    const r = Math.min(nt, zones.right[f]);
    for (let t = 0; t < l; t++) mask[off + t] = 1;
    for (let t = nt - r; t < nt; t++) mask[off + t] = 1;
  }
  return mask;
}
