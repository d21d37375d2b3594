import * as Comlink from 'comlink';
import type { CsvRequest, EdfReading, IntakePhase, IntakeResult } from '../formats/intake';
import type { IntakeWorker } from '../../../workers/intake.worker';

export type { CsvRequest, EdfReading, IntakePhase, IntakeProblem, IntakeResult, IntakeLocal } from '../formats/intake';

let worker: Comlink.Remote<IntakeWorker> | null = null;
let hasher: { remote: Comlink.Remote<IntakeWorker>; worker: Worker } | null = null;

const startIntakeWorker = () => new Worker(new URL('../../../workers/intake.worker.ts', import.meta.url), { type: 'module' });

/** The intake worker, started on first use and kept for the tab's lifetime (reading is rare and short). */
function intakeWorker(): Comlink.Remote<IntakeWorker> {
  if (worker === null) worker = Comlink.wrap<IntakeWorker>(startIntakeWorker());
  return worker;
}

/** A second instance of the intake worker that only hashes, so a large file's hashing never holds up the next decode. */
function hashWorker(): Comlink.Remote<IntakeWorker> {
  if (hasher === null) {
    const w = startIntakeWorker();
    hasher = { remote: Comlink.wrap<IntakeWorker>(w), worker: w };
  }
  return hasher.remote;
}


/**
 * EDF files above this size are handed over as soon as they are decoded and hashed after that in a second worker
 * (both read the File slice by slice, so neither holds it whole): the fingerprint follows (`OpenedFile.fingerprint`
 * is then a promise). Below it the intake worker hashes in one Web Crypto call first.
 */
export const PARALLEL_FINGERPRINT_BYTES = 64 * 1024 * 1024;

/** Hashes still running in the hashing worker: a large file's fingerprint on its way. */
let hashesRunning = 0;

/**
 * A file was read and replaces the open recording: a fingerprint still on its way belongs to that recording and is
 * no longer wanted, so its hashing stops rather than read a large file for nothing. (A file that fails to open
 * replaces nothing, and the hashing goes on.)
 */
function dropStaleHashes(): void {
  if (hashesRunning === 0) return;
  hasher?.worker.terminate();
  hasher = null;
  hashesRunning = 0;
}

const replacing = (result: IntakeResult): IntakeResult => {
  if (result.ok) dropStaleHashes();
  return result;
};

/**
 * A seam for the demo/test build's browser hooks only (src/components/explorer/test-hooks.ts): hash files from
 * `fromBytes` on after decoding, and hold each late fingerprint until `held` settles, so a test sees the workspace
 * while the fingerprint is still unknown. Production code reads it only behind `import.meta.env.TIDEMARK_DEMO`.
 */
export const lateFingerprintSeam: { fromBytes: number; held: Promise<void> | null } = { fromBytes: PARALLEL_FINGERPRINT_BYTES, held: null };

export type ProgressListener = (phase: IntakePhase, fraction: number) => void;

/** An EDF may carry reading choices: unit factors for dimensions the reader does not know, signals to leave out. */
export type RecordingKind = ({ kind: 'edf' } & EdfReading) | ({ kind: 'csv' } & CsvRequest);

type Opened = Extract<IntakeResult, { ok: true }>;

/**
 * A file as the workspace gets it: decoded, with its fingerprint either known or still being computed (a promise
 * that rejects with the reason when the file cannot be hashed; the recording stays usable without it).
 */
export type OpenedFile = Extract<IntakeResult, { ok: false }> | (Omit<Opened, 'fingerprint'> & { fingerprint: string | Promise<string> });

/**
 * Reads a recording file in the worker; the File is passed by reference and read there through Blob.slice. For a
 * large EDF, `onProgress` reports the reading, then (after this returns) the hashing that is left, as 'fingerprint'.
 */
export async function openRecordingFile(file: Blob, kind: RecordingKind, onProgress: ProgressListener, edfEvents: Blob | null = null): Promise<OpenedFile> {
  const remote = intakeWorker();
  if (kind.kind !== 'edf') {
    return replacing(await remote.openCsv(file, { sampleRateHz: kind.sampleRateHz, delimiter: kind.delimiter, events: kind.events }, Comlink.proxy(onProgress)));
  }
  const reading = { unitFactors: kind.unitFactors, exclude: kind.exclude };
  const later = import.meta.env.TIDEMARK_DEMO ? lateFingerprintSeam.fromBytes : PARALLEL_FINGERPRINT_BYTES;
  if (file.size <= later) return replacing(await remote.openEdf(file, reading, Comlink.proxy(onProgress), edfEvents));
  // Large file: decoded first, on its own, so it is on screen soonest; then hashed in a second worker while the
  // person already works on it (both read the File slice by slice).
  const result = replacing(await remote.openEdf(file, reading, Comlink.proxy(onProgress), edfEvents, 'elsewhere'));
  if (!result.ok) return result;
  const hashing = hashWorker().fingerprint(file, Comlink.proxy((fraction: number) => onProgress('fingerprint', fraction)));
  hashesRunning++;
  hashing.then(
    () => hashesRunning--,
    () => hashesRunning--,
  );
  const fingerprint = hashing.then(
    async (hex) => {
      if (import.meta.env.TIDEMARK_DEMO && lateFingerprintSeam.held !== null) await lateFingerprintSeam.held;
      return hex;
    },
    (error: unknown) => {
      throw new Error(`the SHA-256 fingerprint could not be computed: ${error instanceof Error ? error.message : String(error)}`);
    },
  );
  return { ...result, fingerprint, fingerprintMethod: 'incremental' };
}

/** What a file name says about its kind: EDF by extension, CSV/TSV sample matrices, BIDS events by their suffix. */
export function kindOfFileName(name: string): 'edf' | 'csv' | 'tsv' | 'events' | null {
  const lower = name.toLowerCase();
  if (lower.endsWith('.edf') || lower.endsWith('.rec')) return 'edf';
  if (lower.endsWith('events.tsv')) return 'events';
  if (lower.endsWith('.csv')) return 'csv';
  if (lower.endsWith('.tsv') || lower.endsWith('.txt')) return 'tsv';
  return null;
}
