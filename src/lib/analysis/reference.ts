/**
 * Re-referencing of the continuous recording (recipe `reference`, DEVELOPERS.md "References"). Sums run in Float64
 * in channel order and each output sample is rounded once to Float32, so every engine gives the same bits.
 */

/**
 * Common average reference over `channels` (indices into `data`): `y_c[s] = x_c[s] − (1/K)·Σ_k x_k[s]` for each
 * listed channel, so the listed channels sum to zero at every sample (up to Float32 rounding). Common practice in
 * EEG (e.g. Nunez & Srinivasan, 2006, "Electric Fields of the Brain", 2nd ed., ch. 7); returns one new array per
 * listed channel, in the order given.
 */
export function commonAverage(data: readonly Float32Array[], channels: readonly number[]): Float32Array[] {
  return subtractMean(data, channels, channels);
}

/**
 * Reference to the mean of chosen channels (e.g. linked mastoids): `y_c[s] = x_c[s] − (1/R)·Σ_{r ∈ refs} x_r[s]`
 * for each channel in `apply` (the reference channels themselves included when listed). One new array per channel.
 */
export function meanOfChannels(data: readonly Float32Array[], apply: readonly number[], refs: readonly number[]): Float32Array[] {
  return subtractMean(data, apply, refs);
}

function subtractMean(data: readonly Float32Array[], apply: readonly number[], refs: readonly number[]): Float32Array[] {
  const n = data.length > 0 ? data[0].length : 0;
  const mean = new Float64Array(n);
  for (const r of refs) {
    const x = data[r];
    for (let s = 0; s < n; s++) mean[s] += x[s];
  }
  const k = refs.length;
  for (let s = 0; s < n; s++) mean[s] /= k;
  return apply.map((c) => {
    const x = data[c];
    const y = new Float32Array(n);
    for (let s = 0; s < n; s++) y[s] = x[s] - mean[s];
    return y;
  });
}

/** Bipolar derivation `y[s] = x_a[s] − x_b[s]` of each pair `[a, b]` (indices into `data`). */
export function bipolar(data: readonly Float32Array[], pairs: readonly (readonly [number, number])[]): Float32Array[] {
  return pairs.map(([a, b]) => {
    const xa = data[a];
    const xb = data[b];
    const y = new Float32Array(xa.length);
    for (let s = 0; s < xa.length; s++) y[s] = xa[s] - xb[s];
    return y;
  });
}

/**
 * The contacts of an electrode shaft named `shaft` ("LA" for LA1, LA2, …; the name followed by a contact number,
 * common practice for depth electrodes), as `[number, channel index]` sorted by contact number.
 */
export function shaftContacts(names: readonly string[], shaft: string): [number, number][] {
  const out: [number, number][] = [];
  names.forEach((name, c) => {
    if (!name.startsWith(shaft)) return;
    const rest = name.slice(shaft.length);
    if (/^\d+$/.test(rest)) out.push([Number(rest), c]);
  });
  return out.sort((a, b) => a[0] - b[0]);
}
