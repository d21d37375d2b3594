import { describe, expect, it } from 'vitest';
import { assertClose } from '../../../helpers/assert-close';
import { seededNormal } from '../../../helpers/seeded-random';
import { MapTestCancelledError } from '../../../../src/lib/statistics/errors';
import { runMapTest, runMapTestSync, stackSubjectMaps, type MapTestInput } from '../../../../src/lib/statistics/map-test';
import { oneSampleTest } from '../../../../src/lib/statistics/t-tests';
import reference from './reference.json';

/** n subjects' noise maps (F × T, unit normal), plus `effect` added over the rectangle [f0, f1) × [t0, t1). */
function cohort(n: number, nF: number, nT: number, seed: number, effect = 0, patch = [0, 0, 0, 0]): MapTestInput {
  const z = seededNormal(seed);
  const values = new Float64Array(n * nF * nT);
  for (let s = 0; s < n; s++) {
    for (let f = 0; f < nF; f++) {
      for (let t = 0; t < nT; t++) {
        const inside = f >= patch[0] && f < patch[1] && t >= patch[2] && t < patch[3];
        values[(s * nF + f) * nT + t] = z() + (inside ? effect : 0);
      }
    }
  }
  return { values, nSubjects: n, nFrequencies: nF, nTimes: nT };
}

