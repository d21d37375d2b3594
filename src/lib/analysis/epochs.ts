import type { RecordingEvent } from './recording';
import { roundHalfUp } from './rounding';

/** Number of points on the epoch time grid, `round((end − start)·fs) + 1` (analysis contract, "Units and grids"). */
export function epochLength(epochStartSeconds: number, epochEndSeconds: number, sampleRateHz: number): number {
  return roundHalfUp((epochEndSeconds - epochStartSeconds) * sampleRateHz) + 1;
}

/** Epoch time grid `t_j = start + j/fs` in seconds, `j = 0 … round((end − start)·fs)`. */
export function epochTimes(epochStartSeconds: number, epochEndSeconds: number, sampleRateHz: number): Float64Array {
  const n = epochLength(epochStartSeconds, epochEndSeconds, sampleRateHz);
  const out = new Float64Array(n);
  for (let j = 0; j < n; j++) out[j] = epochStartSeconds + j / sampleRateHz;
  return out;
}

export interface EpochSelection {
  /** First sample of each kept epoch, in event order. */
  starts: Int32Array;
  /** Events of the label whose epoch ran past either end of the recording. */
  droppedOutside: number;
  /** Events of the label whose epoch spans a discontinuity (EDF+D gap). */
  droppedGap: number;
  /** All events carrying the label. */
  matched: number;
}

/**
 * Epochs around every event labelled `label`: the epoch of an event at onset `o` s starts at sample
 * `round(o·fs) + round(start·fs)` and holds `epochSamples` samples (analysis contract). Epochs that do not fit in
 * `[0, totalSamples)` or that contain the start of a new continuous block (`gapSampleIndices`) are dropped and
 * counted, never padded.
 */
export function selectEpochs(
  events: readonly RecordingEvent[],
  label: string,
  epochStartSeconds: number,
  epochSamples: number,
  sampleRateHz: number,
  totalSamples: number,
  gapSampleIndices: readonly number[] = [],
): EpochSelection {
  const starts: number[] = [];
  let droppedOutside = 0;
  let droppedGap = 0;
  let matched = 0;
  const offset = roundHalfUp(epochStartSeconds * sampleRateHz);
  for (const event of events) {
    if (event.label !== label) continue;
    matched++;
    const start = roundHalfUp(event.onsetSeconds * sampleRateHz) + offset;
    const end = start + epochSamples; // exclusive
    if (start < 0 || end > totalSamples) {
      droppedOutside++;
      continue;
    }
    let crossesGap = false;
    for (const g of gapSampleIndices) {
      if (g > start && g < end) {
        crossesGap = true;
        break;
      }
    }
    if (crossesGap) {
      droppedGap++;
      continue;
    }
    starts.push(start);
  }
  return { starts: Int32Array.from(starts), droppedOutside, droppedGap, matched };
}
