/**
 * EDF and EDF+ header parsing, per the published byte layout: Kemp et al., 1992, "A simple format for exchange
 * of digitized polygraphic recordings", Electroencephalogr Clin Neurophysiol 82:391–393 (EDF), and Kemp &
 * Olivan, 2003, "European data format 'plus' (EDF+)", Clin Neurophysiol 114:1755–1761 (EDF+).
 *
 * Caution: the patient and recording identification fields and the start date/time are returned apart, in
 * `EdfIdentifying`, so that screens can keep them on the device; `EdfHeader` holds nothing that names a person.
 */
import { FormatError } from './format-error';

/** Size of the fixed part of the header; each signal adds another 256 bytes. */
export const EDF_FIXED_HEADER_BYTES = 256;
export const EDF_BYTES_PER_SIGNAL_HEADER = 256;
/** Label of the EDF+ annotation signal (Kemp & Olivan, 2003, §2.2.1). */
export const EDF_ANNOTATIONS_LABEL = 'EDF Annotations';

/** Fixed header fields: name, byte offset, width (Kemp et al., 1992, Table 1). */
export const EDF_FIXED_FIELDS = [
  { name: 'version', offset: 0, width: 8 },
  { name: 'patient identification', offset: 8, width: 80 },
  { name: 'recording identification', offset: 88, width: 80 },
  { name: 'start date', offset: 168, width: 8 },
  { name: 'start time', offset: 176, width: 8 },
  { name: 'header bytes', offset: 184, width: 8 },
  { name: 'reserved', offset: 192, width: 44 },
  { name: 'data record count', offset: 236, width: 8 },
  { name: 'data record duration', offset: 244, width: 8 },
  { name: 'signal count', offset: 252, width: 4 },
] as const;

/** Per-signal fields in header order; each field is stored for all signals before the next field starts. */
export const EDF_SIGNAL_FIELDS = [
  { name: 'label', width: 16 },
  { name: 'transducer type', width: 80 },
  { name: 'physical dimension', width: 8 },
  { name: 'physical minimum', width: 8 },
  { name: 'physical maximum', width: 8 },
  { name: 'digital minimum', width: 8 },
  { name: 'digital maximum', width: 8 },
  { name: 'prefiltering', width: 80 },
  { name: 'samples per data record', width: 8 },
  { name: 'signal reserved', width: 32 },
] as const;

export type EdfVariant = 'EDF' | 'EDF+C' | 'EDF+D';

const MAX_PHYSICAL_MAGNITUDE = 1e30;

export interface EdfSignalHeader {
  index: number;
  label: string;
  transducer: string;
  physicalDimension: string;
  physicalMin: number;
  physicalMax: number;
  digitalMin: number;
  digitalMax: number;
  prefiltering: string;
  samplesPerRecord: number;
  /** samplesPerRecord / record duration; NaN when the record duration is 0 (annotation-only files). */
  sampleRateHz: number;
  isAnnotation: boolean;
  /** Byte offset of this signal's samples inside one data record. */
  recordByteOffset: number;
  /** Byte offset of this signal's physical dimension field in the file (for unit errors). */
  dimensionByteOffset: number;
}

export interface EdfHeader {
  variant: EdfVariant;
  version: string;
  headerBytes: number;
  reserved: string;
  /** As declared; -1 means "unknown" in the file and is resolved from the file size by the reader. */
  declaredRecordCount: number;
  recordDurationSeconds: number;
  signalCount: number;
  signals: EdfSignalHeader[];
  /** Bytes of one data record: 2 bytes per sample of every signal. */
  recordBytes: number;
}

export interface EdfStart {
  year: number;
  month: number;
  day: number;
  hour: number;
  minute: number;
  second: number;
}

/** Fields that may name or date a person; keep them on the device. */
export interface EdfIdentifying {
  patientIdentification: string;
  recordingIdentification: string;
  startDate: string;
  startTime: string;
  /** Parsed start; null when the date or time field is malformed (a warning is added, reading goes on). */
  start: EdfStart | null;
  /** EDF+ patient subfields (code, sex, birthdate, name), when the field follows EDF+ §2.1.3.3. */
  patient: { code: string; sex: string; birthdate: string; name: string } | null;
  /** EDF+ recording subfields ("Startdate dd-MMM-yyyy admincode technician equipment"). */
  recording: { startdate: string; admincode: string; technician: string; equipment: string } | null;
}

const latin1 = (bytes: Uint8Array, offset: number, width: number): string => {
  let s = '';
  const end = Math.min(bytes.length, offset + width);
  for (let i = offset; i < end; i++) s += String.fromCharCode(bytes[i]);
  return s;
};

