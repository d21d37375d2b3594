import { useId, useRef, useState, type DragEvent } from 'react';
import { kindOfFileName } from '../../lib/client/intake';

export interface CsvChoice {
  sampleRateHz: number;
  delimiter: ',' | '\t';
  events: File | null;
}

interface Props {
  busy: boolean;
  onOpenEdf: (file: File, events: File | null) => void;
  onOpenCsv: (file: File, choice: CsvChoice) => void;
  /** A BIDS events file chosen or dropped on its own: pair it with the open EDF. */
  onEvents: (file: File) => void;
  /** A file of a kind we do not read. */
  onRefuse: (message: string) => void;
}

/** Drag and drop or pick a recording; a CSV/TSV matrix asks for its sample rate and an optional BIDS events file. */
export default function OpenPanel({ busy, onOpenEdf, onOpenCsv, onEvents, onRefuse }: Props) {
  const [dragging, setDragging] = useState(false);
  const [pendingCsv, setPendingCsv] = useState<File | null>(null);
  const [events, setEvents] = useState<File | null>(null);
  const [rate, setRate] = useState('');
  const [rateError, setRateError] = useState<string | null>(null);
  const input = useRef<HTMLInputElement>(null);
  const id = useId();

  const take = (files: File[]) => {
    if (files.length === 0) return;
    const kinds = files.map((f) => ({ file: f, kind: kindOfFileName(f.name) }));
    const edf = kinds.find((k) => k.kind === 'edf');
    const table = kinds.find((k) => k.kind === 'csv' || k.kind === 'tsv');
    const eventsFile = kinds.find((k) => k.kind === 'events');
    if (edf) {
      onOpenEdf(edf.file, eventsFile?.file ?? null);
      return;
    }
    if (table) {
      setPendingCsv(table.file);
      setEvents(eventsFile?.file ?? null);
      return;
    }
    if (eventsFile && pendingCsv) {
      setEvents(eventsFile.file);
      return;
    }
    if (eventsFile) {
      onEvents(eventsFile.file);
      return;
    }
    onRefuse(`"${files[0].name}" is not a recording Tidemark reads: choose an EDF/EDF+ file (.edf) or a CSV/TSV sample matrix (.csv, .tsv).`);
  };

  const onDrop = (e: DragEvent<HTMLDivElement>) => {
    e.preventDefault();
    setDragging(false);
    if (busy) return;
    take([...(e.dataTransfer?.files ?? [])]);
  };

  const submitCsv = () => {
    if (!pendingCsv) return;
    const hz = Number(rate);
    if (rate.trim() === '' || !Number.isFinite(hz) || hz <= 0 || hz > 100_000) {
      setRateError('Enter the sample rate in Hz, a positive number up to 100 000 (the file does not say it).');
      return;
    }
    setRateError(null);
    const delimiter = kindOfFileName(pendingCsv.name) === 'csv' ? ',' : '\t';
    onOpenCsv(pendingCsv, { sampleRateHz: hz, delimiter, events });
    setPendingCsv(null);
    setEvents(null);
  };

  return (
    <div className="grid gap-3">
      <div
        data-testid="drop-zone"
        role="group"
        aria-label="Drop a recording here"
        onDragEnter={(e) => {
          e.preventDefault();
          setDragging(true);
        }}
        onDragOver={(e) => {
          e.preventDefault();
          if (e.dataTransfer) e.dataTransfer.dropEffect = 'copy';
        }}
        onDragLeave={() => setDragging(false)}
        onDrop={onDrop}
        className={`grid place-items-center gap-2 rounded border-2 border-dashed p-6 text-center ${dragging ? 'border-kelp bg-kelp-pale' : 'border-shell bg-foam'}`}
      >
        <p className="font-semibold">Drop an EDF/EDF+ or CSV/TSV recording here, with its BIDS events .tsv if it has one</p>
        <p className="text-sm text-ink-soft">It is read on this device and never uploaded.</p>
        <input
          ref={input}
          id={`${id}-file`}
          type="file"
          className="peer sr-only"
          accept=".edf,.rec,.csv,.tsv,.txt"
          multiple
          disabled={busy}
          onChange={(e) => {
            take([...(e.target.files ?? [])]);
            e.target.value = '';
          }}
        />
        {/* The input comes first so its keyboard focus can show on the visible label (Tailwind's peer). */}
        <label htmlFor={`${id}-file`} className="btn btn-quiet peer-focus-visible:outline-2 peer-focus-visible:outline-kelp">
          Choose a recording file…
        </label>
      </div>

      {pendingCsv && (
        <form
          className="card grid gap-3"
          aria-label="Read a sample matrix"
          onSubmit={(e) => {
            e.preventDefault();
            submitCsv();
          }}
        >
          <p className="text-sm">
            <span className="font-semibold">{pendingCsv.name}</span> is a sample matrix: one column per channel (header row of names),
            values in µV. Its sample rate is not in the file.
          </p>
          <div className="field">
            <label htmlFor={`${id}-rate`}>Sample rate (Hz)</label>
            <input
              id={`${id}-rate`}
              inputMode="decimal"
              value={rate}
              onChange={(e) => setRate(e.target.value)}
              aria-invalid={rateError !== null}
              aria-describedby={rateError ? `${id}-rate-error` : undefined}
              required
            />
            {rateError && (
              <p id={`${id}-rate-error`} className="field-error">
                {rateError}
              </p>
            )}
          </div>
          <div className="field">
            <label htmlFor={`${id}-events`}>Events file (BIDS events .tsv, optional)</label>
            <input id={`${id}-events`} type="file" accept=".tsv,.txt" onChange={(e) => setEvents(e.target.files?.[0] ?? null)} />
            {events && <p className="text-sm text-ink-soft">Events: {events.name}</p>}
          </div>
          <div className="flex flex-wrap gap-2">
            <button type="submit" className="btn btn-primary" disabled={busy}>
              Read the matrix
            </button>
            <button type="button" className="btn btn-quiet" onClick={() => setPendingCsv(null)}>
              Cancel
            </button>
          </div>
        </form>
      )}
    </div>
  );
}
