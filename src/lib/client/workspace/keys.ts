/** What a key press asks of the history, or null. */
export type HistoryKey = 'undo' | 'redo' | null;

/**
 * Ctrl/Cmd+Z undoes, Ctrl/Cmd+Shift+Z and Ctrl+Y redo (common practice on Windows, Linux and macOS). A press inside
 * a text field, a number field, a text area or editable content is left to that field's own undo.
 */
export function historyKeyOf(event: Pick<KeyboardEvent, 'key' | 'ctrlKey' | 'metaKey' | 'shiftKey' | 'altKey'>, target: EventTarget | null): HistoryKey {
  if (!(event.ctrlKey || event.metaKey) || event.altKey) return null;
  if (typesText(target)) return null;
  const key = event.key.toLowerCase();
  if (key === 'z') return event.shiftKey ? 'redo' : 'undo';
  if (key === 'y' && event.ctrlKey && !event.shiftKey) return 'redo';
  return null;
}

const NOT_TEXT = new Set(['button', 'checkbox', 'radio', 'range', 'color', 'file', 'submit', 'reset', 'image']);

function typesText(target: EventTarget | null): boolean {
  const el = target as { tagName?: string; type?: string; isContentEditable?: boolean } | null;
  if (el === null || typeof el.tagName !== 'string') return false;
  const tag = el.tagName.toUpperCase();
  if (tag === 'TEXTAREA') return true;
  if (tag === 'INPUT') return !NOT_TEXT.has((el.type ?? 'text').toLowerCase());
  return el.isContentEditable === true;
}
