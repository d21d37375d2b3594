/**
 * The dataset manifest, `<out>/batch-manifest.json`: what ran (dataset, recipe and its hash, filters, where it ran),
 * and for every planned recording its entities, input fingerprints, status, the result and summary files or the
 * one-line reason it failed. Built from the plan and the per-recording records, so a local run and `--collect`
 * after a Slurm job write the same thing.
 */
import { join, relative } from 'node:path';
import { outputPaths, readJsonFile, writeAtomic, type BatchPlan, type BatchRecord, type OutputFile } from './batch-run';

export const MANIFEST_FORMAT = 'tidemark-batch-manifest-1';
export const MANIFEST_FILE = 'batch-manifest.json';
export const PLAN_FILE = 'batch-plan.json';

export type Runner = { kind: 'local'; workers: number } | { kind: 'slurm'; jobId: string; script: string };

export interface ManifestEntry {
  stem: string;
  datatype: string;
  entities: Record<string, string>;
  /** The subject's BIDS label: the subject code the study page's batch import files a summary under. */
  subject: string;
  recording: string;
  events: string | null;
  channels: string | null;
  status: 'done' | 'failed';
  reason?: string;
  /** True when this run found the outputs of an earlier one matching and did not recompute them. */
  reused?: boolean;
  fingerprint: string | null;
  sidecars: { events: string | null; channels: string | null };
  result?: OutputFile;
  summary?: OutputFile;
  seconds?: number;
}

export interface Manifest {
  format: typeof MANIFEST_FORMAT;
  writtenAt: string;
  dataset: BatchPlan['dataset'];
  recipe: { path: string; hash: string };
  filters: Record<string, string>;
  runner: Runner;
  counts: { recordings: number; done: number; failed: number; reused: number };
  recordings: ManifestEntry[];
}

/**
 * Reads every task's record and writes the manifest. `reused` says which stems this run took from an earlier one
 * (local runs know); `missing(stem)` gives the reason for a task without a record (Slurm: the task's state).
 */
export async function writeManifest(
  out: string,
  plan: BatchPlan,
  runner: Runner,
  options: { reused?: ReadonlySet<string>; missing?: (stem: string) => string } = {},
): Promise<Manifest> {
  const recordings: ManifestEntry[] = [];
  for (const task of plan.tasks) {
    const record = await readJsonFile<BatchRecord>(join(out, outputPaths(task.stem).record));
    const rel = (p: string | null) => (p === null ? null : relative(plan.dataset.root, p));
    const entry: ManifestEntry = {
      stem: task.stem,
      datatype: task.datatype,
      entities: task.entities,
      subject: task.entities.sub,
      recording: task.relativePath,
      events: rel(task.events),
      channels: rel(task.channels),
      status: 'failed',
      fingerprint: null,
      sidecars: { events: null, channels: null },
    };
    if (record === null || record.recipeHash !== plan.recipe.hash) {
      const why = options.missing?.(task.stem) ?? 'no record: the recording has not been analysed with this recipe';
      recordings.push({ ...entry, reason: `${task.relativePath}: ${why}` });
      continue;
    }
    recordings.push({
      ...entry,
      status: record.status,
      ...(record.reason !== undefined ? { reason: record.reason } : {}),
      ...(options.reused !== undefined ? { reused: options.reused.has(task.stem) } : {}),
      fingerprint: record.fingerprint,
      sidecars: record.sidecars,
      ...(record.result !== undefined ? { result: record.result } : {}),
      ...(record.summary !== undefined ? { summary: record.summary } : {}),
      seconds: record.seconds,
    });
  }
  const manifest: Manifest = {
    format: MANIFEST_FORMAT,
    writtenAt: new Date().toISOString(),
    dataset: plan.dataset,
    recipe: { path: plan.recipe.path, hash: plan.recipe.hash },
    filters: plan.filters,
    runner,
    counts: {
      recordings: recordings.length,
      done: recordings.filter((r) => r.status === 'done').length,
      failed: recordings.filter((r) => r.status === 'failed').length,
      reused: recordings.filter((r) => r.reused === true).length,
    },
    recordings,
  };
  await writeAtomic(join(out, MANIFEST_FILE), JSON.stringify(manifest, null, 1) + '\n');
  return manifest;
}
