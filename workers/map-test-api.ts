// The map test worker's API, apart from its entry files so the browser and Node entries expose the same object.
// The maths is in src/lib/statistics/map-test.ts; this holds the one AbortController a cancel() message reaches.
import * as Comlink from 'comlink';
import { runMapTest, type MapTestInput, type MapTestResult } from '../src/lib/statistics/map-test';

let current: AbortController | null = null;

export const mapTestApi = {
  /** Runs the test; `onProgress` gets the fraction done. Rejects with a MapTestCancelledError after cancel(). */
  async run(input: MapTestInput, onProgress?: (fraction: number) => void): Promise<MapTestResult> {
    current?.abort();
    const controller = new AbortController();
    current = controller;
    try {
      const result = await runMapTest(input, { onProgress, signal: controller.signal });
      return Comlink.transfer(result, [result.t.buffer, result.labels.buffer, result.nullDistribution.buffer] as ArrayBuffer[]);
    } finally {
      if (current === controller) current = null;
    }
  },
  /** Stops the running test at its next block of permutations (the run yields to receive this message). */
  cancel(): void {
    current?.abort();
  },
};

export type MapTestApi = typeof mapTestApi;
