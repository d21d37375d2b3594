/**
 * Our EDF+ writer (demo cohort and tests), following the byte layout of Kemp et al., 1992 (EDF) and Kemp &
 * Olivan, 2003 (EDF+): a 256-byte fixed header, 256 bytes per signal, then data records of little-endian int16
 * samples, with an "EDF Annotations" signal carrying one timekeeping TAL per record plus the events.
 */
import { EDF_ANNOTATIONS_LABEL } from './edf-header';
import { FormatError } from './format-error';

export interface EdfWriteSignal {
  label: string;
  transducer?: string;
  physicalDimension: string;
  physicalMin: number;
  physicalMax: number;
  /** Defaults −32768 / 32767. */
  digitalMin?: number;
  digitalMax?: number;
  prefiltering?: string;
  samplesPerRecord: number;
  /** Physical values; length must be samplesPerRecord × record count. Clipped to the physical range. */
  samples: ArrayLike<number>;
}

export interface EdfWriteAnnotation {
  /** Seconds after the header start (file time). */
  onsetSeconds: number;
  durationSeconds?: number | null;
  /** One or more texts sharing this onset and duration (one TAL). */
  texts: string[];
}

export interface EdfWriteInput {
  /** 'EDF+C' (default), 'EDF+D' (needs recordStartSeconds) or 'EDF' (plain, no annotation signal). */
  variant?: 'EDF' | 'EDF+C' | 'EDF+D';
  patientIdentification?: string;
  recordingIdentification?: string;
  start: { year: number; month: number; day: number; hour: number; minute: number; second: number };
  recordDurationSeconds: number;
  signals: EdfWriteSignal[];
  annotations?: EdfWriteAnnotation[];
  /** Start of each record in file time; default r × duration. Required spacing ≥ one duration. */
  recordStartSeconds?: readonly number[];
  /** Bytes of the annotation signal per record; by default just enough for the fullest record. */
  annotationBytesPerRecord?: number;
}

const MONTHS = ['JAN', 'FEB', 'MAR', 'APR', 'MAY', 'JUN', 'JUL', 'AUG', 'SEP', 'OCT', 'NOV', 'DEC'];
const utf8 = new TextEncoder();

function field(text: string, width: number, name: string): string {
  for (let i = 0; i < text.length; i++) {
    const c = text.charCodeAt(i);
    if (c < 32 || c > 126) throw new FormatError(name, `has a character outside printable ASCII (code ${c})`);
  }
  if (text.length > width) throw new FormatError(name, `${JSON.stringify(text)} is longer than its ${width} bytes`);
  return text.padEnd(width, ' ');
}

/**
 * Shortest decimal text of `value` in at most `width` characters (EDF number fields are 8 ASCII bytes).
 * Returns the text; the reader will see exactly `Number(text)`, which the writer then uses for scaling.
 */
export function formatEdfNumber(value: number, width = 8, name = 'number'): string {
  if (!Number.isFinite(value)) throw new FormatError(name, `${value} is not finite`);
  const plain = String(value);
  if (plain.length <= width && !/e/i.test(plain)) return plain;
  for (let digits = width; digits >= 0; digits--) {
    const s = value.toFixed(digits).replace(/(\.\d*?)0+$/, '$1').replace(/\.$/, '');
    if (s.length <= width) return s;
  }
  throw new FormatError(name, `${value} does not fit into ${width} characters`);
}

/** Decimal text of a TAL time: no exponent, up to 9 decimals, trailing zeros removed. */
function formatTalSeconds(seconds: number): string {
  const plain = String(Math.abs(seconds));
  const text = /e/i.test(plain) ? Math.abs(seconds).toFixed(9).replace(/\.?0+$/, '') : plain;
  return text;
}

