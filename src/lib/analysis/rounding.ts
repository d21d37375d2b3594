/**
 * Round to the nearest integer, halves up, as the contract's grid rules say. Products like `0.0025 * 200` land a
 * hair below a half in binary floating point; a relative tolerance of 1e-9 keeps them rounding up as written.
 */
export function roundHalfUp(x: number): number {
  return Math.floor(x + 0.5 + 1e-9 * Math.max(1, Math.abs(x)));
}
