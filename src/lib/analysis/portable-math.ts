/**
 * exp, log, log10, pow, sin and cos that give the same bits in every JavaScript engine. ECMAScript lets each
 * engine approximate Math.exp, Math.log, Math.sin… its own way (ECMA-262, "Function Properties of the Math
 * Object": "implementation-approximated"), and they do differ: Node 20 and Chromium 156 disagree in the last bit
 * on 1–10 % of arguments. The analysis contract wants a browser result reproduced bit for bit on the command
 * line, so the core computes these functions here with IEEE 754 basic operations only (+ − × ÷ and √, exactly
 * rounded everywhere), after the algorithms of fdlibm 5.3 (Sun Microsystems, 1993; e_exp.c, e_log.c, e_log10.c,
 * e_pow.c, k_sin.c, k_cos.c, e_rem_pio2.c; log10 as revised in FreeBSD msun). Accuracy: under 1 ulp for exp,
 * log, log10, pow, sin and cos; largest errors measured against mpmath at 200 bits over 22 000–30 000 arguments
 * each: exp 0.77, log 0.79, log10 0.60, pow 0.81, sin 0.78, cos 0.80 ulp (portable-math.test.ts keeps ~200
 * references per function). sin and cos take |x| < 1647100 rad (about 2^20·π/2) only, where e_rem_pio2.c's
 * three-piece Cody–Waite reduction is exact; above that they throw a RangeError instead of carrying fdlibm's
 * multi-precision reduction (__kernel_rem_pio2), which the analysis never needs: its angles are 2π·k/N and 2π·f·t
 * over one wavelet.
 */

// One scratch double and its two 32-bit halves; the high word holds sign, exponent and the top 20 mantissa bits.
const f64 = new Float64Array(1);
const u32 = new Uint32Array(f64.buffer);
const HI = new Uint8Array(new Uint16Array([1]).buffer)[0] === 1 ? 1 : 0;
const LO = 1 - HI;

function highWord(x: number): number {
  f64[0] = x;
  return u32[HI] | 0;
}

function fromWords(hi: number, lo: number): number {
  u32[HI] = hi >>> 0;
  u32[LO] = lo >>> 0;
  return f64[0];
}

// 2^e for e = −1074 … 1023, built by exact doublings from the smallest subnormal. Scaling by a table entry is
// exact, and unlike writing an exponent into the bits it does not stall the CPU on a mixed-width load.
const POW2 = new Float64Array(2098);
POW2[0] = 5e-324;
for (let i = 1; i < POW2.length; i++) POW2[i] = POW2[i - 1] * 2;
const pow2 = (e: number) => POW2[e + 1074];

const LN2_HI = 6.93147180369123816490e-1;
const LN2_LO = 1.90821492927058770002e-10;
const INV_LN2 = 1.44269504088896338700e0;
const TWO54 = 1.80143985094819840000e16;
const TWO_M1000 = 9.33263618503218878990e-302; // 2^−1000

/** e^x (fdlibm e_exp.c: x = k·ln2 + r, |r| ≤ ln2/2, a Remez rational approximation of e^r, then × 2^k). */
export function exp(x: number): number {
  if (x !== x) return x;
  if (x > 7.09782712893383973096e2) return Infinity;
  if (x < -7.45133219101941108420e2) return 0;
  const ax = Math.abs(x);
  let hi = 0;
  let lo = 0;
  let k = 0;
  if (ax > 0.5 * LN2_HI) {
    if (ax < 1.5 * LN2_HI) {
      k = x < 0 ? -1 : 1;
      hi = x - k * LN2_HI;
      lo = k * LN2_LO;
    } else {
      k = Math.trunc(INV_LN2 * x + (x < 0 ? -0.5 : 0.5));
      hi = x - k * LN2_HI;
      lo = k * LN2_LO;
    }
    x = hi - lo;
  } else if (ax < 3.7252902984e-9) {
    return 1 + x; // |x| < 2^−28
  }
  const t = x * x;
  const c = x - t * (1.66666666666666019037e-1 + t * (-2.77777777770155933842e-3 + t * (6.61375632143793436117e-5 + t * (-1.65339022054652515390e-6 + t * 4.13813679705723846039e-8))));
  if (k === 0) return 1 - ((x * c) / (c - 2) - x);
  const y = 1 - (lo - (x * c) / (2 - c) - hi);
  if (k >= -1021) return k === 1024 ? y * 2 * pow2(1023) : y * pow2(k);
  return y * pow2(k + 1000) * TWO_M1000;
}

