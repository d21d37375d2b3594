// Where the Recipe screen shows the core's verdict on a recipe: a problem's dotted recipe path mapped to the input
// (or group of inputs) that can fix it; a problem no input shows is written under the form.

/** The field group of the input that shows a core error for `field` (a dotted recipe path). */
export function fieldGroup(field: string): string {
  if (field.startsWith('channels')) return 'channels';
  if (field.startsWith('epochs.events')) return 'conditions';
  if (field.startsWith('cycles')) return 'cycles';
  if (field.startsWith('baseline')) return 'baseline';
  if (field.startsWith('channelGroups')) return 'channelGroups';
  return field;
}

/** The field groups the Recipe screen shows beside an input. */
const SHOWN_AT_AN_INPUT = new Set(['frequencies.min', 'frequencies.max', 'frequencies.count', 'cycles', 'conditions', 'channels', 'epochs.start', 'epochs.end', 'spectrum.segment', 'spectrum.overlap', 'aperiodic.range', 'baseline', 'channelGroups', 'trialPower']);

/** Whether a problem in field group `group` has no input of its own to be shown at. */
export const shownUnderTheForm = (group: string): boolean => !SHOWN_AT_AN_INPUT.has(group);

/** Kept epochs per condition name. */
export function keptByCondition(decisions: readonly { condition: string; rejected: boolean }[]): Map<string, number> {
  const kept = new Map<string, number>();
  for (const d of decisions) if (!d.rejected) kept.set(d.condition, (kept.get(d.condition) ?? 0) + 1);
  return kept;
}

/** The draft's `conditions` after condition `name` is ticked on or off; an empty list means every condition. */
export function conditionsToggled(all: readonly string[], chosen: readonly string[], name: string): string[] {
  const current = chosen.length === 0 ? all : chosen;
  const next = current.includes(name) ? current.filter((n) => n !== name) : [...current, name];
  return next.length === all.length ? [] : next;
}
