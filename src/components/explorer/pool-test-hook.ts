// Test hook, installed with the others only when the page URL carries `?testhooks`: runs the app's own
// decomposition pool (module Web Workers from the bundled decompose.worker.ts) on the recording open in the Source
// store, so a browser test can compare the complete Result with the command line's. Nothing is sent anywhere.
import { DecomposePool } from '../../lib/client/decompose-pool';
import { resultOfRun } from '../../lib/client/result-json';
import { useWorkspace } from '../../lib/client/workspace/store';
import { openedWarnings } from '../../lib/client/workspace/source-rules';

/**
 * The pool's Result for `recipe` on the open recording, as the JSON text the CLI writes. Like the Recipe screen it
 * passes the whole recording: the recipe's conditions and rejection pick the epochs, as on the command line.
 * The opened file's warnings come first in `warnings`, as the command line writes them.
 */
export async function runPoolOnOpenRecording(recipe: unknown): Promise<string> {
  const recording = useWorkspace.getState().recording;
  if (recording === null) throw new Error('no recording is open on the Source screen');
  const pool = new DecomposePool();
  try {
    // The Result JSON is built here, for export only: the workspace keeps the workers' typed arrays.
    const result = resultOfRun(await pool.run(recording, recipe));
    // The file's own warnings first, as the command line writes them (src/cli/analyze.ts).
    result.warnings.unshift(...openedWarnings(useWorkspace.getState().local));
    return JSON.stringify(result);
  } finally {
    pool.terminate();
  }
}
