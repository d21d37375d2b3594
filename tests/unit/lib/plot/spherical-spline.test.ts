import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { evaluateSphericalSpline, fitSphericalSpline, legendreSeries, splineKernel, type Direction } from '../../../../src/lib/plot/spherical-spline';
import { scalpDirection, directionAtDisc, scalpPosition } from '../../../../src/lib/plot/scalp-positions';
import { assertClose } from '../../../helpers/assert-close';

const CAP = ['Fp1', 'Fp2', 'F7', 'F3', 'Fz', 'F4', 'F8', 'FC5', 'FC1', 'FC2', 'FC6', 'T7', 'C3', 'Cz', 'C4', 'T8', 'TP9', 'CP5', 'CP1', 'CP2', 'CP6', 'TP10', 'P7', 'P3', 'Pz', 'P4', 'P8', 'PO9', 'O1', 'Oz', 'O2', 'PO10'];
const dirs = CAP.map((c) => scalpDirection(c)!);

describe('legendreSeries', () => {
  it('matches the closed forms P2 = (3x² − 1)/2 and P3 = (5x³ − 3x)/2 (Abramowitz & Stegun 1964, Table 22.9)', () => {
    fc.assert(
      fc.property(fc.double({ min: -1, max: 1, noNaN: true }), (x) => {
        const p = legendreSeries(x, new Float64Array(4));
        assertClose([p[0], p[1], p[2], p[3]], [1, x, (3 * x * x - 1) / 2, (5 * x ** 3 - 3 * x) / 2], 1e-12);
      }),
    );
  });
  it('matches scipy.special.eval_legendre (SciPy 1.17.1, run once here): P7(0.3), P50(0.9)', () => {
    assertClose(legendreSeries(0.3, new Float64Array(8))[7], -0.2240729812499999, 1e-13);
    assertClose(legendreSeries(0.9, new Float64Array(51))[50], -0.1700376599438368, 1e-12);
  });
});

describe('splineKernel (Perrin et al., 1989, g_m with m = 4, 50 terms)', () => {
  it('matches the series summed with scipy.special.eval_legendre (SciPy 1.17.1, run once here)', () => {
    // python: sum((2n+1)/(n**4 (n+1)**4) * eval_legendre(n, x) for n in 1..50) / (4π)
    const expected: [number, number][] = [[1, 0.015260761697061115], [0.5, 0.007409185638567885], [0, -0.00015191969905051385], [-0.3, -0.004578004849820519], [-1, -0.01463698615411342]];
    for (const [x, g] of expected) assertClose(splineKernel(x), g, 1e-15, `x = ${x}`);
  });
});

describe('fitSphericalSpline', () => {
  it('passes exactly through every electrode value (the interpolation condition of Perrin et al., 1989, eq. 2)', () => {
    fc.assert(
      fc.property(fc.array(fc.double({ min: -50, max: 50, noNaN: true }), { minLength: CAP.length, maxLength: CAP.length }), (values) => {
        const s = fitSphericalSpline(dirs, values);
        dirs.forEach((d, i) => assertClose(evaluateSphericalSpline(s, d), values[i], 1e-7 * Math.max(1, Math.abs(values[i])), CAP[i]));
      }),
      { numRuns: 20 },
    );
  });
  it('keeps a constant field constant everywhere on the head (weights 0, constant term = the value)', () => {
    const s = fitSphericalSpline(dirs, CAP.map(() => 3.25));
    for (const w of s.weights) assertClose(w, 0, 1e-6);
    for (const [x, y] of [[0, 0], [0.3, -0.7], [-1.1, 0.2], [0.9, 0.9]]) assertClose(evaluateSphericalSpline(s, directionAtDisc(x, y)), 3.25, 1e-9);
  });
  it('lies between the extremes for a smooth field sampled by the cap (a sanity bound, not a theorem)', () => {
    // A field linear in the head's front–back axis: the spline should stay near it between electrodes.
    const s = fitSphericalSpline(dirs, dirs.map((d) => d[1]));
    const mid = directionAtDisc(0, 0.25);
    assertClose(evaluateSphericalSpline(s, mid), mid[1], 0.02);
  });
  it('gives the one value everywhere for one electrode, and refuses two electrodes at one place', () => {
    const one = fitSphericalSpline([dirs[0]], [7]);
    assertClose(evaluateSphericalSpline(one, dirs[5]), 7, 1e-12);
    expect(() => fitSphericalSpline([dirs[0], dirs[0] as Direction], [1, 2])).toThrow(/share one position/);
  });
});

describe('directionAtDisc', () => {
  it('inverts the projection of scalpPosition for every electrode of the cap', () => {
    for (const c of CAP) {
      const p = scalpPosition(c)!;
      assertClose(directionAtDisc(p.x, p.y), scalpDirection(c)!, 1e-12, c);
    }
  });
});
