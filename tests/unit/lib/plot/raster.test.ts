import { describe, expect, it } from 'vitest';
import { interpolateCividis, interpolatePuOr } from 'd3-scale-chromatic';
import { divergingColormap, parseColour, sequentialColormap } from '../../../../src/lib/plot/colormap';
import { rasterizeMap, EDGE_HATCH, type ImageBuffer } from '../../../../src/lib/plot/raster';
import { edgeMask, edgeZones } from '../../../../src/lib/plot/edge-zone';
import { colourPosition, extentLimits, symmetricLimits } from '../../../../src/lib/plot/colour-scale';

function image(width: number, height: number): ImageBuffer {
  return { width, height, data: new Uint8ClampedArray(4 * width * height) };
}
function pixel(img: ImageBuffer, x: number, y: number): [number, number, number, number] {
  const p = 4 * (y * img.width + x);
  return [img.data[p], img.data[p + 1], img.data[p + 2], img.data[p + 3]];
}

// The reference colour of every check is d3-scale-chromatic's own interpolator (an independent library), parsed
// from the CSS string it returns; our lookup table must reproduce it at the cells' values.
describe('rasterizeMap colours cells from the colormap', () => {
  it('a 2 × 3 raw-power map on cividis, linear scale: each cell has interpolateCividis at its t (LUT nodes)', () => {
    const size = sequentialColormap().size;
    // Values chosen on LUT nodes k/(size − 1) of the domain [10, 20] so the colour is the interpolator's exactly.
    const ks = [0, 128, 511, 700, 900, size - 1];
    const values = Float64Array.from(ks, (k) => 10 + (10 * k) / (size - 1));
    const img = image(3, 2);
    rasterizeMap(img, { values, nFreqs: 2, nTimes: 3 }, { colormap: sequentialColormap(), scale: { domain: [10, 20], kind: 'linear' } });
    for (let f = 0; f < 2; f++) {
      for (let t = 0; t < 3; t++) {
        const expected = parseColour(interpolateCividis(ks[f * 3 + t] / (size - 1)));
        // Row 0 of the image is the highest frequency.
        expect(pixel(img, t, 1 - f)).toEqual([...expected, 255]);
      }
    }
  });

  it('values between LUT nodes land within 2 levels per channel of interpolatePuOr', () => {
    const values = Float64Array.from([-3, -1.234, 0, 0.5, 2.71, 3]);
    const img = image(6, 1);
    rasterizeMap(img, { values, nFreqs: 1, nTimes: 6 }, { colormap: divergingColormap(), scale: { domain: [-3, 3], kind: 'linear' } });
    values.forEach((v, t) => {
      const expected = parseColour(interpolatePuOr((v + 3) / 6));
      const got = pixel(img, t, 0);
      for (let c = 0; c < 3; c++) expect(Math.abs(got[c] - expected[c])).toBeLessThanOrEqual(2);
    });
    // The neutral value sits at the middle of the diverging scheme: near-white.
    expect(pixel(img, 2, 0).slice(0, 3)).toEqual(parseColour(interpolatePuOr(0.5)));
  });

  it('log colour scale: a value at the geometric middle of [1, 100] gets the colour at t = 0.5', () => {
    const img = image(1, 1);
    rasterizeMap(img, { values: [10], nFreqs: 1, nTimes: 1 }, { colormap: sequentialColormap(), scale: { domain: [1, 100], kind: 'log' } });
    const expected = parseColour(interpolateCividis(Math.round(0.5 * 1023) / 1023));
    expect(pixel(img, 0, 0).slice(0, 3)).toEqual(expected);
    expect(colourPosition({ domain: [1, 100], kind: 'log' }, 10)).toBeCloseTo(0.5, 12);
  });

  it('scales cells to pixels: a 2 × 2 map on 8 × 4 pixels fills 4 × 2 blocks', () => {
    const img = image(8, 4);
    rasterizeMap(img, { values: [0, 1, 2, 3], nFreqs: 2, nTimes: 2 }, { colormap: sequentialColormap(), scale: { domain: [0, 3], kind: 'linear' } });
    // Bottom-left block is cell (f 0, t 0) = value 0 → cividis(0); top-right is (f 1, t 1) = value 3 → cividis(1).
    expect(pixel(img, 0, 3).slice(0, 3)).toEqual(parseColour(interpolateCividis(0)));
    expect(pixel(img, 3, 2).slice(0, 3)).toEqual(parseColour(interpolateCividis(0)));
    expect(pixel(img, 7, 0).slice(0, 3)).toEqual(parseColour(interpolateCividis(1)));
  });

  it('draws non-finite values in the no-value colour, not as a colormap colour', () => {
    const img = image(2, 1);
    rasterizeMap(img, { values: [NaN, Infinity], nFreqs: 1, nTimes: 2 }, { colormap: sequentialColormap(), scale: { domain: [0, 1], kind: 'linear' }, missing: [1, 2, 3] });
    expect(pixel(img, 0, 0)).toEqual([1, 2, 3, 255]);
    expect(pixel(img, 1, 0)).toEqual([1, 2, 3, 255]);
  });
});

