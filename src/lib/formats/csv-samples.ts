/**
 * Sample matrices as CSV or TSV text: a header row of channel names, then one row per sample, values in µV
 * (or in a unit the caller converts with `microvoltFactor`). The sample rate is not in the file; the user gives it.
 */
import Papa from 'papaparse';
import type { Recording } from '../analysis/recording';
import { FormatError } from './format-error';

export interface CsvSamplesOptions {
  sampleRateHz: number;
  /** ',' or '\t'; by default a tab in the header row means TSV, otherwise CSV. */
  delimiter?: ',' | '\t' | ';';
  /** Multiplies every value to reach µV (e.g. 1e3 for a file in mV). Default 1. */
  microvoltFactor?: number;
}

const NUMBER = /^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/;

/**
 * Parses a CSV/TSV sample matrix into a Recording (µV, no events). Ragged rows, empty or non-numeric cells and
 * blank lines inside the data throw a FormatError naming the row (1-based line, header = row 1) and column.
 */
export function parseCsvSamples(text: string, options: CsvSamplesOptions): Recording {
  const rate = options.sampleRateHz;
  if (!(Number.isFinite(rate) && rate > 0)) throw new FormatError('sample rate', `must be a positive number of Hz, found ${rate}`);
  const factor = options.microvoltFactor ?? 1;
  if (!(Number.isFinite(factor) && factor !== 0)) throw new FormatError('microvoltFactor', `must be finite and non-zero, found ${factor}`);
  const body = text.charCodeAt(0) === 0xfeff ? text.slice(1) : text;
  const firstLine = body.slice(0, Math.max(0, body.search(/\r?\n|$/)));
  const delimiter = options.delimiter ?? (firstLine.includes('\t') ? '\t' : ',');

  let names: string[] | null = null;
  let columns: Float32Array[] = [];
  let length = 0;
  let row = 0;
  let blankRow = 0;
  let failure: FormatError | null = null;

  Papa.parse<string[]>(body, {
    delimiter,
    skipEmptyLines: false,
    step(results, parser) {
      row++;
      const cells = results.data;
      if (results.errors.length > 0) {
        failure = new FormatError('quoting', results.errors[0].message, { row });
        parser.abort();
        return;
      }
      const blank = cells.length === 0 || (cells.length === 1 && cells[0].trim() === '');
      if (blank) {
        if (blankRow === 0) blankRow = row;
        return;
      }
      if (blankRow !== 0) {
        failure = new FormatError('blank row', 'data rows follow it; remove it or the rows after it', { row: blankRow });
        parser.abort();
        return;
      }
      if (names === null) {
        names = cells.map((c) => c.trim());
        const seen = new Set<string>();
        for (let i = 0; i < names.length; i++) {
          const name = names[i];
          if (name === '') failure = new FormatError('header', 'has an empty channel name', { row, column: String(i + 1) });
          else if (seen.has(name)) failure = new FormatError('header', `names channel "${name}" twice`, { row, column: name });
          if (failure !== null) {
            parser.abort();
            return;
          }
          seen.add(name);
        }
        columns = names.map(() => new Float32Array(1024));
        return;
      }
      if (cells.length !== names.length) {
        failure = new FormatError('row length', `${cells.length} cells, but the header names ${names.length} channels`, {
          row,
          column: cells.length > names.length ? String(names.length + 1) : names[cells.length],
        });
        parser.abort();
        return;
      }
      if (length === columns[0].length) {
        columns = columns.map((c) => {
          const grown = new Float32Array(c.length * 2);
          grown.set(c);
          return grown;
        });
      }
      for (let i = 0; i < cells.length; i++) {
        const cell = cells[i].trim();
        if (!NUMBER.test(cell)) {
          failure = new FormatError('cell', `${JSON.stringify(cell)} is not a number`, { row, column: names[i] });
          parser.abort();
          return;
        }
        columns[i][length] = Number(cell) * factor;
      }
      length++;
    },
  });
  if (failure !== null) throw failure;
  if (names === null) throw new FormatError('header', 'is missing: the file is empty', { row: 1 });
  if (length === 0) throw new FormatError('rows', 'the file has a header but no samples', { row: 2 });
  return {
    sampleRateHz: rate,
    channelNames: names,
    data: columns.map((c) => c.slice(0, length)),
    events: [],
  };
}
