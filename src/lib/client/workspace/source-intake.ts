import { useCallback, useRef, useState } from 'react';
import type { IntakePhase, IntakeProblem, RecordingKind } from '../intake';
import type { Library, LibraryEntry } from '../library';
import { errorMessageOf, send } from '../outbound';
import { openRecording, type Origin } from './open-recording';
import { useWorkspace } from './store';

/** What the intake is doing with which file, and how far it is. */
export interface IntakeBusy {
  fileName: string;
  phase: IntakePhase | 'download';
  fraction: number;
}

/** A file that could not be opened, and where in it the problem is. */
export interface IntakeRefusal {
  fileName: string;
  error: IntakeProblem;
}

type EventsFile = { blob: Blob; name: string; pairing?: boolean } | null;

/** The last open attempt, so a reading choice or an events file can open the same file again. */
interface Attempt {
  blob: Blob;
  fileName: string;
  kind: RecordingKind;
  from: Origin;
  events: EventsFile;
  demoCode?: string;
}

/**
 * The Source screen's intake: opens a file, a demo subject or a library entry through `openRecording`, reports
 * progress and problems, and remembers the last attempt so the same file can be read again with an events file or
 * a reading choice. Also the screen's overview choices that a new recording resets (channel shown, event picked).
 */
export function useSourceIntake(library: Library) {
  const [busy, setBusy] = useState<IntakeBusy | null>(null);
  const [problem, setProblem] = useState<IntakeRefusal | null>(null);
  const [libraryNotice, setLibraryNotice] = useState<string | null>(null);
  const [libraryVersion, setLibraryVersion] = useState(0);
  const [origin, setOrigin] = useState<Origin>('your file');
  const [overviewChannel, setOverviewChannel] = useState('');
  const [selectedEvent, setSelectedEvent] = useState<number | null>(null);
  const lastAttempt = useRef<Attempt | null>(null);
  /** Counts openings: an opening overtaken by a newer one (a large file still hashing) changes nothing on screen. */
  const attempts = useRef(0);

  const refuse = (fileName: string, message: string) =>
    setProblem({ fileName, error: { file: 'recording', message, problem: message, field: null, byteOffset: null, signal: null, row: null, column: null, dimension: null } });

  const open = useCallback(
    async (blob: Blob, fileName: string, kind: RecordingKind, from: Origin, events: EventsFile = null, demoCode?: string) => {
      const attempt = ++attempts.current;
      const current = () => attempt === attempts.current;
      setBusy({ fileName, phase: 'reading', fraction: 0 });
      setLibraryNotice(null);
      setProblem(null);
      lastAttempt.current = { blob, fileName, kind, from, events, demoCode };
      // Progress arrives on its own message port, so a late report can follow the result: ignore it then.
      let finished = false;
      try {
        const outcome = await openRecording({ blob, fileName, kind, from, events, demoCode, library }, (phase, fraction) => {
          if (!finished && current()) setBusy({ fileName, phase, fraction });
        });
        finished = true;
        if (!current()) return;
        if (!outcome.ok) {
          setProblem({ fileName: outcome.fileName, error: outcome.error });
          return;
        }
        setProblem(null);
        setOrigin(from);
        setOverviewChannel(outcome.channels[0] ?? '');
        setSelectedEvent(null);
        setLibraryNotice(outcome.libraryNotice);
        // A large file is kept once its fingerprint is known, after it is already on screen.
        void outcome.kept.then((notice) => {
          setLibraryVersion((v) => v + 1);
          if (notice !== null && current()) setLibraryNotice(notice);
        });
      } catch (error) {
        if (current()) refuse(fileName, `reading stopped unexpectedly: ${error instanceof Error ? error.message : String(error)}`);
      } finally {
        finished = true;
        if (current()) setBusy(null);
      }
    },
    // eslint-disable-next-line react-hooks/exhaustive-deps
    [],
  );

  /** An events file on its own pairs with the open EDF: the same file is read again with it. */
  const pairEvents = (file: File) => {
    const a = lastAttempt.current;
    if (a === null || a.kind.kind !== 'edf' || useWorkspace.getState().recording === null) {
      return refuse(file.name, 'is an events file: open an EDF/EDF+ recording first (or drop both together), or choose it with a CSV/TSV matrix.');
    }
    void open(a.blob, a.fileName, a.kind, a.from, { blob: file, name: file.name, pairing: true }, a.demoCode);
  };

  const openDemo = async (subject: { fileName: string; code: string }) => {
    setBusy({ fileName: subject.fileName, phase: 'download', fraction: 0 });
    try {
      const response = await send(`/demo/${encodeURIComponent(subject.fileName)}`);
      if (!response.ok) throw new Error(await errorMessageOf(response));
      const blob = await response.blob();
      await open(blob, subject.fileName, { kind: 'edf' }, 'demo cohort', null, subject.code);
    } catch (error) {
      setBusy(null);
      refuse(subject.fileName, `the demo file could not be fetched: ${error instanceof Error ? error.message : String(error)}`);
    }
  };

  const reopen = async (entry: LibraryEntry) => {
    const found = await library.file(entry.fingerprint);
    if (!found) return refuse(entry.fileName, 'it is no longer in this browser’s library.');
    const kind: RecordingKind =
      entry.kind === 'csv' && entry.csv
        ? { kind: 'csv', sampleRateHz: entry.csv.sampleRateHz, delimiter: entry.csv.delimiter, events: null }
        : { kind: 'edf', ...(entry.edf ?? {}) };
    const eventsName = entry.csv?.eventsFileName ?? entry.edfEventsFileName ?? null;
    const events = found.events && eventsName ? { blob: found.events, name: eventsName } : null;
    await open(found.blob, entry.fileName, kind, 'this browser’s library', events);
  };

  /** The last EDF attempt read again with its reading choices changed by `choose` (a unit decision). */
  const reopenEdfWith = (choose: (kind: RecordingKind & { kind: 'edf' }) => RecordingKind) => {
    const a = lastAttempt.current;
    if (!a || a.kind.kind !== 'edf') return;
    void open(a.blob, a.fileName, choose(a.kind), a.from, a.events, a.demoCode);
  };

  /** The signal and dimension of an unknown unit in the last EDF attempt, which a reading choice can settle. */
  const unknownUnit =
    problem && problem.error.file === 'recording' && problem.error.field === 'physical dimension' && problem.error.signal !== null && problem.error.dimension !== null && lastAttempt.current?.kind.kind === 'edf'
      ? { signal: problem.error.signal, dimension: problem.error.dimension }
      : null;

  return {
    busy,
    problem,
    dismissProblem: () => setProblem(null),
    refuse,
    libraryNotice,
    libraryVersion,
    origin,
    overviewChannel,
    setOverviewChannel,
    selectedEvent,
    setSelectedEvent,
    open,
    pairEvents,
    openDemo,
    reopen,
    reopenEdfWith,
    unknownUnit,
  };
}
