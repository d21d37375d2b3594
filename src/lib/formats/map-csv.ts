/** One time-frequency map as it is shown: values in rows of frequency, `values[f·times.length + t]`. */
export interface MapMatrix {
  /** What the numbers are, e.g. "raw power, condition bell, channel Cz". */
  quantity: string;
  /** Unit of the values, e.g. "µV²", "dB", "ITPC (0 to 1)". */
  unit: string;
  times: ArrayLike<number>;
  frequencies: ArrayLike<number>;
  values: ArrayLike<number>;
  /** More comment lines (baseline, method, recipe hash …), written after the fixed ones. */
  notes?: readonly string[];
}

/**
 * The shortest decimal that reads back as the same double (ECMAScript Number::toString, "round-trip" form), or an
 * empty cell for NaN and ±Infinity (no value: e.g. a z-score over a one-sample baseline).
 */
export function csvNumber(x: number): string {
  return Number.isFinite(x) ? String(x) : '';
}

/** A comment line never breaks the file: line breaks inside a note become spaces. */
const comment = (s: string) => `# ${s.replace(/[\r\n]+/g, ' ')}`;

/**
 * The full time × frequency matrix as CSV (RFC 4180 records, CRLF-free `\n` lines): `#` comment lines with the
 * quantity, units and notes; a header row whose first cell names both axes and whose other cells are the times (s);
 * then one row per frequency, lowest first, its frequency (Hz) in the first column. Every number is written at
 * full double precision (shortest round-trip form); cells with no value are empty. Edge-zone cells are included
 * as computed (the comment says so), so the file is the whole map, not the part the colour limits use.
 */
export function mapCsv(map: MapMatrix): string {
  const nt = map.times.length;
  const nf = map.frequencies.length;
  if (map.values.length !== nf * nt) throw new Error(`mapCsv: ${nf} frequencies × ${nt} times need ${nf * nt} values, got ${map.values.length}`);
  const lines: string[] = [
    comment(`Tidemark time-frequency matrix: ${map.quantity}`),
    comment(`values in ${map.unit}; rows: frequency (Hz), lowest first; columns: time (s) from the event; empty cell: no value`),
    comment('edge-zone cells (the wavelet reaches past the epoch) are included as computed'),
    ...(map.notes ?? []).map(comment),
    comment('Research output, not a medical device: not for diagnosis or treatment.'),
  ];
  const header = ['frequency_hz\\time_s'];
  for (let t = 0; t < nt; t++) header.push(csvNumber(map.times[t]));
  lines.push(header.join(','));
  for (let f = 0; f < nf; f++) {
    const row = new Array<string>(nt + 1);
    row[0] = csvNumber(map.frequencies[f]);
    const off = f * nt;
    for (let t = 0; t < nt; t++) row[t + 1] = csvNumber(map.values[off + t]);
    lines.push(row.join(','));
  }
  return lines.join('\n') + '\n';
}
