import { AnalysisInputError } from './errors';
import type { RecordingEvent } from './recording';

/**
 * The recipe's `eventTable` (DEVELOPERS.md, "Event tables"): which rows of a BIDS events file become events, what
 * labels them, and by how many seconds each onset moves (response-locked epochs).
 */
export interface EventTableSpec {
  /** Column whose value labels the event; default `trial_type` (BIDS). */
  labelColumn?: string;
  /** Conditions every selected row meets: `<column> <op> <value>`, op one of < <= > >= == != (e.g. `value == 3`). */
  where?: readonly string[];
  /** Column of seconds added to each onset (e.g. `response_time`): epochs then lock to that moment. */
  shiftBy?: string;
}

/** One row of an events file: its onset and duration in seconds and every cell by column name. */
export interface EventRow {
  onsetSeconds: number;
  durationSeconds: number;
  columns: Readonly<Record<string, string>>;
}

type Op = '<' | '<=' | '>' | '>=' | '==' | '!=';
const CONDITION = /^\s*([^<>=!\s]+)\s*(<=|>=|==|!=|<|>)\s*(.+?)\s*$/;
const NUMBER = /^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/;

function parseCondition(text: string, field: string, header: readonly string[]): { column: string; op: Op; value: string } {
  const m = CONDITION.exec(text);
  if (m === null) throw new AnalysisInputError(field, `"${text}" is not "<column> <op> <value>" with op one of < <= > >= == !=`);
  const [, column, op, raw] = m;
  if (!header.includes(column)) throw new AnalysisInputError(field, `names column "${column}", which the events file lacks (columns: ${header.join(', ')})`);
  const value = /^(["']).*\1$/.test(raw) ? raw.slice(1, -1) : raw;
  if ((op === '<' || op === '<=' || op === '>' || op === '>=') && !NUMBER.test(value)) {
    throw new AnalysisInputError(field, `compares "${column}" with ${op} to "${value}", which is not a number`);
  }
  return { column, op: op as Op, value };
}

function holds(cell: string, op: Op, value: string): boolean {
  if (cell === 'n/a' || cell === '') return false; // a missing value meets no condition
  const numeric = NUMBER.test(cell) && NUMBER.test(value);
  if (op === '==') return numeric ? Number(cell) === Number(value) : cell === value;
  if (op === '!=') return numeric ? Number(cell) !== Number(value) : cell !== value;
  if (!NUMBER.test(cell)) return false;
  const a = Number(cell);
  const b = Number(value);
  return op === '<' ? a < b : op === '<=' ? a <= b : op === '>' ? a > b : a >= b;
}

/**
 * The events an events table gives under `spec`: rows meeting every `where` condition, labelled by `labelColumn`,
 * onsets moved by `shiftBy` seconds; rows whose shift is missing or whose moved onset leaves [0, recordingSeconds)
 * are left out and counted in `warnings`. Rows keep file (onset) order. Throws AnalysisInputError naming the field.
 */
export function selectEventRows(rows: readonly EventRow[], header: readonly string[], spec: EventTableSpec, recordingSeconds: number): { events: RecordingEvent[]; warnings: string[] } {
  const labelColumn = spec.labelColumn ?? 'trial_type';
  if (spec.labelColumn !== undefined && !header.includes(labelColumn)) {
    throw new AnalysisInputError('eventTable.labelColumn', `names column "${labelColumn}", which the events file lacks (columns: ${header.join(', ')})`);
  }
  const conditions = (spec.where ?? []).map((w, i) => parseCondition(w, `eventTable.where[${i}]`, header));
  if (spec.shiftBy !== undefined && !header.includes(spec.shiftBy)) {
    throw new AnalysisInputError('eventTable.shiftBy', `names column "${spec.shiftBy}", which the events file lacks (columns: ${header.join(', ')})`);
  }
  const events: RecordingEvent[] = [];
  let unmet = 0;
  let noShift = 0;
  let outside = 0;
  for (const row of rows) {
    if (!conditions.every((c) => holds(row.columns[c.column] ?? '', c.op, c.value))) {
      unmet++;
      continue;
    }
    let onset = row.onsetSeconds;
    if (spec.shiftBy !== undefined) {
      const cell = row.columns[spec.shiftBy] ?? '';
      if (!NUMBER.test(cell)) {
        noShift++;
        continue;
      }
      onset += Number(cell);
      if (!(onset >= 0 && onset < recordingSeconds)) {
        outside++;
        continue;
      }
    }
    const label = (row.columns[labelColumn] ?? '').trim() || 'n/a';
    events.push({ onsetSeconds: onset, durationSeconds: row.durationSeconds, label });
  }
  const warnings: string[] = [];
  if (conditions.length > 0) warnings.push(`eventTable.where: ${rows.length - unmet} of ${rows.length} events selected`);
  if (noShift > 0) warnings.push(`eventTable.shiftBy: ${noShift} selected events have no number in "${spec.shiftBy}" and are left out`);
  if (outside > 0) warnings.push(`eventTable.shiftBy: ${outside} shifted events fall outside the recording and are left out`);
  return { events, warnings };
}
