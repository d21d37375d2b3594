// The engine-independent exp/log/log10/pow/sin/cos against correctly rounded reference values, and pow's special
// values against the ECMAScript specification.
//
// References: portable-math.reference.json, written once by portable-math.reference.py with mpmath 1.3.0
// (mp.prec = 200, cross-checked at 320 bits, rounded to the nearest double, ties to even). Every argument and
// result there is an IEEE 754 binary64 bit pattern in hex. The engine's own Math.* would not do as a reference:
// V8's libm derives from the same fdlibm sources. These tests read the JSON only and never run Python.
import { describe, expect, it } from 'vitest';
import { cos, exp, log, log10, pow, sin } from '../../../../src/lib/analysis/portable-math';
import reference from './portable-math.reference.json';

const view = new DataView(new ArrayBuffer(8));

/** The double with this 16-hex-digit bit pattern. */
function fromHex(hex: string): number {
  view.setBigUint64(0, BigInt(`0x${hex}`));
  return view.getFloat64(0);
}

/** Position of a double on the line of all doubles (−0 and +0 both at 0), so that neighbours differ by 1. */
function ordinal(x: number): bigint {
  view.setFloat64(0, x);
  const b = view.getBigInt64(0);
  return b < 0n ? -(b & 0x7fffffffffffffffn) : b;
}

/** Distance in units in the last place between two doubles; 0 for two NaNs, Infinity for NaN against a number. */
function ulps(a: number, b: number): number {
  if (a !== a || b !== b) return a !== a && b !== b ? 0 : Infinity;
  const d = ordinal(a) - ordinal(b);
  return Number(d < 0n ? -d : d);
}

type Unary = (x: number) => number;

/** Largest ulp distance of f from the references, with the worst argument for the failure message. */
function worstUnary(f: Unary, cases: string[][]): { ulps: number; at: number } {
  let worst = { ulps: 0, at: NaN };
  for (const [x, r] of cases) {
    const e = ulps(f(fromHex(x)), fromHex(r));
    if (e > worst.ulps) worst = { ulps: e, at: fromHex(x) };
  }
  return worst;
}

describe('portable math against 200-bit mpmath references (≤ 1 ulp from the correctly rounded value)', () => {
  const unary: [string, Unary, string[][]][] = [
    ['exp', exp, reference.exp.cases],
    ['log', log, reference.log.cases],
    ['log10', log10, reference.log10.cases],
    ['sin', sin, reference.sin.cases],
    ['cos', cos, reference.cos.cases],
  ];
  for (const [name, f, cases] of unary) {
    it(`${name} over ${cases.length} arguments`, () => {
      expect(cases.length).toBeGreaterThanOrEqual(200);
      const worst = worstUnary(f, cases);
      expect(worst.ulps, `${name}(${worst.at})`).toBeLessThanOrEqual(1);
    });
  }

  it(`pow over ${reference.pow.cases.length} (x, y) pairs, subnormal to near-overflow results`, () => {
    expect(reference.pow.cases.length).toBeGreaterThanOrEqual(200);
    for (const [x, y, r] of reference.pow.cases) {
      const got = pow(fromHex(x), fromHex(y));
      expect(ulps(got, fromHex(r)), `pow(${fromHex(x)}, ${fromHex(y)}) = ${got}, reference ${fromHex(r)}`).toBeLessThanOrEqual(1);
    }
  });

  it('pow is exact where x^y is a double (2^k, 10^k up to 10^22, 16^0.75, 4^0.5, 3^33 …), correctly rounded near them', () => {
    let exactCount = 0;
    for (const [x, y, r, exact] of reference.powExact.cases as [string, string, string, boolean][]) {
      const got = pow(fromHex(x), fromHex(y));
      // exact results: bit for bit; the two near-exact ones (8^(2/3 rounded), (√2 rounded)^2) within 1 ulp
      const at = `pow(${fromHex(x)}, ${fromHex(y)}) = ${got}, reference ${fromHex(r)}`;
      if (exact) {
        exactCount++;
        expect(got, at).toBe(fromHex(r));
      } else expect(ulps(got, fromHex(r)), at).toBeLessThanOrEqual(1);
    }
    expect(exactCount).toBeGreaterThanOrEqual(45);
  });
});

