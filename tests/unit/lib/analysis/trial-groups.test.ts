// Trial-scope decibels take one full-resolution row per group of 2, 4 or 8 trials (src/lib/analysis/trial-products.ts,
// TrialGroups): the row must be the product of the trials' own power rows. Checked here against the slow, obvious
// computation: each trial's band-limited signal evaluated at every time point by the DFT sum written out with
// Math.cos/Math.sin (the definition of the DFT, common practice), its squared magnitude, multiplied over the group.
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { groupHalf, TrialGroups } from '../../../../src/lib/analysis/trial-products';
import { seededNormal } from '../../../helpers/seeded-random';

/** Σ_q band[q]·exp(−2πi·q·t/period), interleaved band, at t = 0 … points−1 (conj ỹ on a grid of `points`). */
function dftAt(band: Float64Array, period: number, points: number, step: number): Float64Array {
  const out = new Float64Array(2 * points);
  for (let j = 0; j < points; j++) {
    let re = 0;
    let im = 0;
    for (let q = 0; q < band.length / 2; q++) {
      const angle = (-2 * Math.PI * ((q * j * step) % period)) / period;
      re += band[2 * q] * Math.cos(angle) - band[2 * q + 1] * Math.sin(angle);
      im += band[2 * q] * Math.sin(angle) + band[2 * q + 1] * Math.cos(angle);
    }
    out[2 * j] = re;
    out[2 * j + 1] = im;
  }
  return out;
}

// (period N, coarse grid S, h): interpolated groups of 2, 4 and 8, and groups whose fine grid is every point.
const shapes: [number, number, number][] = [
  [512, 64, 1],
  [512, 64, 2],
  [512, 64, 4],
  [256, 64, 4],
  [128, 64, 2],
];

describe('TrialGroups rows against the DFT written out', () => {
  it('equal the product of the trials’ power rows for every group size and remainder, at any scale', () => {
    fc.assert(
      fc.property(
        fc.integer({ min: 1, max: 1_000_000 }),
        fc.constantFrom(...shapes),
        fc.integer({ min: 1, max: 8 }),
        // µV² powers from flat channels (1e−80) to huge ones (1e80): a plain product of eight would leave the doubles
        fc.constantFrom(1e-40, 1e-20, 1, 1e20, 1e40),
        (seed, [n, s, h], wanted, amplitude) => {
          const trials = Math.min(wanted, 2 * h);
          const m = s / 2;
          const length = Math.min(n, 200);
          const normal = seededNormal(seed);
          const groups = new TrialGroups(512);
          groups.begin(n, s, h);
          expect(groups.size).toBe(2 * h);
          const want = new Float64Array(length).fill(1);
          let peaks = 1;
          for (let k = 0; k < trials; k++) {
            const band = new Float64Array(2 * m); // the M band bins
            for (let i = 0; i < 2 * m; i++) band[i] = amplitude * normal();
            const rowK = dftAt(band, n, length, 1);
            let peak = 0;
            for (let t = 0; t < length; t++) {
              const p = rowK[2 * t] ** 2 + rowK[2 * t + 1] ** 2;
              want[t] *= p / amplitude ** 2;
              peak = Math.max(peak, p / amplitude ** 2);
            }
            peaks *= peak;
            // the scale comes from the baseline mean, or from the samples' peak when there is none (every other trial)
            const u = dftAt(band, s, s, 1);
            let meanPower = 0;
            for (let j = 0; j < s; j++) meanPower += (u[2 * j] ** 2 + u[2 * j + 1] ** 2) / s;
            groups.add(u, k % 2 === 0 ? meanPower : 0);
          }
          expect(groups.full()).toBe(trials === 2 * h);
          const row = new Float64Array(length);
          const shift = groups.row(row, length);
          // row·2^shift = Π P_k; compare in units of amplitude^(2·trials) so the reference stays in range.
          const unit = 2 * trials * Math.log2(amplitude); // log2 of amplitude^(2·trials)
          for (let t = 0; t < length; t++) {
            const got = row[t] * 2 ** (shift - unit);
            // rounding scales with the product of the rows' peaks, not with the (possibly tiny) value at t
            expect(Math.abs(got - want[t])).toBeLessThan(1e-10 * peaks);
          }
        },
      ),
      { numRuns: 60 },
    );
  });

  it('picks the group size that measured fastest per trial on the bench case’s shapes', () => {
    // (period N, coarse grid S = 2M): µs per trial and frequency for groups of 2 / 4 / 8 trials, measured on this
    // machine under load average 2.3 (scripts/bench.ts's case; from memory of that run, not a reference value):
    // 4096/256: 28.7 / 22.1 / 18.1; 4096/512: 37.3 / 30.1 / 33.8; 2048/256: 17.2 / 15.2 / 14.9 (a tie);
    // 2048/512: 22.1 / 22.6 / 20.2 (groups of 8 on every point); 2048/1024: 27.8 / 22.7 (groups of 4 on every point).
    expect(groupHalf(4096, 256)).toBe(4);
    expect(groupHalf(4096, 512)).toBe(2);
    expect([2, 4]).toContain(groupHalf(2048, 256));
    expect(groupHalf(2048, 512)).toBe(4);
    expect(groupHalf(2048, 1024)).toBe(2);
    for (const [n, s] of [[4096, 256], [2048, 1024], [512, 256], [256, 256], [8192, 4096]]) expect(groupHalf(n, s) * s).toBeLessThanOrEqual(n);
  });
});
