import { describe, it } from 'vitest';
import fc from 'fast-check';
import { copyRows, prepareTrialPower, renormalizeAverage, renormalizeTrials } from '../../../../src/lib/analysis/renormalize';
import type { BaselineMethod } from '../../../../src/lib/analysis/baseline';
import { assertClose } from '../../../helpers/assert-close';

// Reference: the normalization table of the analysis contract written out literally, one value at a time
// (B the mean, S the n − 1 standard deviation of the baseline points; dB per IEC 60027-3).
function literal(method: BaselineMethod, p: number, row: number[], first: number, last: number): number {
  const base = row.slice(first, last + 1);
  const b = base.reduce((a, x) => a + x, 0) / base.length;
  const s = Math.sqrt(base.reduce((a, x) => a + (x - b) ** 2, 0) / (base.length - 1));
  if (method === 'decibel') return 10 * Math.log10(p / b);
  if (method === 'percent-change') return (100 * (p - b)) / b;
  if (method === 'z-score') return (p - b) / s;
  return p / b;
}

const methods: BaselineMethod[] = ['decibel', 'percent-change', 'z-score', 'power-ratio'];
const power = fc.double({ min: 0.01, max: 1000, noNaN: true });

describe('renormalizeAverage', () => {
  it('equals the contract formula cell by cell, for every method (property)', () => {
    fc.assert(
      fc.property(fc.integer({ min: 1, max: 4 }), fc.integer({ min: 3, max: 12 }), fc.constantFrom(...methods), fc.infiniteStream(power), (nf, nt, method, stream) => {
        const values = Array.from({ length: nf * nt }, () => stream.next().value);
        const out = new Float64Array(nf * nt);
        const first = 0;
        const last = 2;
        renormalizeAverage(out, values, nt, first, last, method);
        for (let f = 0; f < nf; f++) {
          const row = values.slice(f * nt, (f + 1) * nt);
          for (let t = 0; t < nt; t++) assertClose(out[f * nt + t], literal(method, row[t], row, first, last), 1e-9 * Math.max(1, Math.abs(out[f * nt + t])));
        }
      }),
      { numRuns: 60 },
    );
  });
  it('a worked example: baseline [1, 3] (B = 2, S = √2), P = 4 gives 3.0103 dB, 100 %, 1.4142 z, 2 ×', () => {
    const row = [1, 3, 4];
    const expected = { decibel: 10 * Math.log10(2), 'percent-change': 100, 'z-score': 2 / Math.SQRT2, 'power-ratio': 2 };
    for (const m of methods) {
      const out = new Float64Array(3);
      renormalizeAverage(out, row, 3, 0, 1, m);
      assertClose(out[2], expected[m], 1e-12, m);
    }
  });
  it('moving the baseline over the same power array keeps matching the contract formula, and a changed array is noticed', () => {
    // The decibel path keeps 10·log10 P per array between calls; every baseline must still give the literal values.
    const nf = 3;
    const nt = 40;
    const values = Float64Array.from({ length: nf * nt }, (_, i) => 1 + ((i * 7919) % 97) / 7);
    const out = new Float64Array(nf * nt);
    const check = () => {
      for (const [first, last] of [[0, 4], [3, 9], [10, 10], [20, 39]]) {
        renormalizeAverage(out, values, nt, first, last, 'decibel');
        for (let f = 0; f < nf; f++) {
          const row = Array.from(values.slice(f * nt, (f + 1) * nt));
          for (let t = 0; t < nt; t++) assertClose(out[f * nt + t], literal('decibel', row[t], row, first, last), 1e-9, `f ${f}, t ${t}, baseline ${first}…${last}`);
        }
      }
    };
    check();
    // Written in place at a point the cache samples (the first and the last are always among them).
    values[0] = 50;
    values[nf * nt - 1] = 0.5;
    check();
  });
});

describe('renormalizeTrials', () => {
  it('equals the mean of per-trial normalized values by the literal formula (property)', () => {
    fc.assert(
      fc.property(fc.integer({ min: 1, max: 6 }), fc.integer({ min: 1, max: 3 }), fc.integer({ min: 4, max: 9 }), fc.constantFrom(...methods), fc.infiniteStream(power), (K, nf, nt, method, stream) => {
        const trials = Float32Array.from({ length: K * nf * nt }, () => stream.next().value);
        const tp = prepareTrialPower(trials, K, nf, nt);
        const out = new Float64Array(nf * nt);
        renormalizeTrials(out, tp, 1, 3, method);
        for (let f = 0; f < nf; f++) {
          for (let t = 0; t < nt; t++) {
            let sum = 0;
            for (let k = 0; k < K; k++) {
              const row = Array.from(trials.subarray((k * nf + f) * nt, (k * nf + f + 1) * nt));
              sum += literal(method, row[t], row, 1, 3);
            }
            const expected = sum / K;
            // A baseline of equal points has S = 0: undefined, and the answer must not be a number either.
            if (!Number.isFinite(expected)) {
              if (Number.isFinite(out[f * nt + t])) throw new Error(`expected a non-finite value, got ${out[f * nt + t]}`);
              continue;
            }
            assertClose(out[f * nt + t], expected, 1e-8 * Math.max(1, Math.abs(expected)), `${method} K=${K} f=${f} t=${t}`);
          }
        }
      }),
      { numRuns: 60 },
    );
  });

  it('gives the same map when two threads share it by frequency rows (copyRows for the upper ones) (property)', () => {
    fc.assert(
      fc.property(fc.integer({ min: 1, max: 6 }), fc.integer({ min: 2, max: 5 }), fc.integer({ min: 4, max: 9 }), fc.constantFrom(...methods), fc.infiniteStream(power), (K, nf, nt, method, stream) => {
        const trials = Float32Array.from({ length: K * nf * nt }, () => stream.next().value);
        const whole = new Float64Array(nf * nt);
        renormalizeTrials(whole, prepareTrialPower(trials, K, nf, nt), 1, 3, method);
        const h = Math.floor(nf / 2);
        const shared = new Float64Array(nf * nt).fill(NaN);
        renormalizeTrials(shared, prepareTrialPower(trials, K, nf, nt), 1, 3, method, 'time', [0, h]);
        const upper = new Float64Array((nf - h) * nt);
        renormalizeTrials(upper, prepareTrialPower(copyRows(trials, K, nf, nt, h, nf), K, nf - h, nt), 1, 3, method);
        shared.set(upper, h * nt);
        // The same operations in the same order: the same bits (a baseline of equal points gives NaN in both).
        for (let i = 0; i < whole.length; i++) if (!Object.is(whole[i], shared[i])) throw new Error(`${method} K=${K} nf=${nf} i=${i}: ${whole[i]} ≠ ${shared[i]}`);
      }),
      { numRuns: 60 },
    );
  });
});