const LG1 = 6.666666666666735130e-1;
const LG2 = 3.999999999940941908e-1;
const LG3 = 2.857142874366239149e-1;
const LG4 = 2.222219843214978396e-1;
const LG5 = 1.818357216161805012e-1;
const LG6 = 1.531383769920937332e-1;
const LG7 = 1.479819860511658591e-1;

/** Natural logarithm (fdlibm e_log.c: x = 2^k·(1+f), √2/2 < 1+f < √2, log(1+f) = f − s(f − R(z)), s = f/(2+f)). */
export function log(x: number): number {
  f64[0] = x;
  const hx = u32[HI] | 0;
  if (hx < 0x00100000 || hx >= 0x7ff00000) return logSpecial(x, false);
  return lnNormal(x, hx, 0);
}

/** log(x·2^kAdd) for a normal x with high word hx. */
function lnNormal(x: number, hx: number, kAdd: number): number {
  const hm = hx & 0x000fffff;
  const K = (hx >> 20) - 1023 + (((hm + 0x95f64) & 0x100000) >> 20); // x = 2^K·(1+f), √2/2 < 1+f < √2
  return logKernel(x * pow2(-K) - 1, K + kAdd, hm);
}

/**
 * log10(x·2^kAdd) for a normal x with high word hx: x = 2^k·(1+f) as in log, then
 * log10 x = k·log10 2 + (f − f²/2 + s(f²/2 + R))/ln 10 with the sum kept in head + tail and 1/ln 10 and log10 2
 * split in two, so only the last addition rounds (the 2013 revision of fdlibm's e_log10.c in FreeBSD msun, by
 * Bruce D. Evans; the 1993 one rounded log(x) before dividing and reached 1.5 ulp near x = 1). The head is cut by
 * Veltkamp's split rather than by clearing its low word: as exact, and without a round trip through the scratch array.
 */
function log10Normal(x: number, hx: number, kAdd: number): number {
  const hm = hx & 0x000fffff;
  const K = (hx >> 20) - 1023 + (((hm + 0x95f64) & 0x100000) >> 20); // x = 2^K·(1+f), √2/2 < 1+f < √2
  const f = x * pow2(-K) - 1;
  const k = K + kAdd;
  if (f === 0 && k === 0) return 0;
  const hfsq = 0.5 * f * f;
  const s = f / (2 + f);
  const z = s * s;
  const w = z * z;
  const R = z * (LG1 + w * (LG3 + w * (LG5 + w * LG7))) + w * (LG2 + w * (LG4 + w * LG6));
  const r = s * (hfsq + R); // log(1 + f) = f − hfsq + r
  const d = f - hfsq;
  const c = d * 4294967297; // (2^32 + 1)·d: Veltkamp's split leaves the top 21 bits of d in hi, so hi·IVLN10_HI is exact
  const hi = c - (c - d);
  const lo = f - hi - hfsq + r;
  let valHi = hi * IVLN10_HI;
  const y2 = k * LOG10_2HI;
  let valLo = k * LOG10_2LO + (lo + hi) * IVLN10_LO + lo * IVLN10_HI;
  const sum = y2 + valHi;
  valLo += y2 - sum + valHi;
  valHi = sum;
  return valLo + valHi;
}

/** Zero, negative, subnormal, infinite or NaN arguments of log (and of log10 when `base10`). */
function logSpecial(x: number, base10: boolean): number {
  if (x !== x || x < 0) return NaN;
  if (x === 0) return -Infinity;
  if (x === Infinity) return x;
  const scaled = x * TWO54; // subnormal: 2^54·x is normal
  f64[0] = scaled;
  const hx = u32[HI] | 0;
  return base10 ? log10Normal(scaled, hx, -54) : lnNormal(scaled, hx, -54);
}

