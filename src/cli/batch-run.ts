/**
 * One recording of a batch, the same steps wherever it runs (a worker thread of the local pool, a Slurm array task,
 * or in process): fingerprint the inputs, skip when an earlier run's outputs match them and the recipe, otherwise
 * read, analyse and write the result JSON (the very text `analyze` writes), the summary and a record. Every file is
 * written to a temporary name and renamed, so an interrupted run leaves earlier outputs whole.
 */
import { createHash } from 'node:crypto';
import { mkdir, readFile, rename, writeFile } from 'node:fs/promises';
import { dirname, join } from 'node:path';
import { AnalysisInputError } from '../lib/analysis/errors';
import type { Recipe } from '../lib/analysis/recipe';
import type { SummarySpec } from '../lib/analysis/summary';
import { FormatError } from '../lib/formats';
import { readerOptionsOf, runWithSummary } from './analyze';
import { CliInputError, oneLine } from './io';
import { fingerprintFile, loadRecording, withBadChannels } from './load-recording';
import type { Datatype } from './bids-dataset';

export const PLAN_FORMAT = 'tidemark-batch-plan-1';
export const RECORD_FORMAT = 'tidemark-batch-record-1';

/** One recording to analyse (absolute paths). */
export interface BatchTask {
  stem: string;
  datatype: Datatype;
  entities: Record<string, string>;
  path: string;
  events: string | null;
  channels: string | null;
  relativePath: string;
  unreadable: string | null;
}

/** What a batch runs, written to `<out>/batch-plan.json` before anything runs (an array task reads it there). */
export interface BatchPlan {
  format: typeof PLAN_FORMAT;
  dataset: { root: string; name: string | null };
  recipe: { path: string; hash: string; value: Recipe };
  /** Bands, windows and channel groups of the summaries (`--summary-spec`; {} for the defaults) and its hash. */
  summarySpec: { path: string | null; hash: string; value: SummarySpec };
  filters: Record<string, string>;
  tasks: BatchTask[];
}

export interface OutputFile {
  /** Relative to the output folder. */
  path: string;
  sha256: string;
}

/** What became of one recording: `<out>/records/<stem>.json`. */
export interface BatchRecord {
  format: typeof RECORD_FORMAT;
  stem: string;
  status: 'done' | 'failed';
  /** The one-line reason of a failure. */
  reason?: string;
  recipeHash: string;
  summarySpecHash: string;
  /** SHA-256 of the recording file (the browser's fingerprint of it) and of each sidecar; null when absent or unread. */
  fingerprint: string | null;
  sidecars: { events: string | null; channels: string | null };
  result?: OutputFile;
  summary?: OutputFile;
  warnings: number;
  seconds: number;
  finishedAt: string;
}

export interface TaskOutcome {
  record: BatchRecord;
  /** True when an earlier run's outputs matched and nothing was recomputed. */
  reused: boolean;
}

export const outputPaths = (stem: string) => ({
  result: join('results', `${stem}.json`),
  summary: join('summaries', `${stem}.json`),
  record: join('records', `${stem}.json`),
});

const sha256 = (text: string) => createHash('sha256').update(text, 'utf8').digest('hex');

/** Writes `text` to `path` through a temporary file in the same folder and a rename (whole or not at all). */
export async function writeAtomic(path: string, text: string): Promise<void> {
  await mkdir(dirname(path), { recursive: true });
  const temporary = `${path}.${process.pid}.${Math.random().toString(36).slice(2)}.partial`;
  await writeFile(temporary, text);
  await rename(temporary, path);
}

export async function readJsonFile<T>(path: string): Promise<T | null> {
  try {
    return JSON.parse(await readFile(path, 'utf8')) as T;
  } catch {
    return null;
  }
}

async function fileMatches(out: string, file: OutputFile | undefined): Promise<boolean> {
  if (file === undefined) return false;
  try {
    return sha256(await readFile(join(out, file.path), 'utf8')) === file.sha256;
  } catch {
    return false;
  }
}

async function hashOrNull(path: string | null): Promise<string | null> {
  return path === null ? null : fingerprintFile(path);
}

