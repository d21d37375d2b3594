import * as Comlink from 'comlink';
import type { CsvRequest, EdfReading, IntakePhase, IntakeResult } from '../formats/intake';
import type { IntakeWorker } from '../../../workers/intake.worker';

export type { CsvRequest, EdfReading, IntakePhase, IntakeProblem, IntakeResult, IntakeLocal } from '../formats/intake';

let worker: Comlink.Remote<IntakeWorker> | null = null;

/** The intake worker, started on first use and kept for the tab's lifetime (reading is rare and short). */
function intakeWorker(): Comlink.Remote<IntakeWorker> {
  if (worker === null) {
    worker = Comlink.wrap<IntakeWorker>(new Worker(new URL('../../../workers/intake.worker.ts', import.meta.url), { type: 'module' }));
  }
  return worker;
}

export type ProgressListener = (phase: IntakePhase, fraction: number) => void;

/** An EDF may carry reading choices: unit factors for dimensions the reader does not know, signals to leave out. */
export type RecordingKind = ({ kind: 'edf' } & EdfReading) | ({ kind: 'csv' } & CsvRequest);

/** Reads a recording file in the worker; the File is passed by reference and read there through Blob.slice. */
export function openRecordingFile(file: Blob, kind: RecordingKind, onProgress: ProgressListener, edfEvents: Blob | null = null): Promise<IntakeResult> {
  const remote = intakeWorker();
  const progress = Comlink.proxy(onProgress);
  if (kind.kind === 'edf') return remote.openEdf(file, { unitFactors: kind.unitFactors, exclude: kind.exclude }, progress, edfEvents);
  return remote.openCsv(file, { sampleRateHz: kind.sampleRateHz, delimiter: kind.delimiter, events: kind.events }, progress);
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