/** log(2^k·(1+f)) for the normalized f of e_log.c; hx is the high word of 1+f without its exponent. */
function logKernel(f: number, k: number, hx: number): number {
  const dk = k;
  if ((0x000fffff & (2 + hx)) < 3) {
    // |f| < 2^−20
    if (f === 0) return k === 0 ? 0 : dk * LN2_HI + dk * LN2_LO;
    const R = f * f * (0.5 - 0.33333333333333333 * f);
    return k === 0 ? f - R : dk * LN2_HI - (R - dk * LN2_LO - f);
  }
  const s = f / (2 + f);
  const z = s * s;
  let i = hx - 0x6147a;
  const w = z * z;
  const j = 0x6b851 - hx;
  const t1 = w * (LG2 + w * (LG4 + w * LG6));
  const t2 = z * (LG1 + w * (LG3 + w * (LG5 + w * LG7)));
  i |= j;
  const R = t2 + t1;
  if (i > 0) {
    const hfsq = 0.5 * f * f;
    return k === 0 ? f - (hfsq - s * (hfsq + R)) : dk * LN2_HI - (hfsq - (s * (hfsq + R) + dk * LN2_LO) - f);
  }
  return k === 0 ? f - s * (f - R) : dk * LN2_HI - (s * (f - R) - dk * LN2_LO - f);
}

const IVLN10_HI = 4.34294481878168880939e-1; // 0x3FDBCB7B 15200000, head of 1/ln 10
const IVLN10_LO = 2.50829467116452752298e-11; // 0x3DBB9438 CA9AADD5, its tail
const LOG10_2HI = 3.01029995663611771306e-1; // 0x3FD34413 509F6000, head of log10 2
const LOG10_2LO = 3.69423907715893078616e-13; // 0x3D59FEF3 11F12B36, its tail

/** Base-10 logarithm (e_log10.c as revised in FreeBSD msun: log10(2^k·x) = k·log10 2 + log(x)/ln 10 in head + tail; exact for powers of ten up to 10^22). */
export function log10(x: number): number {
  f64[0] = x;
  const hx = u32[HI] | 0;
  if (hx < 0x00100000 || hx >= 0x7ff00000) return logSpecial(x, true);
  return log10Normal(x, hx, 0);
}

function lowWord(x: number): number {
  f64[0] = x;
  return u32[LO] | 0;
}

/** x with the low 32 bits of its mantissa cleared (fdlibm's SET_LOW_WORD(x, 0)): a "head" whose products are exact. */
function head(x: number): number {
  f64[0] = x;
  u32[LO] = 0;
  return f64[0];
}

