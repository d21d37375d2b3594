import { cos, log } from './portable-math';

/**
 * mulberry32 (Tommy Ettinger, public domain), a small seeded 32-bit generator: uniform in [0, 1). Integer
 * arithmetic only, so a seed gives the same sequence in every engine (the map test's flips, the slope bench's data).
 */
export function mulberry32(seed: number): () => number {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

/** Standard normal deviates from `mulberry32(seed)` by the Box–Muller transform (Box & Muller, 1958, Ann. Math. Stat. 29:610–611). */
export function seededGaussian(seed: number): () => number {
  const u = mulberry32(seed);
  return () => {
    const u1 = 1 - u();
    const u2 = u();
    return Math.sqrt(-2 * log(u1)) * cos(2 * Math.PI * u2);
  };
}
