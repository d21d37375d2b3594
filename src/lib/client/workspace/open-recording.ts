import { openRecordingFile, type IntakePhase, type IntakeProblem, type RecordingKind } from '../intake';
import { LibraryFullError, type Library, type LibraryEntry } from '../library';
import { guardAgainst } from '../outbound';
import { conditionsPerLabel } from './source-rules';
import { adoptFingerprint } from './results';
import { useWorkspace } from './store';

/** Where an opened file came from, as the Source screen says it. */
export type Origin = 'your file' | 'demo cohort' | 'this browser’s library';

export interface OpenRequest {
  blob: Blob;
  fileName: string;
  kind: RecordingKind;
  from: Origin;
  /** A BIDS events file read with it; `pairing`: an events file dropped on its own for the open EDF. */
  events: { blob: Blob; name: string; pairing?: boolean } | null;
  /** The demo subject's code, put in the subject code field when it is empty. */
  demoCode?: string;
  /** The account's local library, which keeps a copy of the file. */
  library: Library;
}

export type OpenOutcome =
  /**
   * `kept`: settles once the library has the file (a large file is kept after its fingerprint, its key, is known)
   * with a notice when it could not be kept, else null.
   */
  | { ok: true; channels: string[]; libraryNotice: string | null; kept: Promise<string | null> }
  | { ok: false; fileName: string; error: IntakeProblem };

/** The EDF reading choices worth keeping: only the ones that were made. */
export function readingOf(kind: RecordingKind): { unitFactors?: Record<string, number>; exclude?: string[] } | null {
  if (kind.kind !== 'edf') return null;
  const unitFactors = kind.unitFactors && Object.keys(kind.unitFactors).length > 0 ? { ...kind.unitFactors } : undefined;
  const exclude = kind.exclude && kind.exclude.length > 0 ? kind.exclude.slice() : undefined;
  if (!unitFactors && !exclude) return null;
  return { ...(unitFactors ? { unitFactors } : {}), ...(exclude ? { exclude } : {}) };
}

/**
 * Opens a recording file for the workspace: reads it in the intake worker, tells the outbound guard what must never
 * leave the device (file names, header identification), puts it in the workspace store (which starts its history
 * and brings back a saved workspace), pairs an events file's labels as conditions, and keeps a copy in the
 * account's library. A large file is in the store as soon as it is decoded; its fingerprint follows (the store's
 * `fingerprintKnown`), and the library keeps it then. On a problem nothing changes and the outcome names the file
 * and the place.
 */
export async function openRecording(req: OpenRequest, onProgress: (phase: IntakePhase, fraction: number) => void): Promise<OpenOutcome> {
  const { blob, fileName, kind, from, events } = req;
  let openCount: number | null = null;
  // Before the recording is handed over, progress is the Source screen's; after, only the late fingerprint's.
  const progress = (phase: IntakePhase, fraction: number) => {
    if (openCount === null) onProgress(phase, fraction);
    else if (phase === 'fingerprint') useWorkspace.getState().fingerprintWaits(openCount, { state: 'computing', fraction });
  };
  const result = await openRecordingFile(blob, kind.kind === 'csv' ? { ...kind, events: events?.blob ?? null } : kind, progress, kind.kind === 'edf' ? (events?.blob ?? null) : null);
  if (!result.ok) return { ok: false, fileName: result.error.file === 'events' && events ? events.name : fileName, error: result.error };
  // Only a file fetched from the demo cohort is known to be demo data; a local file with a demo-like name is not.
  const isDemo = from === 'demo cohort';
  // The file name and header identification must never leave the device; the outbound wrapper refuses them. A demo
  // file's name and header were written by the server's own demo generator (an invented scenario): guarding them
  // would only refuse the next demo file's address (its header names the scenario, "HARBOUR-LIGHTS").
  guardAgainst('source-recording', [
    ...(isDemo ? [] : [fileName]),
    ...(events && !isDemo ? [events.name] : []),
    ...(result.local.identifying && !isDemo ? [result.local.identifying.patient, result.local.identifying.recording] : []),
  ]);
  const reading = readingOf(kind);
  const store = useWorkspace.getState;
  const known = typeof result.fingerprint === 'string' ? result.fingerprint : null;
  store().load({ recording: result.recording, local: { ...result.local, fileName, ...(reading ? { reading } : {}) }, fingerprint: known });
  openCount = store().openCount;
  if (req.demoCode && store().subjectCode.trim() === '') store().set({ subjectCode: req.demoCode });
  if (events?.pairing) {
    // Paired with the open EDF: the events file's labels become conditions beside the ones already chosen.
    const claimed = new Set(store().conditions.flatMap((c) => c.labels));
    const added = conditionsPerLabel(result.recording.events.filter((e) => !claimed.has(e.label)));
    if (added.length > 0) store().setConditions([...store().conditions, ...added.filter((c) => !store().conditions.some((k) => k.name === c.name))]);
  }
  const keep = async (fingerprint: string): Promise<string | null> => {
    const entry: LibraryEntry = {
      fingerprint,
      fileName,
      sizeBytes: blob.size,
      openedAt: new Date().toISOString(),
      kind: kind.kind,
      csv: kind.kind === 'csv' ? { sampleRateHz: kind.sampleRateHz, delimiter: kind.delimiter, eventsFileName: events?.name ?? null } : null,
      edf: reading,
      ...(kind.kind === 'edf' ? { edfEventsFileName: events?.name ?? null } : {}),
    };
    try {
      await req.library.keep(entry, blob, events?.blob ?? null);
      return null;
    } catch (error) {
      return error instanceof LibraryFullError ? error.message : `The recording is open but could not be kept in the library: ${String(error)}`;
    }
  };
  if (known !== null) {
    const libraryNotice = await keep(known);
    return { ok: true, channels: result.recording.channelNames, libraryNotice, kept: Promise.resolve(libraryNotice) };
  }
  // The fingerprint follows: the store learns it (unless another recording was opened meanwhile), then the library
  // keeps the file under it (it was opened, whatever came after). A file that cannot be hashed stays open here,
  // unsaved and unkept, and says why.
  const count = openCount;
  const kept = (result.fingerprint as Promise<string>).then(
    (fingerprint) => {
      if (store().openCount === count) adoptFingerprint(store().recording!, fingerprint);
      store().fingerprintKnown(count, fingerprint);
      return keep(fingerprint);
    },
    (error: unknown) => {
      const message = `${error instanceof Error ? error.message : String(error)}. The recording is open, but this browser cannot keep its workspace or a library copy, nor start an analysis session for it; open it again to retry.`;
      store().fingerprintWaits(count, { state: 'failed', message });
      return null;
    },
  );
  return { ok: true, channels: result.recording.channelNames, libraryNotice: null, kept };
}
