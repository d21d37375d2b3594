// The time × frequency matrix as CSV, read back with papaparse (an independent RFC 4180 parser) to the very same
// doubles: ECMAScript's Number::toString gives the shortest decimal that reads back as the same double.
import Papa from 'papaparse';
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { csvNumber, mapCsv } from '../../../../src/lib/formats/map-csv';

function readBack(csv: string) {
  const parsed = Papa.parse<string[]>(csv, { comments: '#', skipEmptyLines: true });
  expect(parsed.errors).toEqual([]);
  const [header, ...rows] = parsed.data;
  return { header, times: header.slice(1).map(Number), frequencies: rows.map((r) => Number(r[0])), cells: rows.map((r) => r.slice(1)) };
}

describe('mapCsv', () => {
  it('round-trips every double bit for bit: times in the header row, frequencies in the first column (fast-check)', () => {
    fc.assert(
      fc.property(fc.integer({ min: 1, max: 6 }), fc.integer({ min: 1, max: 9 }), fc.array(fc.double({ noNaN: true, noDefaultInfinity: true }), { minLength: 54, maxLength: 54 }), (nf, nt, pool) => {
        const times = Array.from({ length: nt }, (_, j) => -0.2 + j * 0.004);
        const frequencies = Array.from({ length: nf }, (_, i) => 3 * Math.pow(1.37, i));
        const values = Array.from({ length: nf * nt }, (_, k) => pool[k]);
        const back = readBack(mapCsv({ quantity: 'test', unit: 'dB', times, frequencies, values }));
        expect(back.times).toEqual(times);
        expect(back.frequencies).toEqual(frequencies);
        for (let f = 0; f < nf; f++) for (let t = 0; t < nt; t++) expect(Object.is(Number(back.cells[f][t]), values[f * nt + t]) || (values[f * nt + t] === 0 && Number(back.cells[f][t]) === 0)).toBe(true);
      }),
      { numRuns: 200 },
    );
  });

  it('keeps values at the edge of double precision exactly (0.1 + 0.2, 5e-324, 1.7976931348623157e308)', () => {
    const values = [0.1 + 0.2, 5e-324, 1.7976931348623157e308, -1 / 3];
    const back = readBack(mapCsv({ quantity: 'q', unit: 'µV²', times: [0, 0.5], frequencies: [4, 8], values }));
    expect(back.cells.flat().map(Number)).toEqual(values);
    expect(back.cells[0][0]).toBe('0.30000000000000004');
  });

  it('writes no value as an empty cell and names quantity, units and notes in comment lines', () => {
    const csv = mapCsv({ quantity: 'normalized power, bell, Cz', unit: 'dB', times: [0, 1], frequencies: [10], values: [NaN, Infinity], notes: ['baseline -0.5 to -0.1 s\nsecond line'] });
    const lines = csv.split('\n');
    expect(lines[0]).toBe('# Tidemark time-frequency matrix: normalized power, bell, Cz');
    expect(lines[1]).toMatch(/^# values in dB; rows: frequency \(Hz\)/);
    expect(lines).toContain('# baseline -0.5 to -0.1 s second line');
    expect(lines).toContain('frequency_hz\\time_s,0,1');
    expect(lines).toContain('10,,');
    expect(csvNumber(-0)).toBe('0');
  });

  it('refuses a matrix whose size does not match its axes, naming both', () => {
    expect(() => mapCsv({ quantity: 'q', unit: 'dB', times: [0, 1, 2], frequencies: [4, 8], values: [1, 2, 3] })).toThrow(/2 frequencies × 3 times need 6 values, got 3/);
  });
});
