import { AnalysisInputError } from './errors';
import type { RecordingEvent } from './recording';

export interface LabelCount {
  label: string;
  count: number;
  /** Onset of the first event with this label, seconds from the first sample. */
  firstOnsetSeconds: number;
}

/** A named condition grouping one or several event labels. */
export interface ConditionSpec {
  name: string;
  labels: readonly string[];
}

/** One event that belongs to a condition; `eventIndex` indexes the recording's events. */
export interface EpochAssignment {
  eventIndex: number;
  condition: string;
  onsetSeconds: number;
}

/** Distinct event labels with their counts, in order of first appearance (events are sorted by onset). */
export function countLabels(events: readonly RecordingEvent[]): LabelCount[] {
  const byLabel = new Map<string, LabelCount>();
  for (const e of events) {
    const found = byLabel.get(e.label);
    if (found) found.count++;
    else byLabel.set(e.label, { label: e.label, count: 1, firstOnsetSeconds: e.onsetSeconds });
  }
  return [...byLabel.values()];
}

// Slash and colon too: the contract's own labels look like "cue/left", and a condition may be named after its label.
const NAME = /^[\p{L}\p{N}][\p{L}\p{N} ._/:-]*$/u;

/**
 * Checks a list of conditions: names present, at most 40 characters of letters, digits, space, dot, dash, slash, colon or
 * underscore, unique; every condition holds at least one label; no label belongs to two conditions. Throws an
 * AnalysisInputError naming the condition (`conditions[1].labels`) and the problem.
 */
export function checkConditions(conditions: readonly ConditionSpec[]): void {
  const names = new Map<string, number>();
  const owner = new Map<string, string>();
  conditions.forEach((c, i) => {
    const name = c.name.trim();
    if (name === '') throw new AnalysisInputError(`conditions[${i}].name`, 'is empty: give the condition a name');
    if (name.length > 40) throw new AnalysisInputError(`conditions[${i}].name`, 'is longer than 40 characters');
    if (!NAME.test(name)) throw new AnalysisInputError(`conditions[${i}].name`, `"${name}" may hold only letters, digits, space, dot, dash, underscore, slash and colon`);
    const twin = names.get(name.toLowerCase());
    if (twin !== undefined) throw new AnalysisInputError(`conditions[${i}].name`, `"${name}" is already the name of condition ${twin + 1}`);
    names.set(name.toLowerCase(), i);
    if (c.labels.length === 0) throw new AnalysisInputError(`conditions[${i}].labels`, 'is empty: pick at least one event label');
    for (const label of c.labels) {
      const other = owner.get(label);
      if (other !== undefined) throw new AnalysisInputError(`conditions[${i}].labels`, `label "${label}" already belongs to condition "${other}"`);
      owner.set(label, name);
    }
  });
}

/** Every event whose label belongs to a condition, in event order, with that condition's name. */
export function assignConditions(events: readonly RecordingEvent[], conditions: readonly ConditionSpec[]): EpochAssignment[] {
  checkConditions(conditions);
  const conditionOf = new Map<string, string>();
  for (const c of conditions) for (const label of c.labels) conditionOf.set(label, c.name.trim());
  const out: EpochAssignment[] = [];
  for (let i = 0; i < events.length; i++) {
    const condition = conditionOf.get(events[i].label);
    if (condition !== undefined) out.push({ eventIndex: i, condition, onsetSeconds: events[i].onsetSeconds });
  }
  return out;
}
