// The overview's decimation to the pixel width (min/max per pixel column, the usual way to draw a long trace in
// few pixels; uPlot's linear path does the same, common practice). Property checks with fast-check.
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { envelope } from '../../../../src/components/source/overview-draw';

// Finite float32 sample values (µV), NaN and ±Infinity excluded: the EDF reader yields finite numbers only.
const samples = fc.float32Array({ noNaN: true, noDefaultInfinity: true, minLength: 1, maxLength: 3_000 });
const recordingAndWidth = samples.chain((x) => fc.record({ x: fc.constant(x), columns: fc.integer({ min: 1, max: x.length }) }));

describe('envelope (the overview trace decimated to its pixel width)', () => {
  it('puts each sample inside the min/max of the pixel column the drawing maps it to (x = i/n · width)', () => {
    fc.assert(
      fc.property(recordingAndWidth, ({ x, columns }) => {
        const { mins, maxs } = envelope(x, columns);
        expect(mins.length).toBe(columns);
        for (let i = 0; i < x.length; i++) {
          const c = Math.floor((i * columns) / x.length);
          if (!(mins[c] <= x[i] && x[i] <= maxs[c])) return false;
        }
        return true;
      }),
      { numRuns: 300 },
    );
  });

  it("keeps the extremes: each column's min and max are samples of that column, and the trace's own min and max survive", () => {
    fc.assert(
      fc.property(recordingAndWidth, ({ x, columns }) => {
        const { mins, maxs } = envelope(x, columns);
        const members: number[][] = Array.from({ length: columns }, () => []);
        for (let i = 0; i < x.length; i++) members[Math.floor((i * columns) / x.length)].push(x[i]);
        for (let c = 0; c < columns; c++) {
          // columns ≤ n, so every column holds at least one sample.
          if (members[c].length === 0) return false;
          if (mins[c] !== Math.min(...members[c]) || maxs[c] !== Math.max(...members[c])) return false;
        }
        let lo = Infinity;
        let hi = -Infinity;
        for (const v of x) {
          lo = Math.min(lo, v);
          hi = Math.max(hi, v);
        }
        return Math.min(...mins) === lo && Math.max(...maxs) === hi;
      }),
      { numRuns: 300 },
    );
  });

  it('makes one column per device pixel of a 1440-px-wide screen for a 300 s recording at 500 Hz, spike kept', () => {
    // The demo cohort's size (invented Harbour Lights scenario): 150,000 samples into 1,440 columns, ~104 per column.
    const x = new Float32Array(150_000);
    for (let i = 0; i < x.length; i++) x[i] = Math.sin(i / 7) * 20;
    x[98_765] = 500;
    const { mins, maxs } = envelope(x, 1_440);
    expect(maxs[Math.floor((98_765 * 1_440) / 150_000)]).toBe(500);
    expect(Math.min(...mins)).toBeGreaterThanOrEqual(-20);
  });
});