function encodeTal(onsetSeconds: number, durationSeconds: number | null | undefined, texts: string[]): Uint8Array {
  let head = (onsetSeconds < 0 ? '-' : '+') + formatTalSeconds(onsetSeconds);
  if (durationSeconds !== null && durationSeconds !== undefined) {
    if (!(durationSeconds >= 0)) throw new FormatError('annotation duration', `${durationSeconds} must be ≥ 0`);
    head += '\x15' + formatTalSeconds(durationSeconds);
  }
  const parts: Uint8Array[] = [utf8.encode(head + '\x14')];
  for (const t of texts) {
    if (/[\x00\x14\x15]/.test(t)) throw new FormatError('annotation', `text ${JSON.stringify(t)} contains a reserved byte (0, 20 or 21)`);
    parts.push(utf8.encode(t), Uint8Array.of(0x14));
  }
  parts.push(Uint8Array.of(0));
  let length = 0;
  for (const p of parts) length += p.length;
  const out = new Uint8Array(length);
  let o = 0;
  for (const p of parts) {
    out.set(p, o);
    o += p.length;
  }
  return out;
}

/**
 * Writes an EDF/EDF+ file. Each physical value x is stored as
 * `dig = round((x − physMin)·(digMax − digMin)/(physMax − physMin) + digMin)`, clamped to [digMin, digMax], the
 * inverse of the EDF scaling (Kemp et al., 1992), using the physical limits exactly as written to the header.
 */
