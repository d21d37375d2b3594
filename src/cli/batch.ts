/**
 * `npm run --silent batch -- <bids-root> --recipe <recipe.json> --out <folder>`: every EEG/iEEG/MEG recording of a
 * BIDS dataset through the same core as `analyze`, on a pool of worker threads or as a Slurm array job. Per recording
 * a result JSON (the text `analyze` writes), a summary and a record; for the dataset a manifest. Exit 0 when every
 * recording is done, 3 when some failed (the manifest says why, one line each), 2 with one line for bad input, 1 for
 * anything unexpected.
 */
import { availableParallelism } from 'node:os';
import { mkdir, readFile } from 'node:fs/promises';
import { join, resolve } from 'node:path';
import { pathToFileURL } from 'node:url';
import { AnalysisInputError } from '../lib/analysis/errors';
import { readRecipe } from '../lib/analysis/recipe';
import { jsonHash } from '../lib/crypto/review-hash';
import { filterRecordings, readDataset, FILTERS, type FilterOption } from './bids-dataset';
import { MANIFEST_FILE, PLAN_FILE, writeManifest, type Manifest, type Runner } from './batch-manifest';
import { runPool } from './batch-pool';
import { PLAN_FORMAT, readJsonFile, runTask, writeAtomic, type BatchPlan, type BatchTask, type TaskOutcome } from './batch-run';
import { queued, submit, taskStates, type SlurmOptions } from './batch-slurm';
import { CliInputError, oneLine, splitArgs } from './io';
import { readSpecFile } from './analyze';

const USAGE =
  'usage: batch <bids-root> --recipe <recipe.json> --out <folder> [--summary-spec <spec.json>] [--subject L[,L…]] [--session …] [--task …] [--run …] ' +
  '[--workers N | --slurm [--partition P] [--time T] [--mem M] [--cpus-per-task C] [--concurrent N] [--no-wait]] | batch --collect <folder>';
const OPTIONS = ['recipe', 'out', 'summary-spec', ...Object.keys(FILTERS), 'workers', 'partition', 'time', 'mem', 'cpus-per-task', 'concurrent', 'collect', 'array-task'];
const FLAGS = ['slurm', 'no-wait'];
const SLURM_ONLY = ['partition', 'time', 'mem', 'cpus-per-task', 'concurrent', 'no-wait'];

type Args =
  | { mode: 'collect'; out: string }
  | { mode: 'array-task'; out: string; index: number }
  | {
      mode: 'run';
      root: string;
      recipe: string;
      summarySpec: string | null;
      out: string;
      filters: Partial<Record<FilterOption, string>>;
      workers: number;
      slurm: (SlurmOptions & { wait: boolean }) | null;
    };

function positiveInt(option: string, value: string | undefined): number | undefined {
  if (value === undefined) return undefined;
  if (!/^\d+$/.test(value) || Number(value) < 1) throw new CliInputError(`--${option}`, `must be a whole number of at least 1 (got "${value}")`);
  return Number(value);
}

