// Tidemark's spectral kernels, in AssemblyScript (compiled to WebAssembly with 128-bit SIMD by
// `npm run build:kernels`; the bytes are committed as src/lib/analysis/kernels/spectral-kernels.wasm.ts and a unit
// test recompiles this file and compares). The same bytes run in Node and in the browser's workers, and WebAssembly
// arithmetic is IEEE 754 binary64 without fused multiply-adds, so a transform gives the same bits everywhere.
//
// Every pointer is a byte offset into the module's memory; the TypeScript side (kernels/runtime.ts) owns the
// layout. Complex numbers are interleaved (re, im) pairs of f64, one v128 each.
//
// Twiddle tables (filled by the TypeScript side with the portable cos/sin): for a transform of size n, entry k
// (k < n) holds w = exp(−2πi·k/n) as two v128s, (cos, cos) and (sin, −sin), so that
// a·w = a·(cos, cos) + swap(a)·(sin, −sin) with swap(a) = (im, re): one shuffle, two multiplies, one add.

@inline function swap(a: v128): v128 {
  return v128.shuffle<u8>(a, a, 8, 9, 10, 11, 12, 13, 14, 15, 0, 1, 2, 3, 4, 5, 6, 7);
}

@inline function twiddle(a: v128, wc: v128, ws: v128): v128 {
  return f64x2.add(f64x2.mul(a, wc), f64x2.mul(swap(a), ws));
}

// a·b for two variable complex numbers: (ar·br − ai·bi, ai·br + ar·bi).
@inline function cmul(a: v128, b: v128): v128 {
  const br = v128.shuffle<u8>(b, b, 0, 1, 2, 3, 4, 5, 6, 7, 0, 1, 2, 3, 4, 5, 6, 7);
  const bi = v128.shuffle<u8>(b, b, 8, 9, 10, 11, 12, 13, 14, 15, 8, 9, 10, 11, 12, 13, 14, 15);
  return f64x2.add(f64x2.mul(a, br), f64x2.mul(swap(a), f64x2.mul(bi, f64x2(-1.0, 1.0))));
}

// −i·a = (im, −re).
@inline function timesMinusI(a: v128): v128 {
  return f64x2.mul(swap(a), f64x2(1.0, -1.0));
}

@inline function conj(a: v128): v128 {
  return f64x2.mul(a, f64x2(1.0, -1.0));
}

@inline function norm(a: v128): f64 {
  const p = f64x2.mul(a, a);
  return f64x2.extract_lane(p, 0) + f64x2.extract_lane(p, 1);
}

/**
 * Forward DFT of n complex points (a power of two ≥ 2), X[k] = Σ_j x[j]·exp(−2πi·jk/n), in place at `data`;
 * `scratch` holds n more points. Stockham's self-sorting formulation (no bit reversal; e.g. Van Loan, 1992,
 * "Computational Frameworks for the Fast Fourier Transform", SIAM, §1.7): radix-4 passes, and one radix-2 pass
 * when n is not a power of four.
 */
export function fft(n: i32, data: usize, scratch: usize, table: usize): void {
  let src = data;
  let dst = scratch;
  let len = n;
  let s = 1;
  while (len >= 4) {
    const m = len >> 2;
    const os = <usize>s << 4;
    const sm = <usize>(s * m) << 4;
    for (let p = 0; p < m; p++) {
      // exp(−2πi·p/len) = table entry p·s of size n.
      const t1 = table + (<usize>(p * s) << 5);
      const t2 = table + (<usize>(2 * p * s) << 5);
      const t3 = table + (<usize>(3 * p * s) << 5);
      const w1c = v128.load(t1);
      const w1s = v128.load(t1, 16);
      const w2c = v128.load(t2);
      const w2s = v128.load(t2, 16);
      const w3c = v128.load(t3);
      const w3s = v128.load(t3, 16);
      let ia = src + (<usize>(s * p) << 4);
      let io = dst + (<usize>(4 * s * p) << 4);
      for (let q = 0; q < s; q++) {
        const a = v128.load(ia);
        const b = v128.load(ia + sm);
        const c = v128.load(ia + 2 * sm);
        const d = v128.load(ia + 3 * sm);
        const apc = f64x2.add(a, c);
        const amc = f64x2.sub(a, c);
        const bpd = f64x2.add(b, d);
        const jbmd = timesMinusI(f64x2.sub(b, d));
        v128.store(io, f64x2.add(apc, bpd));
        v128.store(io + os, twiddle(f64x2.add(amc, jbmd), w1c, w1s));
        v128.store(io + 2 * os, twiddle(f64x2.sub(apc, bpd), w2c, w2s));
        v128.store(io + 3 * os, twiddle(f64x2.sub(amc, jbmd), w3c, w3s));
        ia += 16;
        io += 16;
      }
    }
    const t = src;
    src = dst;
    dst = t;
    len = m;
    s <<= 2;
  }
  if (len == 2) {
    const sm = <usize>s << 4;
    for (let q = 0; q < s; q++) {
      const o = <usize>q << 4;
      const a = v128.load(src + o);
      const b = v128.load(src + sm + o);
      v128.store(dst + o, f64x2.add(a, b));
      v128.store(dst + sm + o, f64x2.sub(a, b));
    }
    const t = src;
    src = dst;
    dst = t;
  }
  if (src != data) memory.copy(data, src, <usize>n << 4);
}

