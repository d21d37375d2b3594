// worker_threads entry of the local batch pool (src/cli/batch-pool.ts): one recording per message, wiring only.
import { parentPort } from 'node:worker_threads';
import { runTask, type BatchPlan, type BatchTask } from '../src/cli/batch-run';

parentPort?.on('message', async (message: { id: number; plan: Pick<BatchPlan, 'recipe' | 'summarySpec'>; task: BatchTask; out: string }) => {
  const outcome = await runTask(message.plan, message.task, message.out);
  parentPort?.postMessage({ id: message.id, outcome });
});
