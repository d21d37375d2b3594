// What to tell the person about how a file became a recording, in one place: the browser's intake
// (src/lib/formats/intake.ts, in the intake worker) and the command line (src/cli/load-recording.ts) both call
// `recordingWarnings`, so the same file, events file and reading choices give the same lines on both
// (tests/browser/parity.test.ts compares them). Warnings never block: the recording is still analysed.
import type { BidsEventsResult } from './bids-events';
import type { EdfFile } from './edf-reader';

export interface RecordingWarningSources {
  /** The opened EDF/EDF+; null for a CSV/TSV sample table. */
  edf: Pick<EdfFile, 'warnings' | 'eventsOutside' | 'ignored'> | null;
  /** How the file was read beyond the built-in rules (the recipe's `recording.units` and `recording.exclude`). */
  reading: { unitFactors?: Readonly<Record<string, number>>; exclude?: readonly string[] } | null;
  /** A paired BIDS events file as parsed against the recording's length; null without one. */
  events: Pick<BidsEventsResult, 'warnings'> | null;
}

/** Prefix of the events file's own lines. The file's name is left out: it may identify the person. */
export const EVENTS_FILE_PREFIX = 'events file: ';

/**
 * The warnings of one file-to-recording step, in a fixed order: the EDF reader's own (record count, timekeeping,
 * rates), annotations that fall outside the recorded samples, `recording.exclude` labels the file does not have,
 * reading choices given for a table (they apply to EDF only), then the events file's lines.
 */
export function recordingWarnings(sources: RecordingWarningSources): string[] {
  const { edf, reading, events } = sources;
  const out: string[] = [];
  const exclude = reading?.exclude ?? [];
  if (edf !== null) {
    out.push(...edf.warnings);
    if (edf.eventsOutside.length > 0) {
      const first = edf.eventsOutside[0];
      out.push(
        `${edf.eventsOutside.length} annotations fall outside the recorded samples and are left out (first: "${first.annotation.label}" at ${first.annotation.onsetSeconds} s, ${first.reason.replace('-', ' ')})`,
      );
    }
    for (const label of exclude) {
      if (!edf.ignored.some((i) => i.reason === 'excluded' && i.label === label)) out.push(`recording.exclude: the file has no signal labelled "${label}"`);
    }
  } else if (Object.keys(reading?.unitFactors ?? {}).length > 0 || exclude.length > 0) {
    out.push('recording.units and recording.exclude apply to EDF files only; a table is read as it is');
  }
  if (events !== null) out.push(...events.warnings.map((w) => EVENTS_FILE_PREFIX + w));
  return out;
}
