// Trial-scope decibels take one full-resolution row per group of trials (src/lib/analysis/trial-products.ts,
// TrialGroups): the row must be the product of the trials' own power rows. Checked here against the slow, obvious
// computation: each trial's band-limited signal evaluated at every time point by the DFT sum written out with
// Math.cos/Math.sin (the definition of the DFT, common practice), its squared magnitude, multiplied over the group.
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { baselineWeights, coarseBaseline, groupPlan, MAX_GROUP, TrialGroups, type GroupPlan } from '../../../../src/lib/analysis/trial-products';
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

// (period N, coarse grid S, band width, band offset in the S/2-bin window, plan): the whole window as the band (pairs,
// groups of 2, 4 and 8 on interpolated or every-point grids) and narrow bands off the window's start, where blocks
// of three or more trials share the coarse grid and groups need not be powers of two.
const shapes: [number, number, number, number, GroupPlan][] = [
  [512, 64, 32, 0, { block: 2, half: 1, blocks: 1 }],
  [512, 64, 32, 0, { block: 2, half: 2, blocks: 2 }],
  [512, 64, 32, 0, { block: 2, half: 4, blocks: 4 }],
  [256, 64, 32, 0, { block: 2, half: 4, blocks: 4 }],
  [128, 64, 32, 0, { block: 2, half: 2, blocks: 2 }],
  [512, 64, 20, 7, { block: 3, half: 2, blocks: 2 }],
  [512, 64, 12, 11, { block: 5, half: 4, blocks: 3 }],
  [256, 64, 9, 20, { block: 7, half: 4, blocks: 2 }],
  [512, 64, 20, 5, groupPlan(512, 64, 20)],
  [1024, 64, 17, 9, groupPlan(1024, 64, 17)],
];

