/**
 * Edge zones of a time-frequency map, one rule for the run's baseline warning, the maps' hatching and the colour
 * limits (analysis contract: grid times closer than `edgeSeconds[f]` = 3σ to either epoch edge are edge-affected;
 * the 3σ support of a Gaussian-windowed wavelet follows Cohen, 2019, NeuroImage 199:81–86).
 *
 * On the epoch grid t_j = epochs.start + j/fs (j = 0 … L−1), point j lies in the leading zone when j < e·fs and in
 * the trailing zone when L−1−j < e·fs, both compared with a tolerance of 1e-9 samples, so an edge that falls on a
 * grid point by decimal arithmetic (0.25 s × 400 Hz) counts that point as outside the zone, as written.
 */
export interface EdgeZones {
  /** Per frequency: how many grid points at the start of the epoch lie in the edge zone. */
  left: Int32Array;
  /** Per frequency: how many grid points at the end of the epoch lie in the edge zone. */
  right: Int32Array;
}

const TOLERANCE_SAMPLES = 1e-9;

/** The number of grid points j ≥ 0 with j < edgeSeconds·fs (less the tolerance), at most `nTimes`. */
export function edgePointCount(edgeSeconds: number, sampleRateHz: number, nTimes: number): number {
  const y = edgeSeconds * sampleRateHz - TOLERANCE_SAMPLES;
  return y <= 0 ? 0 : Math.min(nTimes, Math.ceil(y));
}

/** The leading and trailing edge-zone point counts per frequency of an `nTimes`-point epoch grid. */
export function edgeZones(edgeSeconds: ArrayLike<number>, sampleRateHz: number, nTimes: number): EdgeZones {
  const nf = edgeSeconds.length;
  const left = new Int32Array(nf);
  const right = new Int32Array(nf);
  for (let f = 0; f < nf; f++) {
    const n = nTimes === 0 ? 0 : edgePointCount(edgeSeconds[f], sampleRateHz, nTimes);
    left[f] = n;
    right[f] = n;
  }
  return { left, right };
}

/** Frequencies (indices, ascending) at which baseline points first … last reach into an edge zone. */
export function baselineEdgeOverlap(zones: EdgeZones, nTimes: number, first: number, last: number): number[] {
  const hit: number[] = [];
  for (let f = 0; f < zones.left.length; f++) {
    if (first < zones.left[f] || last >= nTimes - zones.right[f]) hit.push(f);
  }
  return hit;
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
