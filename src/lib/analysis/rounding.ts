/**
 * Round to the nearest integer, halves up, as the contract's grid rules say. Products of decimal inputs such as
 * `1.001 * 500` land one or two ulps below a half in binary floating point; a tolerance of 8 ulps of |x| keeps them
 * rounding up as written, and stays far below any real fraction (a fixed relative tolerance would not: 1e-9 of
 * 2,000,000 is 0.002, enough to round 2,000,000.499 up).
 */
export function roundHalfUp(x: number): number {
  return Math.floor(x + 0.5 + 8 * Number.EPSILON * Math.max(1, Math.abs(x)));
}