describe('portable math: exact values and domain limits', () => {
  it('gives the values the review listed exactly: 2^3 = 8 and the log grid 2…32 in 5 steps', () => {
    // 2^3 = 8 (exact arithmetic); frequency-grid.ts forms min·(max/min)^(i/(n−1)), here 2·16^(i/4) = 2, 4, 8, 16, 32
    expect(pow(2, 3)).toBe(8);
    expect([0, 1, 2, 3, 4].map((i) => 2 * pow(16, i / 4))).toEqual([2, 4, 8, 16, 32]);
    // 8^(1/3): 1/3 rounds down, the true value is 2 − 1.4·2^−54, whose nearest double is 2 (mpmath, as above)
    expect(pow(8, 1 / 3)).toBe(2);
    expect(pow(10, 22)).toBe(1e22); // 10^22 is the largest power of ten that is a double (5^22 < 2^53)
    expect(pow(2, 1023)).toBe(2 ** 1023);
    expect(pow(2, -1074)).toBe(5e-324); // smallest subnormal (IEEE 754-2019, binary64)
  });

  it('log10 is exact at powers of ten, so 10·log10(10·P/P) is exactly 10 dB (IEC 60027-3, decibel)', () => {
    for (let n = -20; n <= 22; n++) expect(log10(Number(`1e${n}`))).toBe(n);
    expect(log(1)).toBe(0);
    expect(exp(0)).toBe(1);
  });

  it('exp, log and log10 at their edges: overflow, underflow, zero, negative and NaN arguments', () => {
    // IEEE 754-2019 §9.2 (recommended operations): exp(+∞) = +∞, exp(−∞) = +0, log(±0) = −∞, log(x < 0) = NaN
    expect(exp(Infinity)).toBe(Infinity);
    expect(exp(-Infinity)).toBe(0);
    expect(exp(710)).toBe(Infinity);
    expect(exp(-746)).toBe(0);
    expect(exp(NaN)).toBeNaN();
    expect(log(0)).toBe(-Infinity);
    expect(log(-0)).toBe(-Infinity);
    expect(log(-1)).toBeNaN();
    expect(log(Infinity)).toBe(Infinity);
    expect(log10(0)).toBe(-Infinity);
    expect(log10(-1)).toBeNaN();
  });

  it('sin and cos throw a RangeError naming the argument beyond |x| < 1647100 rad (about 2^20·π/2)', () => {
    // inside the bound the reference set reaches 1647099.9 rad (see above); just outside it, a clear refusal
    expect(() => sin(1647100)).toThrow(RangeError);
    expect(() => cos(-1e9)).toThrow(/cos\(x\): x = -1000000000 rad is outside \|x\| < 1647100/);
    expect(() => sin(1e300)).toThrow(/sin\(x\): x = 1e\+300 rad/);
    expect(Number.isFinite(sin(1647099.9999999998))).toBe(true);
    // ECMA-262 (2024) §21.3.2.30 Math.sin and §21.3.2.12 Math.cos: NaN or ±∞ gives NaN; sin(±0) = ±0
    expect(sin(Infinity)).toBeNaN();
    expect(cos(-Infinity)).toBeNaN();
    expect(sin(NaN)).toBeNaN();
    expect(Object.is(sin(-0), -0)).toBe(true);
    expect(cos(0)).toBe(1);
  });
});

