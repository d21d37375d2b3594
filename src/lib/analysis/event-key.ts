import type { RecordingEvent } from './recording';

/**
 * The key of a recipe's manual epoch decision: `<index>@<onset seconds>:<label>`, e.g. `12@30.25:cue/left`, where
 * index is the event's position in the recording's event list and the onset is written as JavaScript's shortest
 * round-trip decimal. Re-reading the same file gives the same key; another file almost never does.
 */
export const EVENT_KEY = /^(0|[1-9][0-9]*)@(-?[0-9]+(?:\.[0-9]+)?(?:e[-+]?[0-9]+)?):(.+)$/s;

/** The key of `events[index]` (see EVENT_KEY). */
export function eventKey(index: number, event: RecordingEvent): string {
  return `${index}@${String(event.onsetSeconds)}:${event.label}`;
}

/** The parts of a key, or null when it does not have the EVENT_KEY shape. */
export function parseEventKey(key: string): { index: number; onsetSeconds: number; label: string } | null {
  const m = EVENT_KEY.exec(key);
  if (m === null) return null;
  return { index: Number(m[1]), onsetSeconds: Number(m[2]), label: m[3] };
}
