import { decideEpochs, eventsWithSelection } from './source-rules';
import type { WorkspaceData } from './store';

/**
 * The fields of the workspace a person edits: the whole recipe (conditions, window, rejection with its manual
 * keep/reject decisions, conditioning, event selection, the Recipe screen's draft, baseline, fit range) and the
 * view (channel and condition choices, bands, windows, display choices). These are what undo walks back and what
 * is saved in this browser; the recording itself, its samples and derived values (decisions, results) are not.
 */
export const EDIT_FIELDS = [
  'conditions',
  'epochWindow',
  'rejection',
  'conditioning',
  'eventSelection',
  'draft',
  'baseline',
  'method',
  'scope',
  'spread',
  'fitRange',
  'bands',
  'windows',
  'channel',
  'condition',
  'compareTo',
  'channelGroup',
  'contrastBaseline',
  'rawScale',
  'spectrumAxes',
  'heldLimits',
  'subjectCode',
] as const satisfies readonly (keyof WorkspaceData)[];

export type EditField = (typeof EDIT_FIELDS)[number];
export type WorkspaceEdits = Pick<WorkspaceData, EditField>;

/**
 * Fields changed continuously (a drag, typing digits): changes of the same field within a moment are one undo step.
 * Discrete choices (a condition, a keep/reject decision) are always a step of their own.
 */
export const GLIDING_FIELDS: ReadonlySet<EditField> = new Set(['baseline', 'fitRange', 'epochWindow', 'draft', 'bands', 'windows', 'subjectCode']);

export function editsOf(state: WorkspaceData): WorkspaceEdits {
  const out = {} as Record<EditField, unknown>;
  for (const f of EDIT_FIELDS) out[f] = state[f];
  return out as WorkspaceEdits;
}

/** The fields whose values differ (by reference: the store replaces what it changes). */
export function changedFields(a: WorkspaceEdits, b: WorkspaceEdits): EditField[] {
  return EDIT_FIELDS.filter((f) => a[f] !== b[f]);
}

/**
 * The store patch that puts `edits` in place on `state`'s recording: events re-chosen from the paired events file
 * when the selection differs, and the epoch decisions recomputed (they derive from the edits).
 */
export function patchFor(state: WorkspaceData, edits: WorkspaceEdits): Partial<WorkspaceData> {
  let recording = state.recording;
  const table = state.local?.eventTable;
  if (recording !== null && table !== undefined && JSON.stringify(edits.eventSelection) !== JSON.stringify(state.eventSelection)) {
    try {
      recording = eventsWithSelection(recording, table, edits.eventSelection);
    } catch {
      // A saved selection that no longer fits the table keeps the events as they are; decisions say what is wrong.
    }
  }
  return { ...edits, recording, ...decideEpochs({ ...edits, recording }) };
}

/** Only the saved fields, checked loosely: a saved workspace from another version keeps what it has in common. */
export function savedEditsOf(value: unknown, fallback: WorkspaceEdits): WorkspaceEdits {
  const out = { ...fallback } as Record<EditField, unknown>;
  if (value === null || typeof value !== 'object') return fallback;
  for (const f of EDIT_FIELDS) if (f in value) out[f] = (value as Record<string, unknown>)[f];
  return out as WorkspaceEdits;
}
