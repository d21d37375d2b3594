// Opening a recording on this device (the Source screen's intake): EDF/EDF+ through the incremental reader,
// CSV/TSV plus an optional BIDS events file, and its SHA-256 fingerprint, from Blobs. Runs in the intake worker
// (workers/intake.worker.ts, wiring only). Errors come back as values (comlink would keep only an Error's message,
// losing the field and byte offset).
import type { Recording } from '../analysis/recording';
import { FormatError } from './format-error';
import { blobSource } from './byte-source';
import { openEdf, readEdfHeader, toRecording } from './edf-reader';
import { parseBidsEvents, type BidsEventsResult } from './bids-events';
import { recordingWarnings } from './recording-warnings';
import { parseCsvSamples } from './csv-samples';
import { Sha256, sha256Hex } from './fingerprint';

/** Files up to this size are hashed in one Web Crypto call; larger ones incrementally while they are read. */
const WEB_CRYPTO_BYTES = 64 * 1024 * 1024;
const CHUNK_BYTES = 4 * 1024 * 1024;

export type IntakePhase = 'fingerprint' | 'reading' | 'events';

export interface IntakeLocal {
  sizeBytes: number;
  format: 'edf' | 'edf+c' | 'edf+d' | 'csv' | 'tsv';
  identifying: { patient: string; recording: string } | null;
  startDateTime: string | null;
  ignoredSignals: string[];
  warnings: string[];
  /** EDF: signals left out by the caller's `exclude`, and analysed signals read through one of its `unitFactors`. */
  excludedSignals: string[];
  mappedSignals: { signal: string; dimension: string; factor: number }[];
  /**
   * A paired BIDS events file's rows (cells by column), for choosing events by column on the Source screen; its
   * events follow the first `annotationCount` events (the EDF+ annotations) in `recording.events`.
   */
  eventTable?: { header: string[]; rows: { onsetSeconds: number; durationSeconds: number; columns: Record<string, string> }[]; annotationCount: number };
}

/** How to read an EDF beyond the built-in rules (the recipe's `recording.units` and `recording.exclude`). */
export interface EdfReading {
  /** Physical dimension (trimmed) → factor to µV. */
  unitFactors?: Record<string, number>;
  /** Signal labels to leave out. */
  exclude?: string[];
}

export interface IntakeProblem {
  /** Which file: the recording itself or its events file. */
  file: 'recording' | 'events';
  message: string;
  field: string | null;
  problem: string | null;
  byteOffset: number | null;
  signal: string | null;
  row: number | null;
  column: string | null;
  /** For an unknown physical dimension: the dimension as written (trimmed), so the page can offer to map it. */
  dimension: string | null;
}

export type IntakeResult =
  | { ok: true; recording: Recording; local: IntakeLocal; fingerprint: string; fingerprintMethod: 'web-crypto' | 'incremental' }
  | { ok: false; error: IntakeProblem };

export interface CsvRequest {
  sampleRateHz: number;
  delimiter: ',' | '\t';
  events: Blob | null;
}

export type IntakeProgress = (phase: IntakePhase, fraction: number) => void;

function problemOf(error: unknown, file: IntakeProblem['file']): IntakeProblem {
  if (error instanceof FormatError) {
    return {
      file,
      message: error.message,
      field: error.field,
      problem: error.problem,
      byteOffset: error.byteOffset,
      signal: error.signal,
      row: error.row,
      column: error.column,
      dimension: null,
    };
  }
  const message = error instanceof Error ? error.message : String(error);
  return { file, message, field: null, problem: null, byteOffset: null, signal: null, row: null, column: null, dimension: null };
}

function done(recording: Recording, local: IntakeLocal, fingerprint: string, fingerprintMethod: 'web-crypto' | 'incremental'): IntakeResult {
  return { ok: true, recording, local, fingerprint, fingerprintMethod };
}

const pad = (n: number) => String(n).padStart(2, '0');

/** Reads a Blob as text slice by slice (streaming UTF-8 decode), hashing the same bytes when asked. */
async function readText(blob: Blob, hash: Sha256 | null, onProgress: (fraction: number) => void): Promise<string> {
  const decoder = new TextDecoder('utf-8', { fatal: false });
  const parts: string[] = [];
  for (let offset = 0; offset < blob.size; offset += CHUNK_BYTES) {
    const bytes = new Uint8Array(await blob.slice(offset, offset + CHUNK_BYTES).arrayBuffer());
    hash?.update(bytes);
    parts.push(decoder.decode(bytes, { stream: true }));
    onProgress(Math.min(1, (offset + bytes.length) / blob.size));
  }
  parts.push(decoder.decode());
  return parts.join('');
}

const rowOf = (e: { onsetSeconds: number; durationSeconds: number; columns: Record<string, string> }) => ({ onsetSeconds: e.onsetSeconds, durationSeconds: e.durationSeconds, columns: e.columns });

/**
 * Opens an EDF/EDF+ Blob through the incremental reader (annotations become events), with an optional paired BIDS
 * events file whose events follow the annotations, and fingerprints the file (SHA-256). Errors come back as values.
 */