describe('edge zones are hatched, not hidden', () => {
  // 1 frequency, 10 times at 0.1 s (10 Hz), edge 0.25 s: t − t0 < 0.25 holds for t = 0, 0.1, 0.2 → 3 points each end.
  const zones = edgeZones([0.25], 10, 10);
  it('counts the points closer than edgeSeconds to either edge', () => {
    expect(Array.from(zones.left)).toEqual([3]);
    expect(Array.from(zones.right)).toEqual([3]);
    expect(Array.from(edgeMask(zones, 10))).toEqual([1, 1, 1, 0, 0, 0, 0, 1, 1, 1]);
  });
  it('blends hatch lines into edge cells only; the map colour still shows between lines', () => {
    const nt = 10;
    const img = image(nt * 6, 12);
    const values = new Float64Array(nt).fill(0.5);
    rasterizeMap(img, { values, nFreqs: 1, nTimes: nt }, { colormap: sequentialColormap(), scale: { domain: [0, 1], kind: 'linear' }, edges: zones });
    const base = parseColour(interpolateCividis(Math.round(0.5 * 1023) / 1023));
    const kinds = (x0: number, x1: number) => {
      let hatched = 0;
      let plain = 0;
      for (let y = 0; y < img.height; y++) {
        for (let x = x0; x < x1; x++) {
          const p = pixel(img, x, y);
          if (p[0] === base[0] && p[1] === base[1] && p[2] === base[2]) plain++;
          else hatched++;
        }
      }
      return { hatched, plain };
    };
    const left = kinds(0, 18); // cells 0..2
    const middle = kinds(18, 42); // cells 3..6
    const right = kinds(42, 60); // cells 7..9
    expect(left.hatched).toBeGreaterThan(0);
    expect(left.plain).toBeGreaterThan(0);
    expect(right.hatched).toBeGreaterThan(0);
    expect(middle.hatched).toBe(0);
    // A hatched pixel is the map colour moved toward ink by the hatch opacity.
    const x = 0;
    const y = 0; // (0 + 0) % spacing < width: on a line
    const expected = base.map((c, i) => Math.round(c + (EDGE_HATCH.rgb[i] - c) * EDGE_HATCH.alpha));
    pixel(img, x, y).slice(0, 3).forEach((c, i) => expect(Math.abs(c - expected[i])).toBeLessThanOrEqual(1));
  });
});

describe('edge hatching pixel by pixel', () => {
  it('gives the bytes of the per-pixel blend its documentation states, for any map size and edge zones (property)', async () => {
    const fc = (await import('fast-check')).default;
    fc.assert(
      fc.property(fc.integer({ min: 1, max: 7 }), fc.integer({ min: 2, max: 40 }), fc.integer({ min: 1, max: 90 }), fc.integer({ min: 1, max: 50 }), fc.integer({ min: 0, max: 1e6 }), (nf, nt, width, height, seed) => {
        const left = Int32Array.from({ length: nf }, (_, f) => (seed * (f + 3)) % (nt + 1));
        const right = Int32Array.from({ length: nf }, (_, f) => (seed * (f + 7)) % (nt + 1));
        const values = Float64Array.from({ length: nf * nt }, (_, i) => ((seed + i * 7919) % 101) / 100);
        const options = { colormap: sequentialColormap(), scale: { domain: [0, 1] as [number, number], kind: 'linear' as const } };
        const got = image(width, height);
        rasterizeMap(got, { values, nFreqs: nf, nTimes: nt }, { ...options, edges: { left, right } });
        // Reference: the plain map, then every pixel of an edge cell on a diagonal line ((x + y) mod spacing <
        // width) moved toward the hatch colour by its opacity, byte by byte (Uint8ClampedArray rounding).
        const want = image(width, height);
        rasterizeMap(want, { values, nFreqs: nf, nTimes: nt }, { ...options, edges: null });
        for (let y = 0; y < height; y++) {
          const f = nf - 1 - Math.min(nf - 1, Math.floor((y * nf) / height));
          for (let x = 0; x < width; x++) {
            const t = Math.min(nt - 1, Math.floor((x * nt) / width));
            if (t >= left[f] && t < nt - right[f]) continue;
            if ((x + y) % EDGE_HATCH.spacing >= EDGE_HATCH.width) continue;
            const p = 4 * (y * width + x);
            for (let i = 0; i < 3; i++) want.data[p + i] = want.data[p + i] + (EDGE_HATCH.rgb[i] - want.data[p + i]) * EDGE_HATCH.alpha;
          }
        }
        expect(Array.from(got.data)).toEqual(Array.from(want.data));
      }),
      { numRuns: 80 },
    );
  });
});

describe('colour limits', () => {
  it('symmetricLimits centres on the neutral value: dB around 0, ratio around 1', () => {
    expect(symmetricLimits([-1, 0.5, 4, -2], 0)).toEqual([-4, 4]);
    expect(symmetricLimits([0.5, 1.2, 1.1], 1)).toEqual([0.5, 1.5]);
  });
  it('symmetricLimits leaves masked (edge-zone) cells and infinities out', () => {
    expect(symmetricLimits([100, -2, 1, Infinity], 0, [1, 0, 0, 0])).toEqual([-2, 2]);
  });
  it('symmetricLimits keeps a usable scale for constant data', () => {
    expect(symmetricLimits([0, 0], 0)).toEqual([-1, 1]);
  });
  it('the limits are symmetric for any finite data (property)', async () => {
    const fc = await import('fast-check');
    fc.assert(
      fc.property(fc.array(fc.double({ min: -1e6, max: 1e6, noNaN: true }), { minLength: 1 }), fc.double({ min: -10, max: 10, noNaN: true }), (xs, n) => {
        const [lo, hi] = symmetricLimits(xs, n);
        return Math.abs(n - lo - (hi - n)) <= 1e-9 * Math.max(1, Math.abs(hi - lo)) && xs.every((v) => v >= lo - 1e-6 && v <= hi + 1e-6);
      }),
    );
  });
  it('extentLimits skips non-positive values on a log scale', () => {
    expect(extentLimits([0, -1, 2, 8], 'log')).toEqual([2, 8]);
    expect(extentLimits([0, -1, 2, 8], 'linear')).toEqual([-1, 8]);
  });
});