describe('TrialGroups rows against the DFT written out', () => {
  it('equal the product of the trials’ power rows for every group size and remainder, band and offset, at any scale', () => {
    fc.assert(
      fc.property(
        fc.integer({ min: 1, max: 1_000_000 }),
        fc.constantFrom(...shapes),
        fc.integer({ min: 1, max: MAX_GROUP }),
        // µV² powers from flat channels (1e−80) to huge ones (1e80): a plain product of eight would leave the doubles
        fc.constantFrom(1e-40, 1e-20, 1, 1e20, 1e40),
        (seed, [n, s, width, offset, plan], wanted, amplitude) => {
          const size = plan.block * plan.blocks;
          const trials = Math.min(wanted, size);
          const m = s / 2;
          const length = Math.min(n, 200);
          const normal = seededNormal(seed);
          const groups = new TrialGroups(0, n, s);
          groups.begin(n, s, width, offset, plan);
          expect(groups.size).toBe(size);
          const want = new Float64Array(length).fill(1);
          let peaks = 1;
          for (let k = 0; k < trials; k++) {
            const band = new Float64Array(2 * m); // the M window bins; only the band's are non-zero
            for (let i = 2 * offset; i < 2 * (offset + width); i++) band[i] = amplitude * normal();
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
            if (k % 3 === 2) {
              // the baseline mean from the weights given to the group, as decompose.ts does it
              const a = baselineWeights(n, s, 3, 40);
              groups.useBaseline(a);
              const b = groups.add(u);
              // B = Σ_s a_s·|u[s]|², written out here
              let want = 0;
              for (let q = 0; q < s; q++) want += a[q] * (u[2 * q] ** 2 + u[2 * q + 1] ** 2);
              expect(Math.abs(b - want)).toBeLessThan(1e-12 * Math.abs(want));
              expect(coarseBaseline(u, a)).toBe(b);
            } else groups.add(u, k % 2 === 0 ? meanPower : 0);
          }
          expect(groups.full()).toBe(trials === size);
          expect(groups.pending).toBe(trials);
          const row = new Float64Array(length);
          // Π over the rows handed over (one for the group, or one per trial) of row·2^shift = Π P_k; compared in
          // units of amplitude^(2·trials) so the reference stays in range.
          const product = new Float64Array(length).fill(1);
          let shift = 0;
          groups.rows(row, length, (r, sh) => {
            for (let t = 0; t < length; t++) product[t] *= r[t];
            shift += sh;
          });
          expect(groups.pending).toBe(0);
          const unit = 2 * trials * Math.log2(amplitude); // log2 of amplitude^(2·trials)
          for (let t = 0; t < length; t++) {
            const got = product[t] * 2 ** (shift - unit);
            // rounding scales with the product of the rows' peaks, not with the (possibly tiny) value at t
            expect(Math.abs(got - want[t])).toBeLessThan(1e-10 * peaks);
          }
        },
      ),
      { numRuns: 80 },
    );
  });

  it('hands over each trial’s own row when the group’s row dips below what its rounding allows', () => {
    // Trials whose power spans 1e12 over the epoch (a strong edge, as a line-noise epoch cut with a rectangular
    // window has): a product of eight spans 1e96, far beyond a double's 1e-16 relative rounding, so the group's
    // interpolated row cannot hold its quiet stretch. Each trial's row must then come on its own, and each must
    // match the DFT written out to 1e-9 of its own value everywhere (relative, not against the peak).
    const n = 512;
    const s = 64;
    const width = 20;
    const offset = 6;
    const length = 300;
    const normal = seededNormal(77);
    const groups = new TrialGroups(1, n, s);
    groups.begin(n, s, width, offset, { block: 2, half: 4, blocks: 4 });
    const wanted: Float64Array[] = [];
    for (let k = 0; k < 8; k++) {
      // a narrow burst at t ≈ 40 riding on a floor 1e-6 below it (in amplitude): a Gaussian bump in time has a
      // Gaussian spectrum, centred in the band
      const band = new Float64Array(2 * (s / 2));
      for (let q = offset; q < offset + width; q++) {
        const d = q - (offset + width / 2);
        const bump = Math.exp(-(d * d) / 18);
        const angle = (2 * Math.PI * q * 40) / n;
        band[2 * q] = bump * Math.cos(angle) + 1e-6 * normal();
        band[2 * q + 1] = bump * Math.sin(angle) + 1e-6 * normal();
      }
      const rowK = dftAt(band, n, length, 1);
      wanted.push(Float64Array.from({ length }, (_, t) => rowK[2 * t] ** 2 + rowK[2 * t + 1] ** 2));
      groups.add(dftAt(band, s, s, 1), 0);
    }
    const row = new Float64Array(length);
    const taken: Float64Array[] = [];
    const shifts: number[] = [];
    groups.rows(row, length, (r, sh) => {
      taken.push(r.slice());
      shifts.push(sh);
    });
    expect(taken.length).toBe(8);
    for (let k = 0; k < 8; k++) {
      for (let t = 0; t < length; t++) expect(Math.abs(taken[k][t] * 2 ** shifts[k] - wanted[k][t])).toBeLessThan(1e-9 * wanted[k][t]);
    }
  });

  it('refuses a grid larger than its buffers instead of writing past them', () => {
    const groups = new TrialGroups(2, 256, 64);
    expect(() => groups.begin(512, 64, 20, 0)).toThrow(/do not fit/);
    expect(() => groups.begin(256, 128, 20, 0)).toThrow(/do not fit/);
    expect(() => groups.begin(256, 64, 20, 0, { block: 2, half: 8, blocks: 4 })).toThrow(/do not fit/);
    expect(() => groups.begin(256, 64, 20, 0)).not.toThrow();
    // and a group that is full takes no more trials until its rows are taken
    groups.begin(256, 64, 20, 0, { block: 2, half: 1, blocks: 1 });
    const u = new Float64Array(128).fill(1);
    groups.add(u, 1);
    groups.add(u, 1);
    expect(() => groups.add(u, 1)).toThrow(/full/);
  });

  it('plans groups whose products fit their grids, at most MAX_GROUP trials', () => {
    // A product of g trials with bands of w bins has g·(w−1)+1 bins (the convolution of g supports).
    fc.assert(
      fc.property(fc.integer({ min: 7, max: 13 }), fc.integer({ min: 1, max: 4 }), fc.double({ min: 0.05, max: 1, noNaN: true }), (bits, down, fraction) => {
        const n = 2 ** bits;
        const s = n / 2 ** down;
        const width = Math.max(1, Math.floor((fraction * s) / 2));
        const plan = groupPlan(n, s, width);
        const span = Math.max(1, width - 1);
        expect(plan.block).toBeGreaterThanOrEqual(1);
        expect(plan.block * plan.blocks).toBeLessThanOrEqual(MAX_GROUP);
        expect(plan.half * s).toBeLessThanOrEqual(n);
        if (width > 1) {
          expect(plan.block * span + 1).toBeLessThanOrEqual(s);
          expect(plan.block * plan.blocks * span + 1).toBeLessThanOrEqual(plan.half * s);
        }
      }),
      { numRuns: 300 },
    );
    // The bench case's widest band at 2048 points (width 371 of a 512-bin window): pairs, four to a group.
    expect(groupPlan(2048, 1024, 371)).toEqual({ block: 2, half: 2, blocks: 2 });
  });
});
