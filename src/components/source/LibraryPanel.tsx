import { useEffect, useState } from 'react';
import { removeSharedLegacyLibrary, storageEstimate, type Library, type LibraryEntry } from '../../lib/client/library';
import { formatBytes, storageShare, shortFingerprint } from './format';

interface Props {
  /** The signed-in account's library. */
  library: Library;
  /** Entries not opened for this many days are removed (the server's `libraryDays` setting). */
  expiryDays: number;
  /** Bumped by the screen whenever it adds to the library. */
  version: number;
  busy: boolean;
  currentFingerprint: string | null;
  onReopen: (entry: LibraryEntry) => void;
  notice: string | null;
}

/**
 * How much of this browser's storage quota the site uses: the numbers, the share, and a bar filled by that share (a
 * native <progress> painted a near-empty share as a full grey track, so the bar is drawn here: an outlined track, a
 * kelp fill that is never thinner than a sliver when anything is stored).
 */
function StorageMeter({ usage, quota }: { usage: number; quota: number }) {
  const share = storageShare(usage, quota);
  return (
    <div className="grid gap-1 text-sm" data-testid="storage-meter" data-fill-percent={share.fillPercent.toFixed(3)}>
      <p id="library-usage-label">
        Storage used: <span className="font-mono">{formatBytes(usage)}</span> of <span className="font-mono">{formatBytes(quota)}</span> this browser
        allows (<span className="font-mono">{share.text}</span>)
      </p>
      <div
        role="meter"
        aria-labelledby="library-usage-label"
        aria-valuemin={0}
        aria-valuemax={100}
        aria-valuenow={Number((share.fraction * 100).toFixed(4))}
        aria-valuetext={`${formatBytes(usage)} of ${formatBytes(quota)}, ${share.text}`}
        className="h-2.5 w-full overflow-hidden rounded-full border border-ink-soft bg-foam"
      >
        <div className="h-full rounded-full bg-kelp" style={{ width: `${share.fillPercent}%` }} />
      </div>
    </div>
  );
}

