import { useEffect } from 'react';
import { historyKeyOf, keepOwnEdits, redo, saveNow, startClean, takeSavedOffer, undo, useWorkspace, useWorkspaceMemory } from '../../lib/client/workspace';

// One formatter (the same text as toLocaleString with these options, which builds a new one on every call).
let formatter: Intl.DateTimeFormat | null = null;

function timeOf(iso: string): string {
  const d = new Date(iso);
  if (Number.isNaN(d.getTime())) return iso;
  formatter ??= new Intl.DateTimeFormat(undefined, { dateStyle: 'medium', timeStyle: 'medium' });
  return formatter.format(d);
}

/**
 * Undo / redo of every workspace edit and what this browser keeps of the workspace: paints the controller's
 * memory and sends the keys and buttons to it.
 */
export default function MemoryBar() {
  const { canUndo, canRedo, restoredFrom, savedAt, problem, offer } = useWorkspaceMemory();
  const open = useWorkspace((s) => s.recording !== null);
  // A large file is shown before its fingerprint, the key its edits are kept under, is known.
  const keyless = useWorkspace((s) => (s.fingerprint !== null ? null : s.fingerprintWait?.state === 'failed' ? 'failed' : 'fingerprint'));
  useEffect(() => {
    const onKey = (event: KeyboardEvent) => {
      const wanted = historyKeyOf(event, event.target);
      if (wanted === null) return;
      event.preventDefault();
      if (wanted === 'undo') undo();
      else redo();
    };
    // A reload or a closed tab saves what is still waiting.
    const onHide = () => void saveNow();
    window.addEventListener('keydown', onKey);
    window.addEventListener('pagehide', onHide);
    return () => {
      window.removeEventListener('keydown', onKey);
      window.removeEventListener('pagehide', onHide);
    };
  }, []);
  if (!open) return null;
  return (
    <div className="mt-3 flex flex-wrap items-center gap-3 text-sm" data-testid="memory-bar">
      <button type="button" className="btn btn-quiet disabled:opacity-50" disabled={!canUndo} onClick={() => undo()} aria-keyshortcuts="Control+Z Meta+Z" data-testid="undo">
        ↶ Undo
      </button>
      <button type="button" className="btn btn-quiet disabled:opacity-50" disabled={!canRedo} onClick={() => redo()} aria-keyshortcuts="Control+Shift+Z Meta+Shift+Z Control+Y" data-testid="redo">
        ↷ Redo
      </button>
      {restoredFrom !== null && (
        <span className="flex flex-wrap items-center gap-2" role="status" data-testid="restored-line">
          <span>
            Restored from <time dateTime={restoredFrom}>{timeOf(restoredFrom)}</time>: your last work on this recording in this browser.
          </span>
          <button type="button" className="text-kelp-deep underline" onClick={() => void startClean()} data-testid="start-clean">
            Start clean
          </button>
        </span>
      )}
      {offer !== null && (
        <span className="notice flex flex-wrap items-center gap-2" role="status" data-testid="saved-offer">
          <span>
            This browser also holds your work on this recording from <time dateTime={offer.savedAt}>{timeOf(offer.savedAt)}</time>, found after you had
            started editing. Yours stays unless you choose:
          </span>
          <button type="button" className="text-kelp-deep underline" onClick={() => takeSavedOffer()} data-testid="take-offer">
            Bring back that work (Undo returns to yours)
          </button>
          <button type="button" className="text-kelp-deep underline" onClick={() => keepOwnEdits()} data-testid="keep-own">
            Keep mine
          </button>
        </span>
      )}
      <span className="ml-auto text-xs text-ink-soft" data-testid="saved-line" data-saved-at={savedAt ?? ''} data-waiting={keyless ?? undefined}>
        {keyless === 'failed'
          ? 'Edits are not kept in this browser: the recording has no fingerprint to keep them under (the Source screen says why).'
          : keyless === 'fingerprint'
          ? 'Edits wait for the fingerprint, then are kept in this browser for your account (settings only, no samples).'
          : savedAt !== null
            ? `Kept in this browser for your account (settings only, no samples) at ${timeOf(savedAt)}`
            : 'Edits are kept in this browser for your account as you work (settings only, no samples).'}
      </span>
      {problem !== null && (
        <span className="notice notice-warn w-full" role="alert">
          {problem}
        </span>
      )}
    </div>
  );
}