describe('pow special values: ECMA-262 (2024) §6.1.6.1.3 Number::exponentiate', () => {
  it('steps 1–3: NaN exponent gives NaN (even for base 1), ±0 exponent gives 1, NaN base gives NaN', () => {
    expect(pow(1, NaN)).toBeNaN(); // step 1
    expect(pow(0, NaN)).toBeNaN(); // step 1
    expect(pow(NaN, NaN)).toBeNaN(); // step 1
    expect(pow(NaN, 0)).toBe(1); // step 2
    expect(pow(Infinity, -0)).toBe(1); // step 2
    expect(pow(-3, 0)).toBe(1); // step 2
    expect(pow(NaN, 1)).toBeNaN(); // step 3
  });

  it('steps 4–5: base +∞ and −∞', () => {
    expect(pow(Infinity, 0.5)).toBe(Infinity); // step 4.a
    expect(Object.is(pow(Infinity, -2), 0)).toBe(true); // step 4.b
    expect(pow(-Infinity, 3)).toBe(-Infinity); // step 5.a.i, odd integral exponent
    expect(pow(-Infinity, 2)).toBe(Infinity); // step 5.a.ii
    expect(pow(-Infinity, 0.5)).toBe(Infinity); // step 5.a.ii
    expect(Object.is(pow(-Infinity, -3), -0)).toBe(true); // step 5.b.i
    expect(Object.is(pow(-Infinity, -2), 0)).toBe(true); // step 5.b.ii
  });

  it('steps 6–7: base +0 and −0', () => {
    expect(Object.is(pow(0, 3), 0)).toBe(true); // step 6.a
    expect(pow(0, -0.5)).toBe(Infinity); // step 6.b
    expect(Object.is(pow(-0, 3), -0)).toBe(true); // step 7.a.i
    expect(Object.is(pow(-0, 2), 0)).toBe(true); // step 7.a.ii
    expect(Object.is(pow(-0, 0.5), 0)).toBe(true); // step 7.a.ii (not −0, unlike a square root)
    expect(pow(-0, -1)).toBe(-Infinity); // step 7.b.i
    expect(pow(-0, -2)).toBe(Infinity); // step 7.b.ii
  });

  it('steps 9–10: exponent ±∞ by |base| > 1, = 1, < 1', () => {
    expect(pow(1.5, Infinity)).toBe(Infinity); // step 9.a
    expect(pow(-1, Infinity)).toBeNaN(); // step 9.b
    expect(pow(1, Infinity)).toBeNaN(); // step 9.b
    expect(Object.is(pow(-0.5, Infinity), 0)).toBe(true); // step 9.c
    expect(Object.is(pow(-2, -Infinity), 0)).toBe(true); // step 10.a
    expect(pow(1, -Infinity)).toBeNaN(); // step 10.b
    expect(pow(0.5, -Infinity)).toBe(Infinity); // step 10.c
  });

  it('step 12: negative base with a non-integral exponent gives NaN; integral exponents keep the sign rule', () => {
    expect(pow(-2, 0.5)).toBeNaN(); // step 12
    expect(pow(-8, 1 / 3)).toBeNaN(); // step 12 (1/3 is not integral)
    expect(pow(-1e-300, 1.5)).toBeNaN(); // step 12
    expect(pow(-2, 3)).toBe(-8); // step 13, (−2)^3 = −8 exactly
    expect(pow(-2, 4)).toBe(16); // step 13
    expect(pow(-1, 2 ** 53)).toBe(1); // step 13, 2^53 is an even integer
    expect(pow(-1, 2 ** 53 - 1)).toBe(-1); // step 13, odd
  });

  it('step 13: finite results that overflow give ±∞, those that underflow give ±0, 1^y = 1', () => {
    // 2^1024 exceeds the largest double (2 − 2^−52)·2^1023 (IEEE 754-2019, binary64): overflow to +∞
    expect(pow(2, 1024)).toBe(Infinity);
    expect(pow(-2, 1025)).toBe(-Infinity);
    expect(pow(10, 309)).toBe(Infinity);
    expect(pow(1 + 2 ** -52, 2 ** 62)).toBe(Infinity); // e^(2^10) = e^1024
    // 2^−1075 is the tie between 0 and the smallest subnormal: round to even gives +0
    expect(Object.is(pow(2, -1075), 0)).toBe(true);
    expect(Object.is(pow(-2, -1075), -0)).toBe(true);
    expect(Object.is(pow(10, -400), 0)).toBe(true);
    expect(pow(1, 1e300)).toBe(1);
    expect(pow(1, -0.5)).toBe(1);
    expect(pow(7.5, 1)).toBe(7.5); // x^1 = x
    expect(pow(4, -1)).toBe(0.25); // x^−1 = 1/x
  });
});