/** Recordings kept in this browser (IndexedDB), with the storage quota; nothing of it leaves the device. */
export default function LibraryPanel({ library, expiryDays, version, busy, currentFingerprint, onReopen, notice }: Props) {
  const [entries, setEntries] = useState<LibraryEntry[] | null>(null);
  const [estimate, setEstimate] = useState<{ usage: number; quota: number } | null>(null);
  const [problem, setProblem] = useState<string | null>(null);
  const [confirmAll, setConfirmAll] = useState(false);
  const [own, setOwn] = useState(0);
  const [expired, setExpired] = useState<LibraryEntry[]>([]);
  const [legacyRemoved, setLegacyRemoved] = useState(false);

  useEffect(() => {
    removeSharedLegacyLibrary().then((held) => held && setLegacyRemoved(true), () => undefined);
  }, []);

  useEffect(() => {
    let live = true;
    (async () => {
      const gone = await library.expire(expiryDays);
      return [gone, await library.list(), await storageEstimate()] as const;
    })()
      .then(([gone, list, est]) => {
        if (!live) return;
        if (gone.length > 0) setExpired((seen) => [...seen, ...gone.filter((g) => !seen.some((s) => s.fingerprint === g.fingerprint))]);
        setEntries(list);
        setEstimate(est);
        setProblem(null);
      })
      .catch((error: unknown) => live && setProblem(`The library could not be read: ${error instanceof Error ? error.message : String(error)}`));
    return () => {
      live = false;
    };
  }, [library, expiryDays, version, own]);

  const refresh = () => setOwn((n) => n + 1);

  return (
    <div className="grid gap-3" data-testid="library">
      <p className="text-sm text-ink-soft">
        Kept in this browser only (IndexedDB), for your account, never synchronised. Each recording is removed{' '}
        {formatDays(expiryDays)} after you last opened it, and at sign-out unless you keep it.
      </p>
      {estimate && <StorageMeter usage={estimate.usage} quota={estimate.quota} />}
      {expired.length > 0 && (
        <div className="notice notice-warn grid gap-1" role="status" data-testid="library-expired">
          <p>
            Not opened for {formatDays(expiryDays)}, so removed from this browser ({expired.length === 1 ? '1 recording' : `${expired.length} recordings`}; the
            files on your disk are not touched):
          </p>
          <ul className="ml-4 list-disc text-sm">
            {expired.map((e) => (
              <li key={e.fingerprint}>
                <span className="break-all">{e.fileName}</span> <span className="text-xs text-ink-soft">last opened {new Date(e.openedAt).toLocaleDateString()}</span>
              </li>
            ))}
          </ul>
          <button type="button" className="btn btn-quiet justify-self-start" onClick={() => setExpired([])}>
            Dismiss
          </button>
        </div>
      )}
      {legacyRemoved && (
        <p className="notice notice-warn" role="status" data-testid="library-legacy-removed">
          This browser still held recordings from before each account had its own library. They could belong to anyone
          who used this browser, so they were removed; open your files again to keep them in your library.
        </p>
      )}
      {notice && (
        <p className="notice notice-warn" role="alert" data-testid="library-notice">
          {notice}
        </p>
      )}
      {problem && <p className="notice notice-warn">{problem}</p>}
      {entries && entries.length === 0 && <p className="text-sm">The library is empty.</p>}
      {entries && entries.length > 0 && (
        <>
          <ul className="grid gap-2" aria-label="Recordings in this browser">
            {entries.map((e) => (
              <li key={e.fingerprint} className="rounded border border-sand-deep bg-foam p-3 text-sm" data-testid="library-entry">
                <div className="flex flex-wrap items-baseline justify-between gap-2">
                  <span className="font-semibold break-all">{e.fileName}</span>
                  <span className="font-mono text-xs">{formatBytes(e.sizeBytes)}</span>
                </div>
                <div className="font-mono text-xs text-ink-soft break-all" title={e.fingerprint}>
                  SHA-256 {shortFingerprint(e.fingerprint)}
                </div>
                <div className="text-xs text-ink-soft">
                  opened {new Date(e.openedAt).toLocaleString()} · {e.kind === 'csv' ? `sample matrix, ${e.csv?.sampleRateHz} Hz` : 'EDF'}
                  {e.fingerprint === currentFingerprint && ' · open now'}
                </div>
                <div className="mt-2 flex flex-wrap gap-2">
                  <button type="button" className="btn btn-quiet" disabled={busy} onClick={() => onReopen(e)} aria-label={`Reopen ${e.fileName}`}>
                    Reopen
                  </button>
                  <button
                    type="button"
                    className="btn btn-quiet"
                    aria-label={`Remove ${e.fileName} from this browser`}
                    onClick={() => library.remove(e.fingerprint).then(refresh, (err: unknown) => setProblem(String(err)))}
                  >
                    Remove
                  </button>
                </div>
              </li>
            ))}
          </ul>
          {!confirmAll ? (
            <button type="button" className="btn btn-quiet justify-self-start" onClick={() => setConfirmAll(true)}>
              Remove all…
            </button>
          ) : (
            <div className="notice notice-warn flex flex-wrap items-center gap-2" role="group" aria-label="Confirm removing all">
              <span>Remove all {entries.length} recordings from this browser? The files on your disk are not touched.</span>
              <button
                type="button"
                className="btn btn-primary"
                onClick={() =>
                  library.clear().then(
                    () => {
                      setConfirmAll(false);
                      refresh();
                    },
                    (err: unknown) => setProblem(String(err)),
                  )
                }
              >
                Remove all
              </button>
              <button type="button" className="btn btn-quiet" onClick={() => setConfirmAll(false)}>
                Keep them
              </button>
            </div>
          )}
        </>
      )}
    </div>
  );
}

const formatDays = (days: number) => (days === 1 ? '1 day' : `${Number.isInteger(days) ? days : days.toFixed(1)} days`);