export async function openEdfBlob(
  file: Blob,
  reading: EdfReading,
  onProgress: IntakeProgress,
  events: Blob | null = null,
  /** 'elsewhere': the caller hashes the file in another worker (large files); `fingerprint` is then '' here. */
  fingerprintAt: 'here' | 'elsewhere' = 'here',
): Promise<IntakeResult> {
  let stage: IntakeProblem['file'] = 'recording';
  let eventTable: IntakeLocal['eventTable'];
  try {
    const elsewhere = fingerprintAt === 'elsewhere';
    const small = !elsewhere && file.size <= WEB_CRYPTO_BYTES;
    let fingerprint: string | null = null;
    if (small) {
      onProgress('fingerprint', 0);
      fingerprint = await sha256Hex(await file.arrayBuffer());
      onProgress('fingerprint', 1);
    }
    const edf = await openEdf(blobSource(file), {
      fingerprint: !small && !elsewhere,
      unitFactors: reading.unitFactors,
      exclude: reading.exclude,
      onProgress: (f) => onProgress('reading', f),
    });
    const recording = toRecording(edf);
    const s = edf.identifying.start;
    let parsedEvents: BidsEventsResult | null = null;
    if (events !== null) {
      // A paired BIDS events file: its events follow the EDF+ annotations, in the order the CLI's --events gives.
      stage = 'events';
      onProgress('events', 0);
      const seconds = recording.data[0].length / recording.sampleRateHz;
      const parsed = parseBidsEvents(await events.text(), { recordingSeconds: seconds });
      eventTable = { header: parsed.header, rows: parsed.events.map(rowOf), annotationCount: recording.events.length };
      recording.events = [...recording.events, ...parsed.events.map((e) => ({ onsetSeconds: e.onsetSeconds, durationSeconds: e.durationSeconds, label: e.label }))];
      parsedEvents = parsed;
      onProgress('events', 1);
    }
    const warnings = recordingWarnings({ edf, reading, events: parsedEvents });
    const local: IntakeLocal = {
      sizeBytes: file.size,
      format: edf.header.variant === 'EDF+C' ? 'edf+c' : edf.header.variant === 'EDF+D' ? 'edf+d' : 'edf',
      identifying: { patient: edf.identifying.patientIdentification, recording: edf.identifying.recordingIdentification },
      startDateTime: s ? `${s.year}-${pad(s.month)}-${pad(s.day)} ${pad(s.hour)}:${pad(s.minute)}:${pad(s.second)}` : null,
      ignoredSignals: edf.ignored.filter((i) => i.reason === 'sample-rate').map((i) => `${i.label} (${i.sampleRateHz} Hz)`),
      warnings,
      excludedSignals: edf.ignored.filter((i) => i.reason === 'excluded').map((i) => i.label),
      mappedSignals: edf.channels
        .filter((c) => Object.hasOwn(reading.unitFactors ?? {}, c.physicalDimension.trim()))
        .map((c) => ({ signal: c.label, dimension: c.physicalDimension.trim(), factor: c.microvoltFactor })),
      ...(eventTable ? { eventTable } : {}),
    };
    return done(recording, local, elsewhere ? '' : (fingerprint ?? edf.fingerprint!), small ? 'web-crypto' : 'incremental');
  } catch (error) {
    const problem = problemOf(error, stage);
    if (problem.field === 'physical dimension' && problem.signal !== null) {
      // The header parsed (the units are checked after it), so read it again for the dimension as written.
      const header = await readEdfHeader(blobSource(file)).catch(() => null);
      const signal = header?.header.signals.find((s) => s.label === problem.signal);
      if (signal) problem.dimension = signal.physicalDimension.trim();
    }
    return { ok: false, error: problem };
  }
}

/** Opens a CSV/TSV sample table Blob (and an optional BIDS events file) and fingerprints it. Errors come back as values. */
export async function openCsvBlob(file: Blob, request: CsvRequest, onProgress: IntakeProgress): Promise<IntakeResult> {
  let stage: IntakeProblem['file'] = 'recording';
  let eventTable: IntakeLocal['eventTable'];
  try {
    const small = file.size <= WEB_CRYPTO_BYTES;
    const hash = small ? null : new Sha256();
    const text = await readText(file, hash, (f) => onProgress('reading', f));
    const fingerprint = small ? await sha256Hex(await file.arrayBuffer()) : hash!.hex();
    const recording = parseCsvSamples(text, { sampleRateHz: request.sampleRateHz, delimiter: request.delimiter });
    let parsedEvents: BidsEventsResult | null = null;
    if (request.events !== null) {
      stage = 'events';
      onProgress('events', 0);
      const seconds = recording.data[0].length / recording.sampleRateHz;
      const parsed = parseBidsEvents(await request.events.text(), { recordingSeconds: seconds });
      eventTable = { header: parsed.header, rows: parsed.events.map(rowOf), annotationCount: 0 };
      recording.events = parsed.events.map((e) => ({ onsetSeconds: e.onsetSeconds, durationSeconds: e.durationSeconds, label: e.label }));
      parsedEvents = parsed;
      onProgress('events', 1);
    }
    const warnings = recordingWarnings({ edf: null, reading: null, events: parsedEvents });
    const local: IntakeLocal = {
      sizeBytes: file.size,
      format: request.delimiter === '\t' ? 'tsv' : 'csv',
      identifying: null,
      startDateTime: null,
      ignoredSignals: [],
      warnings,
      excludedSignals: [],
      mappedSignals: [],
      ...(eventTable ? { eventTable } : {}),
    };
    return done(recording, local, fingerprint, small ? 'web-crypto' : 'incremental');
  } catch (error) {
    return { ok: false, error: problemOf(error, stage) };
  }
}