function parseArgs(argv: string[]): Args {
  const flags = new Set<string>();
  const rest: string[] = [];
  for (const a of argv) {
    const name = a.startsWith('--') ? a.slice(2) : null;
    if (name !== null && FLAGS.includes(name)) {
      if (flags.has(name)) throw new CliInputError(a, 'is given twice');
      flags.add(name);
    } else rest.push(a);
  }
  const { positional, named } = splitArgs(rest, OPTIONS, USAGE);
  if (named.collect !== undefined) {
    const others = [...Object.keys(named).filter((k) => k !== 'collect'), ...flags, ...positional];
    if (others.length > 0) throw new CliInputError('--collect', `takes only the output folder (also given: ${others.join(', ')})`);
    return { mode: 'collect', out: resolve(named.collect) };
  }
  if (named['array-task'] !== undefined) {
    const index = Number(named['array-task']);
    if (!/^\d+$/.test(named['array-task'])) throw new CliInputError('--array-task', `must be a task index (got "${named['array-task']}")`);
    if (positional.length !== 1) throw new CliInputError('--array-task', 'needs the output folder after it');
    return { mode: 'array-task', out: resolve(positional[0]), index };
  }
  if (positional.length !== 1) throw new CliInputError('arguments', `expected one BIDS dataset folder, got ${positional.length} (${USAGE})`);
  if (named.recipe === undefined) throw new CliInputError('--recipe', `is required (${USAGE})`);
  if (named.out === undefined) throw new CliInputError('--out', `is required: the folder for results, summaries and the manifest (${USAGE})`);
  const isSlurm = flags.has('slurm');
  for (const o of SLURM_ONLY) if (!isSlurm && (named[o] !== undefined || flags.has(o))) throw new CliInputError(`--${o}`, 'applies only with --slurm');
  if (isSlurm && named.workers !== undefined) throw new CliInputError('--workers', 'applies to a local run; with --slurm each array task analyses one recording (see --concurrent)');
  const workers = positiveInt('workers', named.workers) ?? Math.max(1, availableParallelism() - 1);
  let slurm: (SlurmOptions & { wait: boolean }) | null = null;
  if (isSlurm) {
    const { partition, time, mem } = named;
    if (partition !== undefined && !/^[A-Za-z0-9_.-]+(,[A-Za-z0-9_.-]+)*$/.test(partition)) throw new CliInputError('--partition', `"${partition}" is not a partition name (letters, digits, . _ -; several separated by commas)`);
    // Slurm's time formats: minutes, minutes:seconds, hours:minutes:seconds, days-hours[:minutes[:seconds]].
    if (time !== undefined && !/^(\d+|\d+:\d{1,2}|\d+:\d{1,2}:\d{1,2}|\d+-\d+(:\d{1,2}(:\d{1,2})?)?)$/.test(time)) {
      throw new CliInputError('--time', `"${time}" is not a Slurm time limit (minutes, MM:SS, HH:MM:SS or D-HH[:MM[:SS]])`);
    }
    if (mem !== undefined && !/^\d+[KMGT]?$/i.test(mem)) throw new CliInputError('--mem', `"${mem}" is not a Slurm memory size (a number with an optional K, M, G or T)`);
    slurm = { partition, time, mem, cpusPerTask: positiveInt('cpus-per-task', named['cpus-per-task']), concurrent: positiveInt('concurrent', named.concurrent), wait: !flags.has('no-wait') };
  }
  const filters: Partial<Record<FilterOption, string>> = {};
  for (const o of Object.keys(FILTERS) as FilterOption[]) if (named[o] !== undefined) filters[o] = named[o];
  return { mode: 'run', root: resolve(positional[0]), recipe: resolve(named.recipe), summarySpec: named['summary-spec'] === undefined ? null : resolve(named['summary-spec']), out: resolve(named.out), filters, workers, slurm };
}

async function readRecipeFile(path: string) {
  let text: string;
  try {
    text = await readFile(path, 'utf8');
  } catch (e) {
    throw new CliInputError(path, `cannot be read (${(e as NodeJS.ErrnoException).code ?? (e as Error).message})`);
  }
  let json: unknown;
  try {
    json = JSON.parse(text);
  } catch (e) {
    throw new CliInputError(path, `is not valid JSON (${(e as Error).message})`);
  }
  let checked;
  try {
    checked = readRecipe(json);
  } catch (e) {
    if (e instanceof AnalysisInputError) throw new CliInputError(path, e.message);
    throw e;
  }
  if (checked.notice !== null) process.stderr.write(`batch: ${path}: ${checked.notice}\n`);
  if (checked.recipe.recording?.fingerprint !== undefined) {
    throw new CliInputError(path, 'recording.fingerprint names one recording; a recipe for a whole dataset must leave it out');
  }
  return checked.recipe;
}

/** Progress on standard error: one rewritten line on a terminal, a plain line per recording otherwise. */
class Progress {
  private done = 0;
  private failed = 0;
  private reused = 0;
  private readonly started = performance.now();
  private analysed = 0;
  constructor(
    private readonly total: number,
    private readonly tty = process.stderr.isTTY === true,
  ) {}

  private eta(): string {
    const left = this.total - this.done;
    if (left === 0) return 'done';
    // From the recordings actually analysed so far (reused ones take no time and would flatter it); the lanes run
    // side by side, so wall time per analysed recording already counts them.
    if (this.analysed === 0) return 'time left unknown';
    const elapsed = (performance.now() - this.started) / 1000;
    return `about ${formatSeconds((left * elapsed) / this.analysed)} left`;
  }