/** The message of a failure, on one line, saying where. */
function reasonOf(e: unknown, task: BatchTask, recipePath: string): string {
  if (e instanceof CliInputError) return oneLine(`${e.where}: ${e.message}`);
  if (e instanceof AnalysisInputError) return oneLine(`${recipePath}: ${e.message}`);
  if (e instanceof FormatError) return oneLine(`${task.path}: ${e.message}`);
  return oneLine(`internal error: ${e instanceof Error ? e.message : String(e)}`);
}

/**
 * Runs one task of `plan` with outputs under `out`; never throws for bad input (the record says why it failed).
 * `summarize` turns the result into the review summary (null when no summary is written).
 */
export async function runTask(plan: Pick<BatchPlan, 'recipe' | 'summarySpec'>, task: BatchTask, out: string): Promise<TaskOutcome> {
  const started = performance.now();
  const paths = outputPaths(task.stem);
  const recipeHash = plan.recipe.hash;
  const base = { format: RECORD_FORMAT, stem: task.stem, recipeHash, summarySpecHash: plan.summarySpec.hash } as const;
  let fingerprint: string | null = null;
  let sidecars: BatchRecord['sidecars'] = { events: null, channels: null };
  const finish = async (record: Omit<BatchRecord, 'seconds' | 'finishedAt' | keyof typeof base>): Promise<TaskOutcome> => {
    const full: BatchRecord = { ...base, ...record, seconds: Math.round(performance.now() - started) / 1000, finishedAt: new Date().toISOString() };
    await writeAtomic(join(out, paths.record), JSON.stringify(full, null, 1) + '\n');
    return { record: full, reused: false };
  };
  try {
    if (task.unreadable !== null) throw new CliInputError(task.path, task.unreadable);
    try {
      fingerprint = await fingerprintFile(task.path);
    } catch (e) {
      throw new CliInputError(task.path, `cannot be read (${(e as NodeJS.ErrnoException).code ?? (e as Error).message})`);
    }
    sidecars = { events: await hashOrNull(task.events), channels: await hashOrNull(task.channels) };
    const previous = await readJsonFile<BatchRecord>(join(out, paths.record));
    if (
      previous !== null &&
      previous.status === 'done' &&
      previous.recipeHash === recipeHash &&
      previous.summarySpecHash === plan.summarySpec.hash &&
      previous.fingerprint === fingerprint &&
      previous.sidecars?.events === sidecars.events &&
      previous.sidecars?.channels === sidecars.channels &&
      (await fileMatches(out, previous.result)) &&
      (await fileMatches(out, previous.summary))
    ) {
      return { record: previous, reused: true };
    }
    const recipe = plan.recipe.value;
    const { recording, warnings, bad } = await loadRecording(task.path, {
      eventsPath: task.events ?? undefined,
      channelsPath: task.channels ?? undefined,
      ...readerOptionsOf(recipe),
      eventTable: recipe.eventTable,
    });
    const effective = withBadChannels(recipe, bad, task.channels ?? 'channels');
    recording.fingerprint = fingerprint;
    // The subject's BIDS label is the subject code the summary is filed under (a code, never a name).
    const { result, text: summaryText } = runWithSummary(recording, effective.recipe, plan.summarySpec.value, task.entities.sub, join(out, paths.summary));
    result.warnings.unshift(...warnings, ...effective.warnings);
    // The very texts `analyze --out … --summary …` writes, so the two can be compared byte for byte.
    const text = JSON.stringify(result) + '\n';
    await writeAtomic(join(out, paths.result), text);
    await writeAtomic(join(out, paths.summary), summaryText + '\n');
    const summary: OutputFile = { path: paths.summary, sha256: sha256(summaryText + '\n') };
    return await finish({ status: 'done', fingerprint, sidecars, result: { path: paths.result, sha256: sha256(text) }, summary, warnings: result.warnings.length });
  } catch (e) {
    return await finish({ status: 'failed', reason: reasonOf(e, task, plan.recipe.path), fingerprint, sidecars, warnings: 0 });
  }
}