export function writeEdf(input: EdfWriteInput): Uint8Array<ArrayBuffer> {
  const variant = input.variant ?? 'EDF+C';
  const plus = variant !== 'EDF';
  const duration = input.recordDurationSeconds;
  if (input.signals.length === 0) throw new FormatError('signals', 'at least one signal is needed');
  const first = input.signals[0];
  const recordCount = first.samples.length / first.samplesPerRecord;
  for (const s of input.signals) {
    if (!Number.isInteger(s.samplesPerRecord) || s.samplesPerRecord < 1) {
      throw new FormatError('samples per data record', `must be a positive integer, found ${s.samplesPerRecord}`, { signal: s.label });
    }
    if (s.samples.length !== recordCount * s.samplesPerRecord) {
      throw new FormatError('samples', `has ${s.samples.length} values; every signal must fill ${recordCount} whole records (${recordCount * s.samplesPerRecord})`, {
        signal: s.label,
      });
    }
  }
  if (!Number.isInteger(recordCount)) throw new FormatError('samples', 'do not fill whole data records', { signal: first.label });
  const starts = input.recordStartSeconds ?? Array.from({ length: recordCount }, (_, r) => r * duration);
  if (starts.length !== recordCount) throw new FormatError('recordStartSeconds', `has ${starts.length} entries for ${recordCount} records`);
  if (variant === 'EDF+D' && input.recordStartSeconds === undefined) {
    throw new FormatError('recordStartSeconds', 'is required for EDF+D');
  }
  if (!plus && (input.annotations?.length ?? 0) > 0) throw new FormatError('annotations', 'need EDF+ (plain EDF has no annotation signal)');

  // Annotation TALs per record: the timekeeping TAL, then events in the record that holds their onset.
  const tals: Uint8Array[][] = Array.from({ length: recordCount }, (_, r) => [encodeTal(starts[r], null, [''])]);
  for (const a of input.annotations ?? []) {
    let r = 0;
    while (r + 1 < recordCount && starts[r + 1] <= a.onsetSeconds) r++;
    tals[r].push(encodeTal(a.onsetSeconds, a.durationSeconds, a.texts));
  }
  let annotationBytes = 0;
  for (const list of tals) {
    let n = 0;
    for (const t of list) n += t.length;
    annotationBytes = Math.max(annotationBytes, n);
  }
  if (input.annotationBytesPerRecord !== undefined) {
    if (input.annotationBytesPerRecord < annotationBytes) {
      throw new FormatError('annotationBytesPerRecord', `${input.annotationBytesPerRecord} is less than the ${annotationBytes} bytes the fullest record needs`);
    }
    annotationBytes = input.annotationBytesPerRecord;
  }
  const annotationSamples = Math.ceil(annotationBytes / 2);

  interface Spec {
    label: string;
    transducer: string;
    dimension: string;
    physMin: string;
    physMax: string;
    digMin: number;
    digMax: number;
    prefiltering: string;
    spr: number;
  }
  const specs: Spec[] = input.signals.map((s) => ({
    label: s.label,
    transducer: s.transducer ?? '',
    dimension: s.physicalDimension,
    physMin: formatEdfNumber(s.physicalMin, 8, `physical minimum of ${s.label}`),
    physMax: formatEdfNumber(s.physicalMax, 8, `physical maximum of ${s.label}`),
    digMin: s.digitalMin ?? -32768,
    digMax: s.digitalMax ?? 32767,
    prefiltering: s.prefiltering ?? '',
    spr: s.samplesPerRecord,
  }));
  if (plus) {
    specs.push({
      label: EDF_ANNOTATIONS_LABEL, transducer: '', dimension: '', physMin: '-1', physMax: '1',
      digMin: -32768, digMax: 32767, prefiltering: '', spr: annotationSamples,
    });
  }
  const ns = specs.length;
  const headerBytes = 256 * (ns + 1);
  let recordBytes = 0;
  for (const s of specs) recordBytes += 2 * s.spr;

  const { year, month, day, hour, minute, second } = input.start;
  const two = (n: number) => String(n).padStart(2, '0');
  const recordingDefault = plus ? `Startdate ${two(day)}-${MONTHS[month - 1]}-${year} X X X` : '';
  let text = '';
  text += field('0', 8, 'version');
  text += field(input.patientIdentification ?? (plus ? 'X X X X' : ''), 80, 'patient identification');
  text += field(input.recordingIdentification ?? recordingDefault, 80, 'recording identification');
  text += field(`${two(day)}.${two(month)}.${two(year % 100)}`, 8, 'start date');
  text += field(`${two(hour)}.${two(minute)}.${two(second)}`, 8, 'start time');
  text += field(String(headerBytes), 8, 'header bytes');
  text += field(plus ? variant : '', 44, 'reserved');
  text += field(String(recordCount), 8, 'data record count');
  text += field(formatEdfNumber(duration, 8, 'data record duration'), 8, 'data record duration');
  text += field(String(ns), 4, 'signal count');
  const column = (pick: (s: Spec) => string, width: number, name: string) => {
    for (const s of specs) text += field(pick(s), width, `${name} of ${s.label}`);
  };
  column((s) => s.label, 16, 'label');
  column((s) => s.transducer, 80, 'transducer type');
  column((s) => s.dimension, 8, 'physical dimension');
  column((s) => s.physMin, 8, 'physical minimum');
  column((s) => s.physMax, 8, 'physical maximum');
  column((s) => String(s.digMin), 8, 'digital minimum');
  column((s) => String(s.digMax), 8, 'digital maximum');
  column((s) => s.prefiltering, 80, 'prefiltering');
  column((s) => String(s.spr), 8, 'samples per data record');
  column(() => '', 32, 'signal reserved');

  const out = new Uint8Array(headerBytes + recordCount * recordBytes);
  for (let i = 0; i < text.length; i++) out[i] = text.charCodeAt(i);
  const view = new DataView(out.buffer);

  let signalOffset = 0;
  for (let k = 0; k < input.signals.length; k++) {
    const s = input.signals[k];
    const spec = specs[k];
    const pMin = Number(spec.physMin);
    const pMax = Number(spec.physMax);
    if (spec.digMin >= spec.digMax || pMin === pMax) throw new FormatError('scaling', 'needs digMin < digMax and physMin ≠ physMax', { signal: s.label });
    const scale = (spec.digMax - spec.digMin) / (pMax - pMin);
    const data = s.samples;
    const spr = spec.spr;
    for (let r = 0; r < recordCount; r++) {
      const base = headerBytes + r * recordBytes + signalOffset;
      for (let j = 0; j < spr; j++) {
        let d = Math.round((data[r * spr + j] - pMin) * scale + spec.digMin);
        if (d < spec.digMin) d = spec.digMin;
        else if (d > spec.digMax) d = spec.digMax;
        else if (d !== d) d = spec.digMin;
        view.setInt16(base + 2 * j, d, true);
      }
    }
    signalOffset += 2 * spr;
  }
  if (plus) {
    for (let r = 0; r < recordCount; r++) {
      let o = headerBytes + r * recordBytes + signalOffset;
      for (const t of tals[r]) {
        out.set(t, o);
        o += t.length;
      }
    }
  }
  return out;
}
