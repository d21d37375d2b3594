// The engine-independent exp/log/log10/pow/sin/cos against the engine's own Math functions (an independent
// implementation: V8's libm), in ulps, and against values every handbook lists.
import { describe, expect, it } from 'vitest';
import { cos, exp, log, log10, pow, sin } from '../../../../src/lib/analysis/portable-math';
import { seededUniform } from '../../../helpers/seeded-random';

/** Distance in units in the last place between two finite doubles of the same sign. */
function ulps(a: number, b: number): number {
  if (Object.is(a, b)) return 0;
  const buf = new DataView(new ArrayBuffer(16));
  buf.setFloat64(0, a);
  buf.setFloat64(8, b);
  return Number(buf.getBigInt64(0) - buf.getBigInt64(8) < 0n ? buf.getBigInt64(8) - buf.getBigInt64(0) : buf.getBigInt64(0) - buf.getBigInt64(8));
}

function worst(f: (x: number) => number, g: (x: number) => number, xs: number[]): number {
  let w = 0;
  for (const x of xs) {
    const a = f(x);
    const b = g(x);
    // near a zero of sin/cos an ulp count says little; compare absolutely there
    const d = Math.abs(b) < 1e-6 ? (Math.abs(a - b) < 1e-22 ? 0 : Infinity) : Math.sign(a) === Math.sign(b) ? ulps(a, b) : Infinity;
    w = Math.max(w, d);
  }
  return w;
}

const u = seededUniform(4242);
const spread = (n: number, lo: number, hi: number) => Array.from({ length: n }, () => lo + (hi - lo) * u());
const logSpread = (n: number, lo: number, hi: number) => Array.from({ length: n }, () => Math.exp(Math.log(lo) + (Math.log(hi) - Math.log(lo)) * u()));

describe('portable math (fdlibm algorithms with IEEE 754 basic operations only)', () => {
  it('exp is within 1 ulp of Math.exp over −700…700 and tiny arguments', () => {
    expect(worst(exp, Math.exp, [...spread(20000, -700, 700), ...spread(5000, -2, 2), ...spread(500, -1e-9, 1e-9)])).toBeLessThanOrEqual(1);
    // handbook values: e^0 = 1, e^1 = e (Abramowitz & Stegun, 1964, 4.1.16; common practice)
    expect(exp(0)).toBe(1);
    expect(ulps(exp(1), Math.E)).toBeLessThanOrEqual(1);
    expect(exp(800)).toBe(Infinity);
    expect(exp(-800)).toBe(0);
    expect(exp(NaN)).toBeNaN();
    expect(exp(-740) > 0).toBe(true); // subnormal result
    expect(ulps(exp(-740), Math.exp(-740))).toBeLessThanOrEqual(1);
  });

  it('log and log10 are within 1 ulp of Math.log / Math.log10 from subnormals to 1e300', () => {
    const xs = [...logSpread(20000, 1e-300, 1e300), ...spread(5000, 0.5, 2), 5e-324, 1e-310];
    expect(worst(log, Math.log, xs)).toBeLessThanOrEqual(1);
    expect(worst(log10, Math.log10, xs)).toBeLessThanOrEqual(1);
    expect(log(1)).toBe(0);
    expect(log(0)).toBe(-Infinity);
    expect(log(-1)).toBeNaN();
    // powers of ten come out exact, so 10·log10(10·P/P) is exactly 10 dB (IEC 60027-3, decibel)
    for (let n = -20; n <= 22; n++) expect(log10(Number(`1e${n}`))).toBe(n);
    expect(ulps(log10(2), 0.30102999566398119521)).toBeLessThanOrEqual(1); // log10 2 (A&S 1964, Table 4.1)
  });

  it('sin and cos are within 1 ulp of Math.sin / Math.cos up to 2^19·π/2, with sin²+cos² = 1', () => {
    const xs = [...spread(20000, -10, 10), ...spread(10000, -8e5, 8e5), ...spread(2000, -1e-8, 1e-8)];
    expect(worst(sin, Math.sin, xs)).toBeLessThanOrEqual(1);
    expect(worst(cos, Math.cos, xs)).toBeLessThanOrEqual(1);
    for (const x of xs.slice(0, 2000)) expect(Math.abs(sin(x) ** 2 + cos(x) ** 2 - 1)).toBeLessThan(4e-16);
    expect(sin(0)).toBe(0);
    expect(cos(0)).toBe(1);
    expect(Math.abs(sin(Math.PI / 6) - 0.5)).toBeLessThan(1.2e-16); // sin 30° = 1/2
    expect(Math.abs(cos(Math.PI / 3) - 0.5)).toBeLessThan(1.2e-16); // cos 60° = 1/2
    expect(sin(Infinity)).toBeNaN();
  });

  it('pow is exp(y log x): close to Math.pow for positive bases, exact at y = 0 and y = 1', () => {
    for (let i = 0; i < 20000; i++) {
      const x = 1e-3 + 300 * u();
      const y = -3 + 6 * u();
      const rel = Math.abs(pow(x, y) / Math.pow(x, y) - 1);
      expect(rel).toBeLessThan((1 + Math.abs(y * Math.log(x))) * 2.3e-16);
    }
    expect(pow(7.5, 1)).toBe(7.5);
    expect(pow(7.5, 0)).toBe(1);
    expect(pow(0, 2)).toBe(0);
    expect(pow(-2, 0.5)).toBeNaN();
    expect(pow(2, 10)).toBeCloseTo(1024, 11);
  });
});