const DECIMAL = /^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/;
const INTEGER = /^[+-]?\d+$/;

function parseDecimal(text: string, field: string, byteOffset: number, signal?: string): number {
  const t = text.trim();
  if (!DECIMAL.test(t)) {
    throw new FormatError(field, `is not a number (${JSON.stringify(t)})`, { byteOffset, signal });
  }
  const value = Number(t);
  if (!Number.isFinite(value)) throw new FormatError(field, `is not finite (${JSON.stringify(t)})`, { byteOffset, signal });
  return value;
}

function parseInteger(text: string, field: string, byteOffset: number, signal?: string): number {
  const t = text.trim();
  if (!INTEGER.test(t)) {
    throw new FormatError(field, `is not an integer (${JSON.stringify(t)})`, { byteOffset, signal });
  }
  return Number(t);
}

/** The fixed 256-byte part: enough to know how long the whole header is. */
export interface EdfFixedHeader {
  version: string;
  variant: EdfVariant;
  reserved: string;
  headerBytes: number;
  declaredRecordCount: number;
  recordDurationSeconds: number;
  signalCount: number;
  identifying: EdfIdentifying;
  warnings: string[];
}

/**
 * Parses the fixed header (Kemp et al., 1992) from the first 256 bytes and checks the declared header length
 * against `fileSize`, so a reader never asks for (or allocates) more than the file holds.
 */
export function parseEdfFixedHeader(bytes: Uint8Array, fileSize: number): EdfFixedHeader {
  if (fileSize < EDF_FIXED_HEADER_BYTES || bytes.length < EDF_FIXED_HEADER_BYTES) {
    throw new FormatError('header', `is truncated: the file has ${fileSize} bytes, an EDF header needs at least 256`, {
      byteOffset: Math.min(fileSize, bytes.length),
    });
  }
  const field = (i: number) => latin1(bytes, EDF_FIXED_FIELDS[i].offset, EDF_FIXED_FIELDS[i].width);
  const at = (i: number) => EDF_FIXED_FIELDS[i].offset;
  const warnings: string[] = [];

  const version = field(0);
  if (version.trim() !== '0') {
    const hint = bytes[0] === 0xff ? ' (this looks like a 24-bit BDF file, which is not EDF)' : '';
    throw new FormatError('version', `must be "0" for EDF, found ${JSON.stringify(version.trim())}${hint}`, { byteOffset: 0 });
  }

  const reserved = field(6);
  let variant: EdfVariant = 'EDF';
  if (reserved.startsWith('EDF+C')) variant = 'EDF+C';
  else if (reserved.startsWith('EDF+D')) variant = 'EDF+D';
  else if (reserved.startsWith('EDF+')) {
    throw new FormatError('reserved', `starts with an unknown EDF+ type ${JSON.stringify(reserved.slice(0, 5))} (expected EDF+C or EDF+D)`, {
      byteOffset: at(6),
    });
  }

  const signalCount = parseInteger(field(9), 'signal count', at(9));
  if (signalCount < 1) throw new FormatError('signal count', `must be at least 1, found ${signalCount}`, { byteOffset: at(9) });
  const headerBytes = parseInteger(field(5), 'header bytes', at(5));
  const expectedHeaderBytes = EDF_FIXED_HEADER_BYTES + signalCount * EDF_BYTES_PER_SIGNAL_HEADER;
  if (headerBytes !== expectedHeaderBytes) {
    throw new FormatError('header bytes', `declares ${headerBytes} bytes, but ${signalCount} signals need 256 + ${signalCount} × 256 = ${expectedHeaderBytes}`, {
      byteOffset: at(5),
    });
  }
  if (headerBytes > fileSize) {
    throw new FormatError('header bytes', `declares a ${headerBytes}-byte header, but the file has only ${fileSize} bytes`, {
      byteOffset: at(5),
    });
  }

  const declaredRecordCount = parseInteger(field(7), 'data record count', at(7));
  if (declaredRecordCount < -1) {
    throw new FormatError('data record count', `must be -1 (unknown) or at least 0, found ${declaredRecordCount}`, { byteOffset: at(7) });
  }
  const recordDurationSeconds = parseDecimal(field(8), 'data record duration', at(8));
  if (recordDurationSeconds < 0) {
    throw new FormatError('data record duration', `must not be negative, found ${recordDurationSeconds}`, { byteOffset: at(8) });
  }

  const startDate = field(3);
  const startTime = field(4);
  const recordingIdentification = field(2).trimEnd();
  const start = parseStart(startDate, startTime, recordingIdentification);
  // The warning leaves the text out: dates are identifying and warnings may be shown or logged anywhere.
  if (start === null) warnings.push('start date/time fields are malformed; the raw text is kept with the identifying fields');
  const patientIdentification = field(1).trimEnd();

  return {
    version: version.trim(),
    variant,
    reserved: reserved.trimEnd(),
    headerBytes,
    declaredRecordCount,
    recordDurationSeconds,
    signalCount,
    identifying: {
      patientIdentification,
      recordingIdentification,
      startDate,
      startTime,
      start,
      patient: variant === 'EDF' ? null : parsePatientSubfields(patientIdentification),
      recording: variant === 'EDF' ? null : parseRecordingSubfields(recordingIdentification),
    },
    warnings,
  };
}

