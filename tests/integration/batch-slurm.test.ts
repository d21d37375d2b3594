// `batch --slurm` against a real, private single-node Slurm cluster on loopback (tests/helpers/slurm-cluster.ts),
// on the generated "Tidepool Listening" BIDS dataset. sbatch array jobs, squeue and the `%N` concurrency limit as
// Slurm's own sbatch(1) and squeue(1) document them. The reference is the same batch run on this workstation.
import { spawnSync } from 'node:child_process';
import { mkdtempSync, readdirSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest';
import { main } from '../../src/cli/batch';
import { stemOf, TIDEPOOL, tidepoolRecipe, writeTidepoolDataset } from '../helpers/bids-dataset';
import { slurmUnavailable, startSlurmCluster, type SlurmCluster } from '../helpers/slurm-cluster';

const unavailable = slurmUnavailable();
if (unavailable !== null) process.stdout.write(`batch-slurm: skipped: ${unavailable}\n`);

/** Runs the command's `main` in this process with `env` added, capturing standard error. */
async function batch(args: string[], env: NodeJS.ProcessEnv): Promise<{ code: number; stderr: string }> {
  const saved = { SLURM_CONF: process.env.SLURM_CONF, TIDEMARK_BATCH_POLL_MS: process.env.TIDEMARK_BATCH_POLL_MS };
  process.env.SLURM_CONF = env.SLURM_CONF;
  process.env.TIDEMARK_BATCH_POLL_MS = '500';
  let stderr = '';
  const spy = vi.spyOn(process.stderr, 'write').mockImplementation((c: string | Uint8Array) => ((stderr += String(c)), true));
  try {
    return { code: await main(args), stderr };
  } finally {
    spy.mockRestore();
    for (const [k, v] of Object.entries(saved)) {
      if (v === undefined) delete process.env[k];
      else process.env[k] = v;
    }
  }
}

describe.skipIf(unavailable !== null)('batch on a private Slurm cluster', () => {
  const dir = mkdtempSync(join(tmpdir(), 'tidemark-slurm-'));
  const dataset = join(dir, 'tidepool');
  const recipe = join(dir, 'recipe.json');
  let cluster: SlurmCluster;

  beforeAll(async () => {
    writeTidepoolDataset(dataset);
    writeFileSync(recipe, JSON.stringify(tidepoolRecipe));
    cluster = await startSlurmCluster();
  }, 120_000);

  afterAll(async () => {
    await cluster?.stop();
    // every daemon this test started has ended
    const left = spawnSync('pgrep', ['-f', cluster?.dir ?? '/nonexistent'], { encoding: 'utf8' }).stdout.trim();
    expect(left).toBe('');
  }, 60_000);

  it('submits an array job, waits, collects, and finds the same 11 results as the local batch', async () => {
    const out = join(dir, 'slurm-out');
    const submitted = await batch(
      [dataset, '--recipe', recipe, '--out', out, '--slurm', '--partition', cluster.partition, '--time', '5', '--mem', '200M', '--cpus-per-task', '1', '--concurrent', '2'],
      cluster.env,
    );
    expect(submitted.stderr).toMatch(/submitted Slurm job \d+: 12 array tasks/);
    expect(submitted.code).toBe(3);
    const script = readFileSync(join(out, 'slurm', 'array-job.sh'), 'utf8');
    expect(script).toContain('#SBATCH --array=0-11%2');
    expect(script).toContain(`#SBATCH --partition=${cluster.partition}`);
    const manifest = JSON.parse(readFileSync(join(out, 'batch-manifest.json'), 'utf8'));
    expect(manifest.runner.kind).toBe('slurm');
    expect(manifest.counts).toMatchObject({ recordings: 12, done: 11, failed: 1 });
    const failed = manifest.recordings.find((r: { status: string }) => r.status === 'failed');
    expect(failed.recording).toBe(`sub-${TIDEPOOL.corrupt.sub}/eeg/${stemOf(TIDEPOOL.corrupt.sub, TIDEPOOL.corrupt.run)}.edf`);
    expect(failed.reason).toContain('truncated');

    const local = join(dir, 'local-out');
    expect((await batch([dataset, '--recipe', recipe, '--out', local, '--workers', '1'], cluster.env)).code).toBe(3);
    const names = readdirSync(join(out, 'results')).sort();
    expect(names).toHaveLength(11);
    expect(readdirSync(join(local, 'results')).sort()).toEqual(names);
    for (const name of names) expect(readFileSync(join(out, 'results', name), 'utf8')).toBe(readFileSync(join(local, 'results', name), 'utf8'));
  }, 300_000);

  it('returns at once with --no-wait; --collect gathers the finished outputs later', async () => {
    const out = join(dir, 'later');
    const submitted = await batch([dataset, '--recipe', recipe, '--out', out, '--slurm', '--no-wait', '--subject', '03'], cluster.env);
    expect(submitted.code).toBe(0);
    const jobId = /Slurm job (\d+)/.exec(submitted.stderr)?.[1] as string;
    expect(submitted.stderr).toContain(`--collect ${out}`);
    for (let i = 0; i < 240; i++) {
      const q = spawnSync('squeue', ['--noheader', '--array', '--jobs', jobId], { env: cluster.env, encoding: 'utf8' });
      if (q.status !== 0 || q.stdout.trim() === '') break;
      await new Promise((r) => setTimeout(r, 500));
    }
    const collected = await batch(['--collect', out], cluster.env);
    expect(collected.code).toBe(0);
    const manifest = JSON.parse(readFileSync(join(out, 'batch-manifest.json'), 'utf8'));
    expect(manifest.runner).toMatchObject({ kind: 'slurm', jobId });
    expect(manifest.recordings.map((r: { stem: string; status: string }) => [r.stem, r.status])).toEqual([
      [stemOf('03', '1'), 'done'],
      [stemOf('03', '2'), 'done'],
    ]);
  }, 300_000);
});