describe('cluster-based permutation map test (Maris & Oostenveld, 2007)', () => {
  // Brute force in SciPy/NumPy (reference.py): ttest_1samp per point, scipy.ndimage.label (4-connectivity) for the
  // clusters, every one of the 2^7 sign flips evaluated; the flip order is the same (bit i flips subject i).
  it('matches a brute-force SciPy enumeration: t map, clusters, masses, p and the whole null distribution', () => {
    const ref = reference.mapTest;
    const r = runMapTestSync({ values: Float64Array.from(ref.values.flat()), nSubjects: 7, nFrequencies: ref.nFrequencies, nTimes: ref.nTimes });
    expect(r.exact).toBe(true);
    expect(r.permutations).toBe(128);
    assertClose(r.t, ref.t, 1e-10, 't');
    assertClose(r.nullDistribution, ref.null, 1e-10, 'null');
    const ours = [...r.clusters].sort((a, b) => Math.abs(b.mass) - Math.abs(a.mass));
    expect(ours.length).toBe(ref.clusters.length);
    ours.forEach((c, i) => {
      expect(c.sign).toBe(ref.clusters[i].sign);
      expect(c.size).toBe(ref.clusters[i].size);
      assertClose(c.mass, ref.clusters[i].mass, 1e-10, `cluster ${i} mass`);
      expect(c.p).toBe(ref.clusters[i].p);
    });
  });

  it('enumerates all 2^n flips for n ≤ 12, identity included, and gives the same p on every run', () => {
    const input = cohort(12, 12, 24, 5, 1.2, [3, 7, 5, 12]);
    const a = runMapTestSync(input);
    const b = runMapTestSync({ ...input, values: input.values.slice() });
    expect(a.exact).toBe(true);
    expect(a.seed).toBeNull();
    expect(a.permutations).toBe(4096);
    expect(a.nullDistribution.length).toBe(4096);
    expect(a.clusters.map((c) => c.p)).toEqual(b.clusters.map((c) => c.p));
    expect(Array.from(a.nullDistribution)).toEqual(Array.from(b.nullDistribution));
    // The identity (index 0) is the observed map, so its largest |mass| is the observed one exactly; the full
    // flip (index 4095) negates every x and has the same largest |mass|. Hence p ≥ 2/4096, a multiple of 1/4096.
    const largest = Math.max(...a.clusters.map((c) => Math.abs(c.mass)));
    expect(a.nullDistribution[0]).toBe(largest);
    expect(a.nullDistribution[4095]).toBe(largest);
    for (const c of a.clusters) {
      expect(c.p).toBeGreaterThanOrEqual(2 / 4096);
      expect(Number.isInteger(c.p * 4096)).toBe(true);
    }
  });

  it('reports the observed t map as the point-wise one-sample t, and clusters that hold only supra-threshold points', () => {
    const input = cohort(9, 6, 15, 8, 1.5, [1, 4, 3, 9]);
    const r = runMapTestSync(input);
    const P = 6 * 15;
    for (const p of [0, 17, 40, 89]) {
      const x = Array.from({ length: 9 }, (_, s) => input.values[s * P + p]);
      assertClose(r.t[p], oneSampleTest(x).t, 1e-10, `t at ${p}`);
    }
    for (const c of r.clusters) {
      let size = 0;
      let mass = 0;
      for (let p = 0; p < P; p++) {
        if (r.labels[p] !== c.label) continue;
        size++;
        mass += r.t[p];
        expect(Math.sign(r.t[p])).toBe(c.sign);
        expect(Math.abs(r.t[p])).toBeGreaterThan(r.threshold);
      }
      expect(size).toBe(c.size);
      assertClose(mass, c.mass, 1e-9);
    }
    // t(0.975; 8) = 2.306 (NIST/SEMATECH e-Handbook 1.3.6.7.2)
    expect(r.threshold.toFixed(3)).toBe('2.306');
  });

  it('finds a planted cluster with p < 0.01 and the right sign and extent', () => {
    const r = runMapTestSync(cohort(12, 20, 40, 31, -1.5, [6, 12, 10, 25]));
    const top = r.clusters[0];
    console.log(`planted cluster: sign ${top.sign}, mass ${top.mass.toFixed(1)}, size ${top.size}, p ${top.p}`);
    expect(top.p).toBeLessThan(0.01);
    expect(top.sign).toBe(-1);
    expect(top.frequencyRange[0]).toBeGreaterThanOrEqual(4);
    expect(top.frequencyRange[1]).toBeLessThanOrEqual(13);
    expect(top.timeRange[0]).toBeGreaterThanOrEqual(8);
    expect(top.timeRange[1]).toBeLessThanOrEqual(26);
  });

  it('keeps the smallest p above 0.05 in most of 50 seeded pure-noise cohorts', () => {
    let quiet = 0;
    for (let seed = 1000; seed < 1050; seed++) {
      const r = runMapTestSync(cohort(10, 10, 30, seed));
      const smallest = r.clusters.length === 0 ? 1 : r.clusters[0].p;
      if (smallest > 0.05) quiet++;
    }
    // Under the null the family-wise false-positive rate is at most 5 %: about 47 of 50 expected.
    console.log(`pure noise: smallest cluster p > 0.05 in ${quiet} of 50 cohorts`);
    expect(quiet).toBeGreaterThanOrEqual(43);
  });

  it('uses seeded random flips above 12 subjects: the identity first, the seed reported, the same seed the same p', () => {
    const input = { ...cohort(14, 6, 12, 77, 1.0, [1, 4, 2, 8]), randomFlips: 2000 };
    const a = runMapTestSync({ ...input, seed: 5 });
    const b = runMapTestSync({ ...input, seed: 5 });
    const c = runMapTestSync({ ...input, seed: 6 });
    expect(a.exact).toBe(false);
    expect(a.seed).toBe(5);
    expect(a.permutations).toBe(2000);
    expect(Array.from(a.nullDistribution)).toEqual(Array.from(b.nullDistribution));
    expect(Array.from(a.nullDistribution)).not.toEqual(Array.from(c.nullDistribution));
    expect(a.nullDistribution[0]).toBe(Math.max(0, ...a.clusters.map((k) => Math.abs(k.mass))));
    expect(runMapTestSync(cohort(13, 2, 3, 1)).permutations).toBe(10_000);
  });

  it('runs asynchronously with the same numbers, reports progress up to 1, and stops on abort', async () => {
    const input = cohort(12, 16, 32, 3, 1, [2, 6, 4, 12]);
    const fractions: number[] = [];
    const r = await runMapTest(input, { onProgress: (f) => fractions.push(f), progressSteps: 40 });
    expect(r.clusters).toEqual(runMapTestSync(input).clusters);
    expect(fractions.length).toBe(41); // 0, then after each of the 40 parts (the last reports 1)
    expect(fractions.at(-1)).toBe(1);
    expect(fractions.every((f, i) => i === 0 || f >= fractions[i - 1])).toBe(true);

    const controller = new AbortController();
    const seen: number[] = [];
    const run = runMapTest(input, {
      signal: controller.signal,
      onProgress: (f) => {
        seen.push(f);
        if (f > 0.2) controller.abort();
      },
    });
    await expect(run).rejects.toBeInstanceOf(MapTestCancelledError);
    expect(seen.at(-1)).toBeLessThan(1);
  });

  it('stacks subject maps as x − neutral or first − second, and refuses bad input naming where', () => {
    const stacked = stackSubjectMaps([[1, 2], [3, 4]], [[0, 1], [1, 1]], 2);
    expect(Array.from(stacked)).toEqual([1, 1, 2, 3]);
    expect(Array.from(stackSubjectMaps([[1, 2]], null, 2, 1))).toEqual([0, 1]);
    expect(() => stackSubjectMaps([[1, 2], [3]], null, 2)).toThrow(/subject 1 has a map of 1 points, expected 2/);
    const bad = cohort(3, 2, 2, 1);
    bad.values[4 + 3] = NaN;
    expect(() => runMapTestSync(bad)).toThrow(/subject 1 has a non-finite value at frequency 1, time 1/);
    expect(() => runMapTestSync(cohort(1, 2, 2, 1))).toThrow(/at least 2 subjects/);
    expect(() => runMapTestSync({ ...cohort(3, 2, 2, 1), alpha: 1.5 })).toThrow(/alpha must lie between 0 and 1/);
  });
});