const TWO53 = 9007199254740992;
// e_pow.c: log2 in two pieces on [1, √3/2·2) around 1 or 1.5, then 2^z in two pieces; hex values from the source.
const DP_H = 5.84962487220764160156e-1; // 0x3FE2B803 40000000, head of log2(1.5)
const DP_L = 1.35003920212974897128e-8; // 0x3E4CFDEB 43CFD006, its tail
const L1 = 5.99999999999994648725e-1; // 0x3FE33333 33333303, (3/2)(log x − 2s − 2s³/3) polynomial
const L2 = 4.28571428578550184252e-1; // 0x3FDB6DB6 DB6FABFF
const L3 = 3.33333329818377432918e-1; // 0x3FD55555 518F264D
const L4 = 2.72728123808534006489e-1; // 0x3FD17460 A91D4101
const L5 = 2.30660745775561754067e-1; // 0x3FCD864A 93C9DB65
const L6 = 2.06975017800338417784e-1; // 0x3FCA7E28 4A454EEF
const P1 = 1.66666666666666019037e-1; // 0x3FC55555 5555553E, e^r rational approximation (as in exp)
const P2 = -2.77777777770155933842e-3; // 0xBF66C16C 16BEBD93
const P3 = 6.61375632143793436117e-5; // 0x3F11566A AF25DE2C
const P4 = -1.65339022054652515390e-6; // 0xBEBBBD41 C5D26BF1
const P5 = 4.13813679705723846039e-8; // 0x3E663769 72BEA4D0
const POW_LN2 = 6.93147180559945286227e-1; // 0x3FE62E42 FEFA39EF, ln 2
const POW_LN2_H = 6.93147182464599609375e-1; // 0x3FE62E43 00000000
const POW_LN2_L = -1.90465429995776804525e-9; // 0xBE205C61 0CA86C39
const OVT = 8.0085662595372944372e-17; // 0x3C971547 652B82FE, −(1024 − log2(largest double + ½ ulp))
const CP = 9.61796693925975554329e-1; // 0x3FEEC709 DC3A03FD, 2/(3 ln 2)
const CP_H = 9.61796700954437255859e-1; // 0x3FEEC709 E0000000
const CP_L = -7.02846165095275826516e-9; // 0xBE3E2FE0 145B01F5
const IVLN2 = 1.44269504088896338700e0; // 0x3FF71547 652B82FE, 1/ln 2
const IVLN2_H = 1.44269502162933349609e0; // 0x3FF71547 60000000
const IVLN2_L = 1.92596299112661746887e-8; // 0x3E54AE0B F85DDF44

/**
 * x^y, with the special values of ECMA-262 (2024) §6.1.6.1.3 Number::exponentiate: NaN exponent → NaN (also for
 * base 1), ±0 exponent → 1, ±0 and ±∞ bases by the sign of y and whether y is an odd integer, |x| = 1 with y = ±∞
 * → NaN, negative x with non-integer y → NaN, overflow → ±∞, underflow → ±0. Finite cases follow fdlibm 5.3
 * e_pow.c (Sun Microsystems, 1993): log2|x| = t1 + t2 in double-double, y·log2|x| = n + z with |z| ≤ ½ split in
 * head and tail, x^y = 2^n·2^z. fdlibm's bound: "nearly rounded", under 0.5 ulp + tiny; pow(integer, integer) is
 * exact when the result is representable. y = 2 is x·x and y = ½ is the correctly rounded IEEE square root.
 */
export function pow(x: number, y: number): number {
  // ECMA-262 §6.1.6.1.3, steps 1–12
  if (y !== y) return NaN;
  if (y === 0) return 1;
  if (x !== x) return NaN;
  const yIsInteger = Number.isInteger(y);
  const yIsOdd = yIsInteger && y % 2 !== 0;
  if (x === Infinity) return y > 0 ? Infinity : 0;
  if (x === -Infinity) return y > 0 ? (yIsOdd ? -Infinity : Infinity) : yIsOdd ? -0 : 0;
  if (x === 0) {
    if (1 / x > 0) return y > 0 ? 0 : Infinity;
    return y > 0 ? (yIsOdd ? -0 : 0) : yIsOdd ? -Infinity : Infinity;
  }
  const ax = Math.abs(x);
  if (y === Infinity) return ax > 1 ? Infinity : ax === 1 ? NaN : 0;
  if (y === -Infinity) return ax > 1 ? 0 : ax === 1 ? NaN : Infinity;
  if (x < 0 && !yIsInteger) return NaN;
  // step 13, the approximated value: fdlibm's shortcuts first
  if (y === 1) return x;
  if (y === -1) return 1 / x;
  if (y === 2) return x * x;
  if (y === 0.5 && x > 0) return Math.sqrt(x);
  const s = x < 0 && yIsOdd ? -1 : 1; // sign of the result
  if (ax === 1) return s;
  return s * powPositive(ax, y);
}

