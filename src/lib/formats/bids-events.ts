/**
 * Events files as the open BIDS standard defines them (BIDS specification, "Task events": a tab-separated file
 * whose first row names the columns; `onset` and `duration` in seconds are required, `trial_type` is optional,
 * `n/a` marks a missing value, other columns may follow and are ignored here).
 */
import type { RecordingEvent } from '../analysis/recording';
import { FormatError } from './format-error';

export interface BidsEvent extends RecordingEvent {
  /** 1-based line in the file (the header is row 1). */
  row: number;
  /** False when the duration cell was `n/a` (durationSeconds is then 0). */
  durationKnown: boolean;
  /** Every cell of the row by column name, trimmed, as written (`n/a` included). */
  columns: Record<string, string>;
}

export interface BidsEventsResult {
  /** The header's column names, in file order. */
  header: string[];
  events: BidsEvent[];
  /** Events whose onset lies before 0 or at/after the recording's end; never placed on the sample axis. */
  outside: BidsEvent[];
  warnings: string[];
}

export interface BidsEventsOptions {
  /** Length of the recording; when given, events outside [0, recordingSeconds) are reported, not returned. */
  recordingSeconds?: number;
  /** Column that names the condition; default `trial_type`. */
  labelColumn?: string;
}

const NUMBER = /^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/;
const MISSING = 'n/a';

/** Parses a BIDS events TSV. A non-numeric onset or duration throws a FormatError naming the row and column. */
export function parseBidsEvents(text: string, options: BidsEventsOptions = {}): BidsEventsResult {
  const labelColumn = options.labelColumn ?? 'trial_type';
  const body = text.charCodeAt(0) === 0xfeff ? text.slice(1) : text;
  const lines = body.split(/\r?\n/);
  while (lines.length > 0 && lines[lines.length - 1].trim() === '') lines.pop();
  if (lines.length === 0) throw new FormatError('header', 'is missing: the events file is empty', { row: 1 });
  const header = lines[0].split('\t').map((h) => h.trim());
  if (header.length === 1 && lines[0].includes(',')) {
    throw new FormatError('header', 'is not tab-separated (BIDS events files use tabs)', { row: 1 });
  }
  const seen = new Set<string>();
  for (const h of header) {
    if (seen.has(h)) throw new FormatError('header', `names column "${h}" twice`, { row: 1, column: h });
    seen.add(h);
  }
  const onsetAt = header.indexOf('onset');
  const durationAt = header.indexOf('duration');
  const labelAt = header.indexOf(labelColumn);
  if (onsetAt < 0) throw new FormatError('header', 'has no "onset" column, which BIDS requires', { row: 1 });
  if (durationAt < 0) throw new FormatError('header', 'has no "duration" column, which BIDS requires', { row: 1 });
  const warnings: string[] = [];
  if (labelAt < 0) warnings.push(`no "${labelColumn}" column: every event is labelled "n/a"`);

  const events: BidsEvent[] = [];
  const outside: BidsEvent[] = [];
  const end = options.recordingSeconds;
  for (let i = 1; i < lines.length; i++) {
    const row = i + 1;
    if (lines[i].trim() === '') throw new FormatError('blank row', 'event rows follow it; remove it or the rows after it', { row });
    const cells = lines[i].split('\t');
    if (cells.length !== header.length) {
      throw new FormatError('row length', `${cells.length} cells, but the header names ${header.length} columns`, { row });
    }
    const onsetText = cells[onsetAt].trim();
    if (!NUMBER.test(onsetText)) {
      throw new FormatError('onset', `${JSON.stringify(onsetText)} is not a number of seconds`, { row, column: 'onset' });
    }
    const durationText = cells[durationAt].trim();
    const durationKnown = durationText !== MISSING;
    if (durationKnown && !(NUMBER.test(durationText) && Number(durationText) >= 0)) {
      throw new FormatError('duration', `${JSON.stringify(durationText)} is neither a non-negative number nor n/a`, { row, column: 'duration' });
    }
    const label = labelAt < 0 ? MISSING : cells[labelAt].trim() || MISSING;
    const event: BidsEvent = {
      onsetSeconds: Number(onsetText),
      durationSeconds: durationKnown ? Number(durationText) : 0,
      label,
      row,
      durationKnown,
      columns: Object.fromEntries(header.map((h, c) => [h, cells[c].trim()])),
    };
    if (end !== undefined && (event.onsetSeconds < 0 || event.onsetSeconds >= end)) outside.push(event);
    else events.push(event);
  }
  if (outside.length > 0) {
    warnings.push(`${outside.length} events lie outside the recording (0–${end} s), first at row ${outside[0].row}`);
  }
  // Events in onset order (a stable sort keeps file order among equal onsets), so every reader of the same file
  // numbers them alike: event keys in a recipe count from this order.
  events.sort((a, b) => a.onsetSeconds - b.onsetSeconds);
  return { header, events, outside, warnings };
}
