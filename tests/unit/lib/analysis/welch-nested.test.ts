// welchNested makes three nested Welch averages in one walk over the segments; each must be the very bits its own
// welchPsd call gives (Welch, 1967, IEEE Trans. Audio Electroacoust. 15:70–73: the mean of the segments'
// periodograms), since the run's spectrum, its per-condition fits and the Spectrum screen's per-epoch spectra now
// come from it. Property-based over spans, groups, segment lengths and overlaps (fast-check).
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { welchNested, welchPsd } from '../../../../src/lib/analysis/welch';
import { seededNormal } from '../../../helpers/seeded-random';

const same = (a: Float64Array, b: Float64Array) => a.length === b.length && a.every((v, i) => Object.is(v, b[i]));

describe('welchNested', () => {
  it('gives welchPsd’s bits for all spans, each group and each span', () => {
    const normal = seededNormal(23);
    const samples = Float32Array.from({ length: 4000 }, () => 5 * normal());
    const config = fc.record({
      segment: fc.integer({ min: 2, max: 96 }),
      overlapFraction: fc.double({ min: 0, max: 0.9, noNaN: true }),
      spans: fc.array(fc.record({ start: fc.integer({ min: 0, max: 3800 }), length: fc.integer({ min: 1, max: 200 }), group: fc.integer({ min: 0, max: 2 }) }), { minLength: 1, maxLength: 12 }),
    });
    fc.assert(
      fc.property(config, ({ segment, overlapFraction, spans }) => {
        const overlap = Math.min(segment - 1, Math.floor(overlapFraction * segment));
        const flat = spans.flatMap((s) => [s.start, s.start + s.length]);
        const groups = 3;
        const out = welchNested(samples, 256, segment, overlap, flat, spans.map((s) => s.group), groups, true);
        const all = welchPsd(samples, 256, segment, overlap, flat);
        expect(same(out.all.psd, all.psd)).toBe(true);
        expect(out.all.segments).toBe(all.segments);
        expect(same(out.all.frequencies, all.frequencies)).toBe(true);
        for (let g = 0; g < groups; g++) {
          const own = welchPsd(samples, 256, segment, overlap, spans.filter((s) => s.group === g).flatMap((s) => [s.start, s.start + s.length]));
          expect(same(out.byGroup[g].psd, own.psd)).toBe(true);
          expect(out.byGroup[g].segments).toBe(own.segments);
        }
        const bins = all.frequencies.length;
        spans.forEach((s, i) => {
          const own = welchPsd(samples, 256, segment, overlap, [s.start, s.start + s.length]);
          expect(same(out.bySpan!.subarray(i * bins, (i + 1) * bins), own.psd)).toBe(true);
        });
      }),
      { numRuns: 200, seed: 11 },
    );
  });

  it('keeps no per-span rows unless asked', () => {
    const samples = Float32Array.from({ length: 512 }, (_, i) => Math.sin(i / 3));
    expect(welchNested(samples, 128, 64, 32, [0, 256, 256, 512], [0, 1], 2, false).bySpan).toBeNull();
  });
});