/** |x|^y for finite, positive, normal-or-subnormal |x| ≠ 1 and finite y ∉ {0, ±1, 2} (e_pow.c from "|y| is huge"). */
function powPositive(ax: number, y: number): number {
  const hy = highWord(y);
  const iy = hy & 0x7fffffff;
  let ix = highWord(ax);
  let t1: number;
  let t2: number;
  if (iy > 0x41e00000) {
    // |y| > 2^31: over/underflow unless x is within 2^−20 of 1
    if (iy > 0x43f00000) {
      // |y| > 2^64 (an even integer)
      if (ix <= 0x3fefffff) return hy < 0 ? Infinity : 0;
      if (ix >= 0x3ff00000) return hy > 0 ? Infinity : 0;
    }
    if (ix < 0x3fefffff) return hy < 0 ? Infinity : 0;
    if (ix > 0x3ff00000) return hy > 0 ? Infinity : 0;
    // |1 − x| ≤ 2^−20: log(x) = t − t²/2 + t³/3 − t⁴/4, t with 20 trailing zero bits
    const t = ax - 1;
    const w = t * t * (0.5 - t * (0.3333333333333333333333 - t * 0.25));
    const u = IVLN2_H * t; // IVLN2_H has 21 significant bits
    const v = t * IVLN2_L - w * IVLN2;
    t1 = head(u + v);
    t2 = v - (t1 - u);
  } else {
    let n = 0;
    let a = ax;
    if (ix < 0x00100000) {
      // subnormal x
      a *= TWO53;
      n -= 53;
      ix = highWord(a);
    }
    n += (ix >> 20) - 0x3ff;
    const j = ix & 0x000fffff;
    // x = 2^n·a with a in [1, √3/2·2): around bp = 1 when a < √(3/2), around bp = 1.5 when a < √3
    let k = 0;
    ix = j | 0x3ff00000;
    if (j <= 0x3988e) k = 0;
    else if (j < 0xbb67a) k = 1;
    else {
      k = 0;
      n += 1;
      ix -= 0x00100000;
    }
    a = fromWords(ix, lowWord(a));
    const bp = k === 0 ? 1 : 1.5;
    const dpH = k === 0 ? 0 : DP_H;
    const dpL = k === 0 ? 0 : DP_L;
    // ss = sH + sL = (a − bp)/(a + bp)
    const u = a - bp;
    const v = 1 / (a + bp);
    const ss = u * v;
    const sH = head(ss);
    let tH = fromWords(((ix >> 1) | 0x20000000) + 0x00080000 + (k << 18), 0); // head of a + bp
    let tL = a - (tH - bp);
    const sL = v * (u - sH * tH - sH * tL);
    // log(a/bp) = 2s + (2/3)s³ + s⁵·R(s²), scaled by 3/2
    let s2 = ss * ss;
    let r = s2 * s2 * (L1 + s2 * (L2 + s2 * (L3 + s2 * (L4 + s2 * (L5 + s2 * L6)))));
    r += sL * (sH + ss);
    s2 = sH * sH;
    tH = head(3 + s2 + r);
    tL = r - (tH - 3 - s2);
    const pu = sH * tH;
    const pv = sL * tH + tL * ss;
    const pH = head(pu + pv);
    const pL = pv - (pH - pu);
    // log2(x) = n + dpH + zH + zL, with 2/(3 ln 2) = CP_H + CP_L
    const zH = CP_H * pH;
    const zL = CP_L * pH + pL * CP + dpL;
    t1 = head(zH + zL + dpH + n);
    t2 = zL - (t1 - n - dpH - zH);
  }
  // y·log2(x) = (y1 + y2)(t1 + t2) = pH + pL, y1 the head of y
  const y1 = head(y);
  const pL = (y - y1) * t1 + y * t2;
  let pH = y1 * t1;
  let z = pL + pH;
  const j = highWord(z);
  const i = lowWord(z);
  if (j >= 0x40900000) {
    // z ≥ 1024
    if (j !== 0x40900000 || i !== 0) return Infinity;
    if (pL + OVT > z - pH) return Infinity;
  } else if ((j & 0x7fffffff) >= 0x4090cc00) {
    // z ≤ −1075
    if (j >>> 0 !== 0xc090cc00 || i !== 0) return 0;
    if (pL <= z - pH) return 0;
  }
  // 2^(pH + pL) = 2^n·2^(pH − n + pL), n the nearest integer when |z| > ½
  const iz = j & 0x7fffffff;
  let k = (iz >> 20) - 0x3ff;
  let n = 0;
  if (iz > 0x3fe00000) {
    n = j + (0x00100000 >> (k + 1));
    k = ((n & 0x7fffffff) >> 20) - 0x3ff;
    const t = fromWords(n & ~(0x000fffff >> k), 0);
    n = ((n & 0x000fffff) | 0x00100000) >> (20 - k);
    if (j < 0) n = -n;
    pH -= t;
  }
  let t = head(pL + pH);
  const u = t * POW_LN2_H;
  const v = (pL - (t - pH)) * POW_LN2 + t * POW_LN2_L;
  z = u + v;
  const w = v - (z - u);
  t = z * z;
  const c = z - t * (P1 + t * (P2 + t * (P3 + t * (P4 + t * P5))));
  const r = (z * c) / (c - 2) - (w + z * w);
  z = 1 - (r - z);
  // z·2^n: exact while normal, one rounding when subnormal (as fdlibm's scalbn)
  if (n > 1023) return z * 2 * pow2(n - 1);
  if (n >= -1074) return z * pow2(n);
  return z * pow2(n + 1000) * TWO_M1000;
}

