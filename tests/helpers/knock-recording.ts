// Scenario of our own for the workspace controller's unit tests: three channels at 128 Hz, 24 s of seeded noise, a
// "knock" cue every 2 s and a "bell" between them.
import type { Recording } from '../../src/lib/analysis/recording';
import { seededNormal } from './seeded-random';

export function knockRecording(seed: number): Recording {
  const fs = 128;
  const normal = seededNormal(seed);
  const names = ['F3', 'Cz', 'Pz'];
  const data = names.map(() => Float32Array.from({ length: 24 * fs }, () => 4 * normal()));
  const events = Array.from({ length: 10 }, (_, k) => ({ onsetSeconds: 2 + 2 * k, durationSeconds: 0, label: k % 2 === 0 ? 'knock' : 'bell' }));
  return { sampleRateHz: fs, channelNames: names, data, events };
}

/** What the intake would report of the file (nothing identifying). */
export const knockLocal = { fileName: 'knock.edf', sizeBytes: 0, format: 'edf+c' as const, identifying: null, startDateTime: null, ignoredSignals: [], warnings: [] };
