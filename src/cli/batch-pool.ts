/**
 * The local pool of `batch`: worker threads (workers/batch.node-worker.ts) that each take the next recording when
 * they finish one. A worker that crashes or exits fails only the recording it held (its record says so) and is
 * replaced for the rest.
 */
import { join } from 'node:path';
import { Worker } from 'node:worker_threads';
import { tsxBootstrap } from '../../workers/node-worker-factory';
import { outputPaths, RECORD_FORMAT, writeAtomic, type BatchPlan, type BatchRecord, type BatchTask, type TaskOutcome } from './batch-run';

const entry = new URL('../../workers/batch.node-worker.ts', import.meta.url).href;

export async function runPool(
  plan: Pick<BatchPlan, 'recipe' | 'summarySpec' | 'tasks'>,
  out: string,
  workers: number,
  onOutcome: (task: BatchTask, outcome: TaskOutcome) => void,
): Promise<TaskOutcome[]> {
  const outcomes: TaskOutcome[] = new Array(plan.tasks.length);
  let next = 0;
  const lane = async (): Promise<void> => {
    let worker: Worker | null = null;
    try {
      while (next < plan.tasks.length) {
        const index = next++;
        const task = plan.tasks[index];
        worker ??= new Worker(tsxBootstrap(entry));
        const current: Worker = worker;
        const outcome = await new Promise<TaskOutcome>((resolve) => {
          const done = (o: TaskOutcome) => {
            current.off('message', onMessage);
            current.off('error', onError);
            current.off('exit', onExit);
            resolve(o);
          };
          const onMessage = (m: { id: number; outcome: TaskOutcome }) => {
            if (m.id === index) done(m.outcome);
          };
          const lost = async (why: string) => {
            worker = null;
            void current.terminate();
            const record: BatchRecord = {
              format: RECORD_FORMAT,
              stem: task.stem,
              status: 'failed',
              reason: `${task.path}: the worker thread stopped (${why})`,
              recipeHash: plan.recipe.hash,
              summarySpecHash: plan.summarySpec.hash,
              fingerprint: null,
              sidecars: { events: null, channels: null },
              warnings: 0,
              seconds: 0,
              finishedAt: new Date().toISOString(),
            };
            await writeAtomic(join(out, outputPaths(task.stem).record), JSON.stringify(record, null, 1) + '\n');
            done({ record, reused: false });
          };
          const onError = (e: Error) => void lost(e.message.split('\n')[0]);
          const onExit = (code: number) => void lost(`exit code ${code}`);
          current.on('message', onMessage);
          current.on('error', onError);
          current.on('exit', onExit);
          current.postMessage({ id: index, plan: { recipe: plan.recipe, summarySpec: plan.summarySpec }, task, out });
        });
        outcomes[index] = outcome;
        onOutcome(task, outcome);
      }
    } finally {
      if (worker !== null) await (worker as Worker).terminate();
    }
  };
  await Promise.all(Array.from({ length: Math.max(1, Math.min(workers, plan.tasks.length)) }, lane));
  return outcomes;
}
