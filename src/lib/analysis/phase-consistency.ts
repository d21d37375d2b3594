/**
 * The Rayleigh test of circular uniformity for an inter-trial phase consistency value: is the mean resultant length
 * `r` of `n` unit phasors larger than phases spread evenly would give? Used to mark regions of a phase-consistency
 * map (analysis contract, "Inter-trial phase consistency"; the map itself comes from `decomposeChannel`).
 */
import { exp } from './portable-math';

/** Rayleigh's Z = n·r² (Zar, Biostatistical Analysis, 4th ed., 1999, §27.1, eq. 27.2; from memory). */
export function rayleighZ(n: number, r: number): number {
  return n * r * r;
}

/**
 * Approximate p of Rayleigh's test, `exp(√(1 + 4n + 4(n² − R²)) − (1 + 2n))` with `R = n·r` (Zar, 1999, eq. 27.4,
 * after Greenwood & Durand, 1955; from memory). Good to about three decimals for n ≥ 10 and tends to `exp(−Z)` as n
 * grows. Clamped to [0, 1]; `n < 1` or a non-finite `r` gives NaN.
 */
export function rayleighP(n: number, r: number): number {
  if (!(n >= 1) || !Number.isFinite(r)) return Number.NaN;
  const R = n * Math.min(Math.max(r, 0), 1);
  const p = exp(Math.sqrt(1 + 4 * n + 4 * (n * n - R * R)) - (1 + 2 * n));
  return Math.min(1, Math.max(0, p));
}
