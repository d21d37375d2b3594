/**
 * `batch --slurm`: one Slurm array job, one array task per recording, each running `batch --array-task <i> <out>`
 * on a compute node over the cluster's shared file system (sbatch, squeue and sacct as Slurm documents them; the
 * recordings are read where they are and never copied). The job script is kept in `<out>/slurm/` so it can be read
 * or submitted again by hand.
 */
import { spawnSync } from 'node:child_process';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { CliInputError, oneLine } from './io';
import { writeAtomic } from './batch-run';

const repoRoot = fileURLToPath(new URL('../..', import.meta.url));

export interface SlurmOptions {
  partition?: string;
  time?: string;
  mem?: string;
  cpusPerTask?: number;
  /** At most this many array tasks at once (`--array=0-N%limit`). */
  concurrent?: number;
}

const quote = (s: string) => `'${s.replace(/'/g, `'\\''`)}'`;

/** The sbatch script of an array job over `tasks` recordings whose plan lies in `out` (absolute). */
export function jobScript(out: string, tasks: number, options: SlurmOptions): string {
  const lines = [
    '#!/bin/sh',
    '#SBATCH --job-name=tidemark-batch',
    `#SBATCH --array=0-${tasks - 1}${options.concurrent !== undefined ? `%${options.concurrent}` : ''}`,
    `#SBATCH --output=${join(out, 'slurm', 'task-%a.log')}`,
    '#SBATCH --ntasks=1',
  ];
  if (options.partition !== undefined) lines.push(`#SBATCH --partition=${options.partition}`);
  if (options.time !== undefined) lines.push(`#SBATCH --time=${options.time}`);
  if (options.mem !== undefined) lines.push(`#SBATCH --mem=${options.mem}`);
  if (options.cpusPerTask !== undefined) lines.push(`#SBATCH --cpus-per-task=${options.cpusPerTask}`);
  lines.push(
    '# One recording per array task: the task reads batch-plan.json and writes its own result, summary and record.',
    `cd ${quote(repoRoot)} || exit 1`,
    `exec ${quote(process.execPath)} --import tsx src/cli/batch.ts --array-task "$SLURM_ARRAY_TASK_ID" ${quote(out)}`,
    '',
  );
  return lines.join('\n');
}

function firstLine(text: string): string {
  const lines = text.split('\n').map((l) => l.trim()).filter((l) => l !== '');
  // sbatch prints "sbatch: error: …" lines; the last one is usually the reason.
  return oneLine(lines[lines.length - 1] ?? '');
}

function slurm(cmd: string, args: string[], timeoutMs: number): { status: number | null; stdout: string; stderr: string; missing: boolean } {
  const r = spawnSync(cmd, args, { encoding: 'utf8', timeout: timeoutMs });
  const missing = (r.error as NodeJS.ErrnoException | undefined)?.code === 'ENOENT';
  return { status: r.status, stdout: r.stdout ?? '', stderr: r.error !== undefined && !missing ? String(r.error.message) : (r.stderr ?? ''), missing };
}

/** Writes the job script and submits it; returns the job id. Throws CliInputError (one line) when sbatch cannot. */
export async function submit(out: string, tasks: number, options: SlurmOptions): Promise<{ jobId: string; script: string }> {
  const script = join(out, 'slurm', 'array-job.sh');
  await writeAtomic(script, jobScript(out, tasks, options));
  const r = slurm('sbatch', ['--parsable', script], 120_000);
  if (r.missing) throw new CliInputError('--slurm', 'sbatch is not on PATH: run on a machine that can submit to your Slurm cluster');
  if (r.status !== 0) throw new CliInputError('--slurm', `sbatch could not submit the job (${firstLine(r.stderr) || `exit ${r.status}`})`);
  const jobId = r.stdout.trim().split(';')[0];
  if (!/^\d+$/.test(jobId)) throw new CliInputError('--slurm', `sbatch answered "${oneLine(r.stdout.trim())}", not a job id`);
  return { jobId, script };
}

/**
 * Array tasks of `jobId` the scheduler still holds (pending or running), or null when the job has left the queue.
 * Throws CliInputError when squeue cannot reach the scheduler.
 */
export function queued(jobId: string): number | null {
  const r = slurm('squeue', ['--noheader', '--array', '--jobs', jobId, '--format', '%i %T'], 60_000);
  if (r.missing) throw new CliInputError('squeue', 'is not on PATH');
  if (r.status !== 0) {
    // A job that ended and left the controller's memory is an "invalid job id" to squeue.
    if (/invalid job id/i.test(r.stderr)) return null;
    throw new CliInputError('squeue', `cannot reach the scheduler (${firstLine(r.stderr) || `exit ${r.status}`})`);
  }
  const n = r.stdout.split('\n').filter((l) => l.trim() !== '').length;
  return n === 0 ? null : n;
}

/** Each array task's final state from accounting (`sacct`), when the cluster keeps accounting; empty otherwise. */
export function taskStates(jobId: string): Map<number, string> {
  const states = new Map<number, string>();
  const r = slurm('sacct', ['--noheader', '--parsable2', '--jobs', jobId, '--format', 'JobID,State'], 60_000);
  if (r.status !== 0) return states;
  for (const line of r.stdout.split('\n')) {
    const m = /^\d+_(\d+)\|(\S+)/.exec(line.trim());
    if (m !== null) states.set(Number(m[1]), m[2]);
  }
  return states;
}