  private rate(): string {
    const elapsed = (performance.now() - this.started) / 1000;
    return `${((this.analysed / Math.max(elapsed, 1e-3)) * 60).toFixed(1)} recordings/min`;
  }

  tick(stem: string, outcome: TaskOutcome): void {
    this.done++;
    if (outcome.reused) this.reused++;
    else this.analysed++;
    if (outcome.record.status === 'failed') this.failed++;
    const counts = `${this.done}/${this.total}${this.reused ? `, ${this.reused} reused` : ''}${this.failed ? `, ${this.failed} failed` : ''}`;
    if (this.tty) {
      const width = 20;
      const filled = Math.round((width * this.done) / this.total);
      process.stderr.write(`\r\x1b[Kbatch: [${'#'.repeat(filled)}${'.'.repeat(width - filled)}] ${counts} · ${this.rate()} · ${this.eta()}`);
      if (this.done === this.total) process.stderr.write('\n');
    } else {
      const what = outcome.reused ? 'reused' : outcome.record.status === 'done' ? `done in ${outcome.record.seconds.toFixed(1)} s` : `failed: ${outcome.record.reason}`;
      process.stderr.write(`batch: ${counts} · ${stem} ${what} · ${this.rate()} · ${this.eta()}\n`);
    }
  }
}

function formatSeconds(s: number): string {
  if (s < 90) return `${Math.ceil(s)} s`;
  if (s < 5400) return `${Math.round(s / 60)} min`;
  return `${(s / 3600).toFixed(1)} h`;
}

function report(manifest: Manifest, out: string): number {
  const c = manifest.counts;
  process.stderr.write(
    `batch: ${c.done} of ${c.recordings} recordings done${c.reused ? ` (${c.reused} reused)` : ''}${c.failed ? `, ${c.failed} failed` : ''}; manifest ${join(out, MANIFEST_FILE)}\n`,
  );
  for (const r of manifest.recordings) if (r.status === 'failed') process.stderr.write(`batch: failed: ${r.reason}\n`);
  return c.failed === 0 ? 0 : 3;
}

async function readPlan(out: string): Promise<BatchPlan> {
  const plan = await readJsonFile<BatchPlan>(join(out, PLAN_FILE));
  if (plan === null || plan.format !== PLAN_FORMAT) throw new CliInputError(out, `holds no ${PLAN_FILE}: not the output folder of a batch`);
  return plan;
}

async function readRunner(out: string): Promise<Runner> {
  const job = await readJsonFile<{ jobId: string; script: string }>(join(out, 'slurm', 'job.json'));
  if (job !== null) return { kind: 'slurm', jobId: job.jobId, script: job.script };
  // A local run's manifest says how many threads it used.
  const before = await readJsonFile<Manifest>(join(out, MANIFEST_FILE));
  return before?.runner ?? { kind: 'local', workers: 1 };
}

async function collect(out: string, plan: BatchPlan, runner: Runner): Promise<Manifest> {
  let states = new Map<number, string>();
  if (runner.kind === 'slurm') {
    states = taskStates(runner.jobId);
    let left: number | null = null;
    try {
      left = queued(runner.jobId);
    } catch {
      // the scheduler cannot be asked; collect what is there
    }
    if (left !== null) process.stderr.write(`batch: Slurm job ${runner.jobId} still has ${left} array task${left > 1 ? 's' : ''} pending or running; collect again when it has ended\n`);
  }
  const indexOf = new Map(plan.tasks.map((t, i) => [t.stem, i]));
  return writeManifest(out, plan, runner, {
    missing: (stem) => {
      if (runner.kind !== 'slurm') return 'no record: the recording has not been analysed with this recipe';
      const i = indexOf.get(stem) ?? -1;
      const state = states.get(i);
      return `no record from Slurm job ${runner.jobId}, array task ${i}${state !== undefined ? ` (${state})` : ''}; see ${join(out, 'slurm', `task-${i}.log`)}`;
    },
  });
}

const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

