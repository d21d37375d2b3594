// Trial scope in decibels, (1/K)·Σ_k 10·log10(P_k/B_k) (analysis contract, "Baseline normalization"), is computed
// from a running product of the trials' power (decompose.ts, LogProduct) rather than a logarithm per trial. These
// checks hold it to the definition itself, written here with Math.log10, over many trials and over powers far
// outside what a product of plain doubles could hold.
import { describe, expect, it } from 'vitest';
import { decomposeChannel } from '../../../../src/lib/analysis/decompose';
import { gaussianSigmas } from '../../../../src/lib/analysis/wavelet';
import { assertClose } from '../../../helpers/assert-close';
import { seededNormal } from '../../../helpers/seeded-random';

const fs = 128;
const L = 257;
const freqs = Float64Array.of(5, 11, 27);
const sigmas = gaussianSigmas(freqs, { fixed: 5 });
const first = 40;
const last = 80;

function signal(trials: number, scale: number): { x: Float32Array; starts: Int32Array } {
  const normal = seededNormal(31);
  const starts = Int32Array.from({ length: trials }, (_, k) => 20 + k * (L + 3));
  const x = new Float32Array(starts[trials - 1] + L + 20);
  for (let i = 0; i < x.length; i++) x[i] = scale * normal();
  return { x, starts };
}

/** The definition, term by term: mean over trials of 10·log10(P_k(t)/B_k), B_k the mean of P_k over first … last. */
function byDefinition(single: Float32Array, trials: number): Float64Array {
  const size = freqs.length * L;
  const out = new Float64Array(size);
  for (let k = 0; k < trials; k++) {
    for (let f = 0; f < freqs.length; f++) {
      const off = (k * freqs.length + f) * L;
      let b = 0;
      for (let j = first; j <= last; j++) b += single[off + j];
      b /= last - first + 1;
      for (let j = 0; j < L; j++) out[f * L + j] += (10 * Math.log10(single[off + j] / b)) / trials;
    }
  }
  return out;
}

describe('trial-scope decibels from a running product', () => {
  for (const [what, scale] of [['µV-sized signals', 4], ['power near 1e30 per point (a product of 40 would overflow)', 1e15], ['power near 1e-30 per point (a product of 40 would underflow)', 1e-15]] as const) {
    it(`equal the definition over 40 trials, ${what}`, () => {
      const trials = 40;
      const { x, starts } = signal(trials, scale);
      const out = decomposeChannel({ samples: x, epochStarts: [starts], epochSamples: L, sampleRateHz: fs, frequencies: freqs, sigmas, baseline: { first, last, method: 'decibel', scope: 'trial' }, singleTrials: true });
      // single trials are stored in Float32 (relative rounding ~6e-8, so ~3e-7 dB per term)
      assertClose(out.normalized[0], byDefinition(out.singleTrials![0], trials), 1e-5, what);
    });
  }

  it('does not depend on the signal’s unit: scaling by 1e15 changes no value by more than 1e-6 dB', () => {
    // A decibel ratio is unit-free (common practice): P and B scale alike.
    const a = signal(30, 1);
    const b = signal(30, 1e15);
    const run = (s: { x: Float32Array; starts: Int32Array }) =>
      decomposeChannel({ samples: s.x, epochStarts: [s.starts], epochSamples: L, sampleRateHz: fs, frequencies: freqs, sigmas, baseline: { first, last, method: 'decibel', scope: 'trial' } }).normalized[0];
    assertClose(run(b), run(a), 1e-6, 'scaled');
  });

  it('keeps a near-flat channel (power near 1e-70 µV²) in range where rows are products of up to eight trials', () => {
    // 256 Hz, 1 s epochs, 5 cycles from 2 Hz: the rows at 2 and 4 Hz are products of 8 trials, at 14 Hz of 4
    // (trial-products.ts, groupHalf), so a plain product of the powers would be near 1e-560. Unit-free as above; the
    // scale 2^-116 (≈ 1.2e-35) is a power of two, so the Float32 samples keep their bits and only rounding differs.
    const f2 = Float64Array.of(2, 4, 14);
    const run = (scale: number) => {
      const normal = seededNormal(5);
      const starts = Int32Array.from({ length: 21 }, (_, k) => 10 + k * 260);
      const x = new Float32Array(starts[20] + 270);
      for (let i = 0; i < x.length; i++) x[i] = scale * normal();
      return decomposeChannel({ samples: x, epochStarts: [starts], epochSamples: 257, sampleRateHz: 256, frequencies: f2, sigmas: gaussianSigmas(f2, { fixed: 5 }), baseline: { first: 30, last: 90, method: 'decibel', scope: 'trial' } }).normalized[0];
    };
    const flat = run(2 ** -116);
    expect(flat.every(Number.isFinite)).toBe(true);
    assertClose(flat, run(1), 1e-9, 'near-flat');
  });
});
