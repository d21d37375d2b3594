import { describe, expect, it } from 'vitest';
import { FormatError, parseCsvSamples } from '../../../../src/lib/formats';
import { assertClose } from '../../../helpers/assert-close';

// CSV per RFC 4180 (a header row, comma-separated fields, CRLF or LF line ends) and TSV with tabs, common practice;
// the expected values below are the cells themselves, read by hand.

describe('parseCsvSamples', () => {
  it('reads a CSV matrix with a header row of channel names', () => {
    const rec = parseCsvSamples('Fz,Cz,Pz\n1,2,3\n-4.5,5e1,.25\n', { sampleRateHz: 250 });
    expect(rec.sampleRateHz).toBe(250);
    expect(rec.channelNames).toEqual(['Fz', 'Cz', 'Pz']);
    assertClose(rec.data[0], [1, -4.5]);
    assertClose(rec.data[1], [2, 50]);
    assertClose(rec.data[2], [3, 0.25]);
    expect(rec.events).toEqual([]);
  });

  it('detects TSV from the header, handles CRLF and a byte-order mark, and scales to µV', () => {
    const rec = parseCsvSamples('\ufeffO1\tO2\r\n0.001\t-0.002\r\n', { sampleRateHz: 100, microvoltFactor: 1e3 });
    expect(rec.channelNames).toEqual(['O1', 'O2']);
    assertClose(rec.data[0], [1], 1e-6);
    assertClose(rec.data[1], [-2], 1e-6);
  });

  it('grows past its initial buffer without losing samples', () => {
    const rows = Array.from({ length: 5000 }, (_, i) => `${i},${-i}`);
    const rec = parseCsvSamples(['A,B', ...rows].join('\n'), { sampleRateHz: 1 });
    expect(rec.data[0].length).toBe(5000);
    expect(rec.data[0][4999]).toBe(4999);
    expect(rec.data[1][1234]).toBe(-1234);
  });

  it('names the row and column of a ragged row', () => {
    const error = (() => {
      try {
        parseCsvSamples('Fz,Cz\n1,2\n3\n', { sampleRateHz: 1 });
      } catch (e) {
        return e as FormatError;
      }
    })();
    expect(error).toBeInstanceOf(FormatError);
    expect(error!.row).toBe(3);
    expect(error!.column).toBe('Cz');
    expect(error!.message).toBe('row length at row 3 column "Cz": 1 cells, but the header names 2 channels');
  });

  it('names the row and column of a non-numeric cell', () => {
    expect(() => parseCsvSamples('Fz,Cz\n1,2\n3,abc\n', { sampleRateHz: 1 })).toThrow(/at row 3 column "Cz": "abc" is not a number/);
    expect(() => parseCsvSamples('Fz,Cz\n1,\n', { sampleRateHz: 1 })).toThrow(/row 2 column "Cz": "" is not a number/);
  });

  it('refuses duplicate channel names, a blank line inside the data and a missing rate', () => {
    expect(() => parseCsvSamples('Fz,Fz\n1,2\n', { sampleRateHz: 1 })).toThrow(/names channel "Fz" twice/);
    expect(() => parseCsvSamples('Fz\n1\n\n2\n', { sampleRateHz: 1 })).toThrow(/blank row at row 3: data rows follow it/);
    expect(() => parseCsvSamples('Fz\n1\n', { sampleRateHz: 0 })).toThrow(/sample rate/);
    expect(() => parseCsvSamples('', { sampleRateHz: 1 })).toThrow(/header/);
    expect(() => parseCsvSamples('Fz\n', { sampleRateHz: 1 })).toThrow(/no samples/);
  });
});