async function run(args: Extract<Args, { mode: 'run' }>): Promise<number> {
  // Everything that can be refused is checked before the first file is written.
  const recipe = await readRecipeFile(args.recipe);
  const spec = args.summarySpec === null ? {} : await readSpecFile(args.summarySpec);
  const dataset = await readDataset(args.root);
  const chosen = filterRecordings(dataset.recordings, args.filters);
  const tasks: BatchTask[] = chosen.map((r) => ({ stem: r.stem, datatype: r.datatype, entities: r.entities, path: r.path, events: r.events, channels: r.channels, relativePath: r.relativePath, unreadable: r.unreadable }));
  const plan: BatchPlan = {
    format: PLAN_FORMAT,
    dataset: { root: dataset.root, name: dataset.name },
    recipe: { path: args.recipe, hash: jsonHash(recipe), value: recipe },
    summarySpec: { path: args.summarySpec, hash: jsonHash(spec), value: spec },
    filters: Object.fromEntries(Object.entries(args.filters)) as Record<string, string>,
    tasks,
  };
  try {
    await mkdir(args.out, { recursive: true });
    await writeAtomic(join(args.out, PLAN_FILE), JSON.stringify(plan, null, 1) + '\n');
  } catch (e) {
    throw new CliInputError(args.out, `cannot be written (${(e as NodeJS.ErrnoException).code ?? (e as Error).message})`);
  }
  if (args.slurm !== null) {
    const { jobId, script } = await submit(args.out, tasks.length, args.slurm);
    const submittedAt = new Date().toISOString();
    await writeAtomic(join(args.out, 'slurm', 'job.json'), JSON.stringify({ jobId, script, submittedAt, tasks: tasks.length }, null, 1) + '\n');
    const runner: Runner = { kind: 'slurm', jobId, script };
    process.stderr.write(`batch: submitted Slurm job ${jobId}: ${tasks.length} array tasks (${script})\n`);
    if (!args.slurm.wait) {
      process.stderr.write(`batch: when it has ended: npm run --silent batch -- --collect ${args.out}\n`);
      return 0;
    }
    const pollMs = Number(process.env.TIDEMARK_BATCH_POLL_MS ?? 2000);
    let last = -1;
    for (;;) {
      let left: number | null;
      try {
        left = queued(jobId);
      } catch (e) {
        if (!(e instanceof CliInputError)) throw e;
        throw new CliInputError(e.where, `${e.message}; job ${jobId} may still run: npm run --silent batch -- --collect ${args.out} when it has ended`);
      }
      if (left === null) break;
      if (left !== last) {
        process.stderr.write(`batch: Slurm job ${jobId}: ${left} of ${tasks.length} array tasks pending or running\n`);
        last = left;
      }
      await sleep(pollMs);
    }
    return report(await collect(args.out, plan, runner), args.out);
  }
  const lanes = Math.min(args.workers, tasks.length);
  process.stderr.write(`batch: ${tasks.length} recording${tasks.length > 1 ? 's' : ''} of ${dataset.name ?? dataset.root} on ${lanes} worker thread${lanes > 1 ? 's' : ''}\n`);
  const progress = new Progress(tasks.length);
  const reused = new Set<string>();
  await runPool(plan, args.out, lanes, (task, outcome) => {
    if (outcome.reused) reused.add(task.stem);
    progress.tick(task.stem, outcome);
  });
  return report(await writeManifest(args.out, plan, { kind: 'local', workers: lanes }, { reused }), args.out);
}

/** Runs the command; resolves with the exit code. */
export async function main(argv: string[]): Promise<number> {
  try {
    const args = parseArgs(argv);
    if (args.mode === 'collect') {
      const plan = await readPlan(args.out);
      return report(await collect(args.out, plan, await readRunner(args.out)), args.out);
    }
    if (args.mode === 'array-task') {
      const plan = await readPlan(args.out);
      const task = plan.tasks[args.index];
      if (task === undefined) throw new CliInputError('--array-task', `is ${args.index}; the plan has tasks 0 to ${plan.tasks.length - 1}`);
      const { record } = await runTask(plan, task, args.out);
      if (record.status === 'failed') process.stderr.write(`batch: ${record.reason}\n`);
      return record.status === 'done' ? 0 : 3;
    }
    return await run(args);
  } catch (e) {
    if (e instanceof CliInputError) {
      process.stderr.write(`batch: ${oneLine(`${e.where}: ${e.message}`)}\n`);
      return 2;
    }
    process.stderr.write(`batch: internal error: ${oneLine(e instanceof Error ? e.message : String(e))}\n`);
    return 1;
  }
}

if (import.meta.url === pathToFileURL(process.argv[1] ?? '').href) {
  main(process.argv.slice(2)).then((code) => {
    process.exitCode = code;
  });
}
