import { useEffect } from 'react';
import { historyKeyOf, redo, saveNow, startClean, undo, useWorkspace, useWorkspaceMemory } from '../../lib/client/workspace';

function timeOf(iso: string): string {
  const d = new Date(iso);
  return Number.isNaN(d.getTime()) ? iso : d.toLocaleString(undefined, { dateStyle: 'medium', timeStyle: 'medium' });
}

/**
 * Undo / redo of every workspace edit and what this browser keeps of the workspace: paints the controller's
 * memory and sends the keys and buttons to it.
 */
export default function MemoryBar() {
  const { canUndo, canRedo, restoredFrom, savedAt, problem } = useWorkspaceMemory();
  const open = useWorkspace((s) => s.recording !== null);
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
      <span className="ml-auto text-xs text-ink-soft" data-testid="saved-line" data-saved-at={savedAt ?? ''}>
        {savedAt !== null ? `Kept in this browser for your account (settings only, no samples) at ${timeOf(savedAt)}` : 'Edits are kept in this browser for your account as you work (settings only, no samples).'}
      </span>
      {problem !== null && (
        <span className="notice notice-warn w-full" role="alert">
          {problem}
        </span>
      )}
    </div>
  );
}