// sin and cos: reduce x to y = y0 + y1 in [−π/4, π/4] with x = n·π/2 + y, then the kernels below.
const INV_PIO2 = 6.36619772367581382433e-1;
const PIO2_1 = 1.57079632673412561417e0; // first 33 bits of π/2
const PIO2_1T = 6.07710050650619224932e-11; // π/2 − PIO2_1
const PIO2_2 = 6.07710050630396597660e-11; // next 33 bits
const PIO2_2T = 2.02226624879595063154e-21;
const PIO2_3 = 2.02226624871116645580e-21; // next 33 bits
const PIO2_3T = 8.47842766036889956997e-32;
const reduced = new Float64Array(2);

// Largest high word e_rem_pio2.c reduces with the Cody–Waite branch: |x| < 2^20·π/2, so n < 2^20 and n·PIO2_k is exact.
const MEDIUM_MAX_HIGH_WORD = 0x413921fb;

/** Refuses |x| ≥ 1647100 rad (high word above 0x413921fb, just over 2^20·π/2), where remPio2 would not be exact. */
function checkReducible(name: string, x: number, ix: number): void {
  if (ix > MEDIUM_MAX_HIGH_WORD) {
    throw new RangeError(`${name}(x): x = ${x} rad is outside |x| < 1647100 (about 2^20·π/2), where the argument reduction is exact`);
  }
}

/** Writes y0, y1 into `reduced` and returns n (fdlibm e_rem_pio2.c, the Cody–Waite branch for medium |x|). */
function remPio2(x: number): number {
  const hx = highWord(x);
  const ix = hx & 0x7fffffff;
  if (ix <= 0x3fe921fb) {
    reduced[0] = x;
    reduced[1] = 0;
    return 0;
  }
  if (ix < 0x4002d97c) {
    // |x| < 3π/4: n = ±1
    if (hx > 0) {
      let z = x - PIO2_1;
      if (ix !== 0x3ff921fb) {
        reduced[0] = z - PIO2_1T;
        reduced[1] = z - reduced[0] - PIO2_1T;
      } else {
        z -= PIO2_2;
        reduced[0] = z - PIO2_2T;
        reduced[1] = z - reduced[0] - PIO2_2T;
      }
      return 1;
    }
    let z = x + PIO2_1;
    if (ix !== 0x3ff921fb) {
      reduced[0] = z + PIO2_1T;
      reduced[1] = z - reduced[0] + PIO2_1T;
    } else {
      z += PIO2_2;
      reduced[0] = z + PIO2_2T;
      reduced[1] = z - reduced[0] + PIO2_2T;
    }
    return -1;
  }
  const t0 = Math.abs(x);
  const n = Math.trunc(t0 * INV_PIO2 + 0.5);
  const fn = n;
  let r = t0 - fn * PIO2_1;
  let w = fn * PIO2_1T;
  const j = ix >> 20;
  let y0 = r - w;
  let i = j - ((highWord(y0) >> 20) & 0x7ff);
  if (i > 16) {
    // cancellation: use the next 33 bits of π/2
    let t = r;
    w = fn * PIO2_2;
    r = t - w;
    w = fn * PIO2_2T - (t - r - w);
    y0 = r - w;
    i = j - ((highWord(y0) >> 20) & 0x7ff);
    if (i > 49) {
      t = r;
      w = fn * PIO2_3;
      r = t - w;
      w = fn * PIO2_3T - (t - r - w);
      y0 = r - w;
    }
  }
  const y1 = r - y0 - w;
  if (hx < 0) {
    reduced[0] = -y0;
    reduced[1] = -y1;
    return -n;
  }
  reduced[0] = y0;
  reduced[1] = y1;
  return n;
}

