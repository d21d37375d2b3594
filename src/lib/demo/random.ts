/**
 * Seeded randomness for the demo cohort, so every run writes the same files. sfc32 ("small fast counter",
 * C. Doty-Humphrey, PractRand, public domain) seeded through splitmix32; normals by the Box–Muller transform
 * (Box & Muller, 1958, Ann Math Stat 29:610–611; citations from memory).
 */
export interface Random {
  /** Uniform in [0, 1). */
  next(): number;
  /** Standard normal. */
  normal(): number;
  /** Uniform in [min, max). */
  uniform(min: number, max: number): number;
  /** Integer in [min, max]. */
  integer(min: number, max: number): number;
}

/** splitmix32 step: a well-mixed 32-bit value from a 32-bit state. */
export function mix32(x: number): number {
  x = (x + 0x9e3779b9) | 0;
  x = Math.imul(x ^ (x >>> 16), 0x85ebca6b);
  x = Math.imul(x ^ (x >>> 13), 0xc2b2ae35);
  return (x ^ (x >>> 16)) >>> 0;
}

/** A deterministic generator: the same 32-bit seed always gives the same sequence (sfc32 state from splitmix32). */
export function createRandom(seed: number): Random {
  let a = mix32(seed);
  let b = mix32(a);
  let c = mix32(b);
  let d = 1;
  const next = () => {
    const t = (((a + b) | 0) + d) | 0;
    d = (d + 1) | 0;
    a = b ^ (b >>> 9);
    b = (c + (c << 3)) | 0;
    c = (c << 21) | (c >>> 11);
    c = (c + t) | 0;
    return (t >>> 0) / 4294967296;
  };
  for (let i = 0; i < 12; i++) next();
  let spare: number | null = null;
  return {
    next,
    normal() {
      if (spare !== null) {
        const s = spare;
        spare = null;
        return s;
      }
      let u = next();
      while (u === 0) u = next();
      const v = next();
      const r = Math.sqrt(-2 * Math.log(u));
      spare = r * Math.sin(2 * Math.PI * v);
      return r * Math.cos(2 * Math.PI * v);
    },
    uniform: (min, max) => min + (max - min) * next(),
    integer: (min, max) => min + Math.floor(next() * (max - min + 1)),
  };
}
