// Opens a recording on this device: EDF/EDF+ through the incremental reader, CSV/TSV plus an optional BIDS events
// file, and its SHA-256 fingerprint. Comlink wiring only; the readers live in src/lib/formats. Errors come back
// as values (comlink would keep only an Error's message, losing the field and byte offset).
import * as Comlink from 'comlink';
import type { Recording } from '../src/lib/analysis/recording';
import {
  FormatError,
  Sha256,
  blobSource,
  openEdf,
  parseBidsEvents,
  parseCsvSamples,
  sha256Hex,
  toRecording,
} from '../src/lib/formats';

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
}

export type IntakeResult =
  | { ok: true; recording: Recording; local: IntakeLocal; fingerprint: string; fingerprintMethod: 'web-crypto' | 'incremental' }
  | { ok: false; error: IntakeProblem };

export interface CsvRequest {
  sampleRateHz: number;
  delimiter: ',' | '\t';
  events: Blob | null;
}

type Progress = (phase: IntakePhase, fraction: number) => void;

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
    };
  }
  const message = error instanceof Error ? error.message : String(error);
  return { file, message, field: null, problem: null, byteOffset: null, signal: null, row: null, column: null };
}

function done(recording: Recording, local: IntakeLocal, fingerprint: string, fingerprintMethod: 'web-crypto' | 'incremental') {
  const result: IntakeResult = { ok: true, recording, local, fingerprint, fingerprintMethod };
  // Transfer the sample buffers: a recording of hundreds of MB must not be copied on its way to the page.
  return Comlink.transfer(result, recording.data.map((d) => d.buffer as ArrayBuffer));
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

const api = {
  async openEdf(file: Blob, onProgress: Progress): Promise<IntakeResult> {
    try {
      const small = file.size <= WEB_CRYPTO_BYTES;
      let fingerprint: string | null = null;
      if (small) {
        onProgress('fingerprint', 0);
        fingerprint = await sha256Hex(await file.arrayBuffer());
        onProgress('fingerprint', 1);
      }
      const edf = await openEdf(blobSource(file), { fingerprint: !small, onProgress: (f) => onProgress('reading', f) });
      const recording = toRecording(edf);
      const s = edf.identifying.start;
      const warnings = [...edf.warnings];
      if (edf.eventsOutside.length > 0) {
        const first = edf.eventsOutside[0];
        warnings.push(
          `${edf.eventsOutside.length} annotations fall outside the recorded samples and are left out (first: "${first.annotation.label}" at ${first.annotation.onsetSeconds} s, ${first.reason.replace('-', ' ')})`,
        );
      }
      const local: IntakeLocal = {
        sizeBytes: file.size,
        format: edf.header.variant === 'EDF+C' ? 'edf+c' : edf.header.variant === 'EDF+D' ? 'edf+d' : 'edf',
        identifying: { patient: edf.identifying.patientIdentification, recording: edf.identifying.recordingIdentification },
        startDateTime: s ? `${s.year}-${pad(s.month)}-${pad(s.day)} ${pad(s.hour)}:${pad(s.minute)}:${pad(s.second)}` : null,
        ignoredSignals: edf.ignored.map((i) => `${i.label} (${i.reason === 'sample-rate' ? `${i.sampleRateHz} Hz` : 'excluded'})`),
        warnings,
      };
      return done(recording, local, fingerprint ?? edf.fingerprint!, small ? 'web-crypto' : 'incremental');
    } catch (error) {
      return { ok: false, error: problemOf(error, 'recording') };
    }
  },

  async openCsv(file: Blob, request: CsvRequest, onProgress: Progress): Promise<IntakeResult> {
    let stage: IntakeProblem['file'] = 'recording';
    try {
      const small = file.size <= WEB_CRYPTO_BYTES;
      const hash = small ? null : new Sha256();
      const text = await readText(file, hash, (f) => onProgress('reading', f));
      const fingerprint = small ? await sha256Hex(await file.arrayBuffer()) : hash!.hex();
      const recording = parseCsvSamples(text, { sampleRateHz: request.sampleRateHz, delimiter: request.delimiter });
      const warnings: string[] = [];
      if (request.events !== null) {
        stage = 'events';
        onProgress('events', 0);
        const seconds = recording.data[0].length / recording.sampleRateHz;
        const parsed = parseBidsEvents(await request.events.text(), { recordingSeconds: seconds });
        recording.events = parsed.events
          .map((e) => ({ onsetSeconds: e.onsetSeconds, durationSeconds: e.durationSeconds, label: e.label }))
          .sort((a, b) => a.onsetSeconds - b.onsetSeconds);
        warnings.push(...parsed.warnings);
        onProgress('events', 1);
      }
      const local: IntakeLocal = {
        sizeBytes: file.size,
        format: request.delimiter === '\t' ? 'tsv' : 'csv',
        identifying: null,
        startDateTime: null,
        ignoredSignals: [],
        warnings,
      };
      return done(recording, local, fingerprint, small ? 'web-crypto' : 'incremental');
    } catch (error) {
      return { ok: false, error: problemOf(error, stage) };
    }
  },
};

export type IntakeWorker = typeof api;
Comlink.expose(api);
