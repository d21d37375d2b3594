// The committed WebAssembly (src/lib/analysis/kernels/spectral-kernels.wasm.ts) is what kernels/spectral.ts compiles
// to: recompiled here with the same flags (scripts/build-kernels.mjs) and compared byte for byte, so the source a
// reviewer reads is the code that runs.
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { compileKernels, moduleText } from '../../../../scripts/build-kernels.mjs';
import { SPECTRAL_KERNELS_BASE64 } from '../../../../src/lib/analysis/kernels/spectral-kernels.wasm';
import { allocate, allocatedBytes, heap, spectralKernels } from '../../../../src/lib/analysis/kernels/runtime';

describe('spectral kernels', () => {
  it('the committed bytes are the compiled source', async () => {
    const bytes: Buffer = await compileKernels();
    const committed = readFileSync(new URL('../../../../src/lib/analysis/kernels/spectral-kernels.wasm.ts', import.meta.url), 'utf8');
    expect(committed).toBe(moduleText(bytes));
    expect(Buffer.from(SPECTRAL_KERNELS_BASE64, 'base64').equals(bytes)).toBe(true);
  }, 60_000);

  it('stays small enough for a synchronous compile on a page main thread', () => {
    // Chromium refuses synchronous WebAssembly compiles above 4 KB on the main thread (from memory of Chromium's
    // error text "WebAssembly.Compile is disallowed on the main thread, if the buffer size is larger than 4KB").
    expect(Buffer.from(SPECTRAL_KERNELS_BASE64, 'base64').length).toBeLessThanOrEqual(4096);
  });

  it('imports nothing and grows its memory for blocks beyond the first pages', () => {
    const module = new WebAssembly.Module(Buffer.from(SPECTRAL_KERNELS_BASE64, 'base64'));
    expect(WebAssembly.Module.imports(module)).toEqual([]);
    const before = spectralKernels().memory.buffer.byteLength;
    const block = allocate(before + 1000);
    expect(spectralKernels().memory.buffer.byteLength).toBeGreaterThanOrEqual(block + before + 1000);
    heap()[(block + before) / 8] = 1.5;
    expect(heap()[(block + before) / 8]).toBe(1.5);
  });

  it('multiplies, conjugates and squares complex arrays as the formulas say', () => {
    // Complex arithmetic by the textbook formulas, written out here in plain JavaScript.
    const k = spectralKernels();
    const n = 5;
    const a = allocate(16 * n);
    const b = allocate(16 * n);
    const w = allocate(16 * n);
    const row = allocate(8 * 3 * n);
    const av = [1, 2, -3, 0.5, 0, -1, 2.5, 2.5, -4, 1e-3];
    const bv = [0.5, -1, 2, 2, -1, 0, 3, -0.25, 1e3, 1];
    const wv = [0, 1, 1, 0, -1, 0, 0.6, 0.8, 2, -2];
    heap().set(av, a / 8);
    heap().set(bv, b / 8);
    heap().set(wv, w / 8);
    const mul = (x: number[], y: number[], q: number) => [x[2 * q] * y[2 * q] - x[2 * q + 1] * y[2 * q + 1], x[2 * q] * y[2 * q + 1] + x[2 * q + 1] * y[2 * q]];
    // dst·((scale·src)·phase), the phase here the plain pairs at w
    k.multiplyPhased(a, b, w, n, 0.25, false);
    const scaled = bv.map((v) => 0.25 * v);
    const phased = Array.from({ length: n }, (_, q) => mul(scaled, wv, q)).flat();
    for (let q = 0; q < n; q++) expect(Array.from(heap().subarray(a / 8 + 2 * q, a / 8 + 2 * q + 2))).toEqual(mul(av, phased, q));
    k.multiplyPhased(a, b, w, n, 0.25, true);
    for (let q = 0; q < n; q++) expect(Array.from(heap().subarray(a / 8 + 2 * q, a / 8 + 2 * q + 2))).toEqual(mul(scaled, wv, q));
    k.conjugateTimes(a, b, w, n);
    const conjB = bv.map((v, i) => (i % 2 === 1 ? -v : v));
    for (let q = 0; q < n; q++) expect(Array.from(heap().subarray(a / 8 + 2 * q, a / 8 + 2 * q + 2))).toEqual(mul(conjB, wv, q));
    // Σ a_q·|b_q|², written out (the kernel sums in another order: equal to rounding)
    const weights = allocate(8 * n);
    const av2 = [0.5, -2, 3, 1e-3, 7];
    heap().set(av2, weights / 8);
    const sum = av2.reduce((t, x, q) => t + x * (bv[2 * q] ** 2 + bv[2 * q + 1] ** 2), 0);
    expect(Math.abs(k.weightedPower(b, weights, n) - sum)).toBeLessThan(1e-15 * Math.abs(sum) * 8);
    k.powerStrided(row, 1, 3, b, n);
    for (let q = 0; q < n; q++) expect(heap()[row / 8 + 1 + 3 * q]).toBe(bv[2 * q] ** 2 + bv[2 * q + 1] ** 2);
  });
});

describe('kernel memory across decompositions', () => {
  it('a second trial-scope decomposition of the same shape allocates nothing more', async () => {
    const { decomposeChannel } = await import('../../../../src/lib/analysis/decompose');
    const fs = 256;
    const samples = new Float32Array(40 * fs).map((_, i) => Math.sin(i * 0.37) + Math.cos(i * 0.011));
    const job = {
      samples,
      epochStarts: [Int32Array.from({ length: 12 }, (_, k) => 100 + k * 700)],
      epochSamples: 513,
      sampleRateHz: fs,
      frequencies: Float64Array.from([4, 8, 16, 32]),
      sigmas: Float64Array.from([4, 8, 16, 32].map((f) => 5 / (2 * Math.PI * f))),
      baseline: { first: 20, last: 120, method: 'decibel' as const, scope: 'trial' as const },
    };
    decomposeChannel(job);
    const after = allocatedBytes();
    for (let i = 0; i < 5; i++) decomposeChannel({ ...job, samples: samples.map((x) => x * (i + 2)) });
    expect(allocatedBytes()).toBe(after);
  });
});