/** The spectrum of n real samples at `real` (f64), all n complex bins into `data` (see `fft`). */
export function realFft(n: i32, real: usize, data: usize, scratch: usize, table: usize): void {
  for (let j = 0; j < n; j++) {
    const x = load<f64>(real + (<usize>j << 3));
    v128.store(data + (<usize>j << 4), f64x2(x, 0.0));
  }
  fft(n, data, scratch, table);
}

/** dst[q] = scale·src[q] for q < count (complex). */
export function scaleInto(dst: usize, src: usize, count: i32, scale: f64): void {
  const k = f64x2.splat(scale);
  for (let q = 0; q < count; q++) {
    const o = <usize>q << 4;
    v128.store(dst + o, f64x2.mul(k, v128.load(src + o)));
  }
}

/** product[q·h + rho] = src[q] (first) or ×= src[q], for q < count (complex): one residue of a finer grid. */
export function multiplyStrided(product: usize, rho: i32, h: i32, src: usize, count: i32, first: bool): void {
  const step = <usize>h << 4;
  let p = product + (<usize>rho << 4);
  if (first) {
    for (let q = 0; q < count; q++) {
      v128.store(p, v128.load(src + (<usize>q << 4)));
      p += step;
    }
  } else {
    for (let q = 0; q < count; q++) {
      v128.store(p, cmul(v128.load(p), v128.load(src + (<usize>q << 4))));
      p += step;
    }
  }
}

/** dst[q] = conj(src[q]) for q < count. */
export function conjugateInto(dst: usize, src: usize, count: i32): void {
  for (let q = 0; q < count; q++) {
    const o = <usize>q << 4;
    v128.store(dst + o, conj(v128.load(src + o)));
  }
}

/** dst[q] = conj(src[q])·w[q] for q < count, w complex at `twiddles` (plain interleaved pairs). */
export function conjugateTimes(dst: usize, src: usize, twiddles: usize, count: i32): void {
  for (let q = 0; q < count; q++) {
    const o = <usize>q << 4;
    v128.store(dst + o, cmul(conj(v128.load(src + o)), v128.load(twiddles + o)));
  }
}

/** row[r + q·step] = |src[q]|² (f64) for q < count. */
export function powerStrided(row: usize, r: i32, step: i32, src: usize, count: i32): void {
  let j = row + (<usize>r << 3);
  const jump = <usize>step << 3;
  for (let q = 0; q < count; q++) {
    store<f64>(j, norm(v128.load(src + (<usize>q << 4))));
    j += jump;
  }
}

/**
 * x = (scale·src[q])·phase[q]; dst[q] = x (first) or dst[q]·x, for q < count (complex; `phase` plain interleaved
 * pairs): one trial's samples, scaled and moved down in frequency, into a block's running product.
 */
export function multiplyPhased(dst: usize, src: usize, phase: usize, count: i32, scale: f64, first: bool): void {
  const k = f64x2.splat(scale);
  if (first) {
    for (let q = 0; q < count; q++) {
      const o = <usize>q << 4;
      v128.store(dst + o, cmul(f64x2.mul(k, v128.load(src + o)), v128.load(phase + o)));
    }
  } else {
    for (let q = 0; q < count; q++) {
      const o = <usize>q << 4;
      v128.store(dst + o, cmul(v128.load(dst + o), cmul(f64x2.mul(k, v128.load(src + o)), v128.load(phase + o))));
    }
  }
}

/** Σ_q weights[q]·|src[q]|² for q < count (`weights` f64): a trial's baseline mean from its coarse samples. */
export function weightedPower(src: usize, weights: usize, count: i32): f64 {
  let even = f64x2.splat(0.0);
  let odd = f64x2.splat(0.0);
  let q = 0;
  for (; q + 1 < count; q += 2) {
    const a = v128.load(src + (<usize>q << 4));
    const b = v128.load(src + (<usize>(q + 1) << 4));
    even = f64x2.add(even, f64x2.mul(f64x2.splat(load<f64>(weights + (<usize>q << 3))), f64x2.mul(a, a)));
    odd = f64x2.add(odd, f64x2.mul(f64x2.splat(load<f64>(weights + (<usize>(q + 1) << 3))), f64x2.mul(b, b)));
  }
  if (q < count) {
    const a = v128.load(src + (<usize>q << 4));
    even = f64x2.add(even, f64x2.mul(f64x2.splat(load<f64>(weights + (<usize>q << 3))), f64x2.mul(a, a)));
  }
  const sum = f64x2.add(even, odd);
  return f64x2.extract_lane(sum, 0) + f64x2.extract_lane(sum, 1);
}