/**
 * Parses the signal part of the header (bytes 256 … headerBytes). `bytes` holds the whole header.
 * Checks each field's syntax and the relations the specifications require (digital minimum < maximum,
 * physical minimum ≠ maximum, at least one sample per record, digital range inside 16 bits).
 */
export function parseEdfSignalHeaders(bytes: Uint8Array, fixed: EdfFixedHeader): EdfSignalHeader[] {
  const ns = fixed.signalCount;
  if (bytes.length < fixed.headerBytes) {
    throw new FormatError('header', `is truncated: ${bytes.length} of ${fixed.headerBytes} header bytes`, { byteOffset: bytes.length });
  }
  const fieldStart: number[] = [];
  let offset = EDF_FIXED_HEADER_BYTES;
  for (const f of EDF_SIGNAL_FIELDS) {
    fieldStart.push(offset);
    offset += f.width * ns;
  }
  const read = (fieldIndex: number, signalIndex: number) => {
    const w = EDF_SIGNAL_FIELDS[fieldIndex].width;
    const at = fieldStart[fieldIndex] + signalIndex * w;
    return { text: latin1(bytes, at, w), at };
  };

  const signals: EdfSignalHeader[] = [];
  let recordByteOffset = 0;
  for (let i = 0; i < ns; i++) {
    const label = read(0, i).text.trim();
    const name = label === '' ? `#${i + 1}` : label;
    const dim = read(2, i);
    const pMin = read(3, i);
    const pMax = read(4, i);
    const dMin = read(5, i);
    const dMax = read(6, i);
    const spr = read(8, i);
    const physicalMin = parseDecimal(pMin.text, 'physical minimum', pMin.at, name);
    const physicalMax = parseDecimal(pMax.text, 'physical maximum', pMax.at, name);
    const digitalMin = parseInteger(dMin.text, 'digital minimum', dMin.at, name);
    const digitalMax = parseInteger(dMax.text, 'digital maximum', dMax.at, name);
    const samplesPerRecord = parseInteger(spr.text, 'samples per data record', spr.at, name);
    const isAnnotation = label === EDF_ANNOTATIONS_LABEL;
    if (digitalMin < -32768 || digitalMin > 32767) {
      throw new FormatError('digital minimum', `${digitalMin} is outside the 16-bit range −32768…32767`, { byteOffset: dMin.at, signal: name });
    }
    if (digitalMax < -32768 || digitalMax > 32767) {
      throw new FormatError('digital maximum', `${digitalMax} is outside the 16-bit range −32768…32767`, { byteOffset: dMax.at, signal: name });
    }
    if (digitalMin >= digitalMax) {
      throw new FormatError('digital minimum', `${digitalMin} must be below the digital maximum ${digitalMax}`, { byteOffset: dMin.at, signal: name });
    }
    // Samples come out as 32-bit floats in µV (up to ×1e6 from V), so a physical limit past ±1e30 would overflow to
    // ±Infinity; no recording has such limits, so they are refused as damage.
    for (const [value, field, at] of [[physicalMin, 'physical minimum', pMin.at], [physicalMax, 'physical maximum', pMax.at]] as const) {
      if (!isAnnotation && Math.abs(value) > MAX_PHYSICAL_MAGNITUDE) {
        throw new FormatError(field, `${value} is too large for a physical limit (at most ±1e30)`, { byteOffset: at, signal: name });
      }
    }
    if (!isAnnotation && physicalMin === physicalMax) {
      throw new FormatError('physical minimum', `equals the physical maximum (${physicalMax}), so no scaling is defined`, {
        byteOffset: pMin.at,
        signal: name,
      });
    }
    if (samplesPerRecord < 1) {
      throw new FormatError('samples per data record', `must be at least 1, found ${samplesPerRecord}`, { byteOffset: spr.at, signal: name });
    }
    signals.push({
      index: i,
      label,
      transducer: read(1, i).text.trim(),
      physicalDimension: dim.text.trim(),
      physicalMin,
      physicalMax,
      digitalMin,
      digitalMax,
      prefiltering: read(7, i).text.trim(),
      samplesPerRecord,
      sampleRateHz: fixed.recordDurationSeconds > 0 ? samplesPerRecord / fixed.recordDurationSeconds : NaN,
      isAnnotation,
      recordByteOffset,
      dimensionByteOffset: dim.at,
    });
    recordByteOffset += 2 * samplesPerRecord;
  }
  if (fixed.recordDurationSeconds === 0 && signals.some((s) => !s.isAnnotation)) {
    throw new FormatError('data record duration', 'is 0, which EDF+ allows only when the file holds no ordinary signals', {
      byteOffset: EDF_FIXED_FIELDS[8].offset,
    });
  }
  if (fixed.variant === 'EDF+D' && !signals.some((s) => s.isAnnotation)) {
    throw new FormatError('reserved', 'declares EDF+D (discontinuous) but no "EDF Annotations" signal gives the record start times', {
      byteOffset: EDF_FIXED_FIELDS[6].offset,
    });
  }
  return signals;
}