/** sin(x + y) on [−π/4, π/4], y the tail of x (fdlibm k_sin.c). */
function kernelSin(x: number, y: number, hasTail: boolean): number {
  if (Math.abs(x) < 7.450580596923828e-9) return x; // |x| < 2^−27
  const z = x * x;
  const v = z * x;
  const r = 8.33333333332248946124e-3 + z * (-1.98412698298579493134e-4 + z * (2.75573137070700676789e-6 + z * (-2.50507602534068634195e-8 + z * 1.58969099521155010221e-10)));
  if (!hasTail) return x + v * (-1.66666666666666324348e-1 + z * r);
  return x - (z * (0.5 * y - v * r) - y - v * -1.66666666666666324348e-1);
}

/** cos(x + y) on [−π/4, π/4] (fdlibm k_cos.c). */
function kernelCos(x: number, y: number): number {
  const ix = highWord(x) & 0x7fffffff;
  if (ix < 0x3e400000) return 1; // |x| < 2^−27
  const z = x * x;
  const r = z * (4.16666666666666019037e-2 + z * (-1.38888888888741095749e-3 + z * (2.48015872894767294178e-5 + z * (-2.75573143513906633035e-7 + z * (2.08757232129817482790e-9 + z * -1.13596475577881948265e-11)))));
  if (ix < 0x3fd33333) return 1 - (0.5 * z - (z * r - x * y)); // |x| < 0.3
  const qx = ix > 0x3fe90000 ? 0.28125 : fromWords(ix - 0x00200000, 0); // x/4
  const hz = 0.5 * z - qx;
  const a = 1 - qx;
  return a - (hz - (z * r - x * y));
}

/** Sine of x radians, |x| < 2^20·π/2 (fdlibm s_sin.c); NaN for ±∞ and NaN; RangeError for larger finite |x|. */
export function sin(x: number): number {
  if (!Number.isFinite(x)) return NaN;
  const ix = highWord(x) & 0x7fffffff;
  if (ix <= 0x3fe921fb) return kernelSin(x, 0, false);
  checkReducible('sin', x, ix);
  const n = remPio2(x) & 3;
  const y0 = reduced[0];
  const y1 = reduced[1];
  if (n === 0) return kernelSin(y0, y1, true);
  if (n === 1) return kernelCos(y0, y1);
  if (n === 2) return -kernelSin(y0, y1, true);
  return -kernelCos(y0, y1);
}

/** Cosine of x radians, |x| < 2^20·π/2 (fdlibm s_cos.c); NaN for ±∞ and NaN; RangeError for larger finite |x|. */
export function cos(x: number): number {
  if (!Number.isFinite(x)) return NaN;
  const ix = highWord(x) & 0x7fffffff;
  if (ix <= 0x3fe921fb) return kernelCos(x, 0);
  checkReducible('cos', x, ix);
  const n = remPio2(x) & 3;
  const y0 = reduced[0];
  const y1 = reduced[1];
  if (n === 0) return kernelCos(y0, y1);
  if (n === 1) return -kernelSin(y0, y1, true);
  if (n === 2) return -kernelCos(y0, y1);
  return kernelSin(y0, y1, true);
}