/** The header record of a file from its two parsed parts; `recordBytes` is the size of one data record. */
export function assembleEdfHeader(fixed: EdfFixedHeader, signals: EdfSignalHeader[]): EdfHeader {
  let recordBytes = 0;
  for (const s of signals) recordBytes += 2 * s.samplesPerRecord;
  return {
    variant: fixed.variant,
    version: fixed.version,
    headerBytes: fixed.headerBytes,
    reserved: fixed.reserved,
    declaredRecordCount: fixed.declaredRecordCount,
    recordDurationSeconds: fixed.recordDurationSeconds,
    signalCount: fixed.signalCount,
    signals,
    recordBytes,
  };
}

/** Combines the two steps for a header already in memory. */
export function parseEdfHeader(bytes: Uint8Array, fileSize: number): { header: EdfHeader; identifying: EdfIdentifying; warnings: string[] } {
  const fixed = parseEdfFixedHeader(bytes, fileSize);
  const header = assembleEdfHeader(fixed, parseEdfSignalHeaders(bytes, fixed));
  return { header, identifying: fixed.identifying, warnings: fixed.warnings };
}

const MONTHS = ['JAN', 'FEB', 'MAR', 'APR', 'MAY', 'JUN', 'JUL', 'AUG', 'SEP', 'OCT', 'NOV', 'DEC'];

/**
 * "dd.mm.yy" and "hh.mm.ss"; years 85–99 are 1985–1999 and 00–84 are 2000–2084 (EDF+ §2.1.3.2, the Y2K
 * clarification). For EDF+ a 4-digit year in the recording field ("Startdate 02-MAR-2002") takes precedence.
 */
function parseStart(date: string, time: string, recordingField: string): EdfStart | null {
  const d = /^(\d\d)\D(\d\d)\D(\d\d)$/.exec(date.trim());
  const t = /^(\d\d)\D(\d\d)\D(\d\d)$/.exec(time.trim());
  if (d === null || t === null) return null;
  const day = Number(d[1]);
  const month = Number(d[2]);
  const yy = Number(d[3]);
  let year = yy >= 85 ? 1900 + yy : 2000 + yy;
  const full = /^Startdate (\d\d)-([A-Z]{3})-(\d{4})/.exec(recordingField);
  if (full !== null && MONTHS.indexOf(full[2]) === month - 1 && Number(full[1]) === day) year = Number(full[3]);
  const hour = Number(t[1]);
  const minute = Number(t[2]);
  const second = Number(t[3]);
  if (month < 1 || month > 12 || day < 1 || day > 31 || hour > 23 || minute > 59 || second > 59) return null;
  return { year, month, day, hour, minute, second };
}

function parsePatientSubfields(field: string): EdfIdentifying['patient'] {
  const parts = field.trim().split(' ');
  if (parts.length < 4) return null;
  return { code: parts[0], sex: parts[1], birthdate: parts[2], name: parts[3] };
}

function parseRecordingSubfields(field: string): EdfIdentifying['recording'] {
  const parts = field.trim().split(' ');
  if (parts.length < 5 || parts[0] !== 'Startdate') return null;
  return { startdate: parts[1], admincode: parts[2], technician: parts[3], equipment: parts[4] };
}
