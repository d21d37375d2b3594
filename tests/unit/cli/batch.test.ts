// `batch` on a generated BIDS dataset (tests/helpers/bids-dataset.ts, our own "Tidepool Listening" scenario; layout
// and sidecar columns after the BIDS specification, "Common principles" and the EEG pages' events and channels files).
// The reference for every number is the single-file command line, `analyze`, run on the same files.
import { execFile } from 'node:child_process';
import { existsSync, mkdirSync, mkdtempSync, readFileSync, readdirSync, statSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { promisify } from 'node:util';
import { beforeAll, describe, expect, it, vi } from 'vitest';
import { main } from '../../../src/cli/batch';
import { RecipeSchema } from '../../../src/lib/analysis/recipe';
import { SubjectCode, SummaryInput } from '../../../src/lib/schemas/review';
import { slurmUnavailable } from '../../helpers/slurm-cluster';
import { stemOf, TIDEPOOL, tidepoolRecipe, writeTidepoolDataset } from '../../helpers/bids-dataset';

const run = promisify(execFile);
const root = fileURLToPath(new URL('../../..', import.meta.url));

interface Outcome {
  code: number;
  stdout: string;
  stderr: string;
}

async function cli(script: string, args: string[], env: NodeJS.ProcessEnv = process.env): Promise<Outcome> {
  try {
    const { stdout, stderr } = await run(process.execPath, ['--import', 'tsx', script, ...args], { cwd: root, env, maxBuffer: 64 * 1024 * 1024 });
    return { code: 0, stdout, stderr };
  } catch (e) {
    const err = e as { code: number; stdout: string; stderr: string };
    return { code: err.code, stdout: err.stdout, stderr: err.stderr };
  }
}
const batch = (args: string[], env?: NodeJS.ProcessEnv) => cli('src/cli/batch.ts', args, env);

/** The command's own `main` in this process (the refusals happen before any worker starts), output captured. */
async function refused(args: string[], env: Record<string, string> = {}): Promise<Outcome> {
  const saved = Object.fromEntries(Object.keys(env).map((k) => [k, process.env[k]]));
  Object.assign(process.env, env);
  let stderr = '';
  let stdout = '';
  const errSpy = vi.spyOn(process.stderr, 'write').mockImplementation((c: string | Uint8Array) => ((stderr += String(c)), true));
  const outSpy = vi.spyOn(process.stdout, 'write').mockImplementation((c: string | Uint8Array) => ((stdout += String(c)), true));
  try {
    const code = await main(args);
    return { code, stdout, stderr };
  } finally {
    errSpy.mockRestore();
    outSpy.mockRestore();
    for (const [k, v] of Object.entries(saved)) {
      if (v === undefined) delete process.env[k];
      else process.env[k] = v;
    }
  }
}
const analyze = (args: string[]) => cli('src/cli/analyze.ts', args);

const dir = mkdtempSync(join(tmpdir(), 'tidemark-batch-'));
const dataset = join(dir, 'tidepool');
const recipe = join(dir, 'recipe.json');
const out = join(dir, 'out');
const corruptStem = stemOf(TIDEPOOL.corrupt.sub, TIDEPOOL.corrupt.run);
let first: Outcome;

/** The one line a bad-input exit prints. */
function expectOneLine(o: Outcome, pattern: RegExp) {
  expect(o.code).toBe(2);
  expect(o.stdout).toBe('');
  const lines = o.stderr.split('\n').filter((l) => l !== '');
  expect(lines).toHaveLength(1);
  expect(lines[0]).toMatch(pattern);
}

beforeAll(async () => {
  writeTidepoolDataset(dataset);
  writeFileSync(recipe, JSON.stringify(tidepoolRecipe));
  first = await batch([dataset, '--recipe', recipe, '--out', out, '--workers', '2']);
}, 240_000);

describe('batch on a workstation', () => {
  it('writes 11 results and a manifest naming the corrupt recording with its one-line reason', () => {
    // exit 3: the batch ran to the end and one recording failed
    expect(first.code).toBe(3);
    const results = readdirSync(join(out, 'results')).sort();
    expect(results).toHaveLength(11);
    expect(results).not.toContain(`${corruptStem}.json`);
    expect(readdirSync(join(out, 'summaries')).sort()).toEqual(results);
    const manifest = JSON.parse(readFileSync(join(out, 'batch-manifest.json'), 'utf8'));
    expect(manifest.format).toBe('tidemark-batch-manifest-1');
    expect(manifest.counts).toEqual({ recordings: 12, done: 11, failed: 1, reused: 0 });
    expect(manifest.recipe.hash).toMatch(/^[0-9a-f]{64}$/);
    const failed = manifest.recordings.filter((r: { status: string }) => r.status === 'failed');
    expect(failed).toHaveLength(1);
    expect(failed[0].recording).toBe(`sub-${TIDEPOOL.corrupt.sub}/eeg/${corruptStem}.edf`);
    expect(failed[0].reason).toContain(`${corruptStem}.edf: data record count`);
    expect(failed[0].reason).toContain('truncated');
    expect(failed[0].reason).not.toContain('\n');
    // every done recording: entities, subject, paired sidecars, fingerprints (SHA-256 of the file, as the browser's)
    const done = manifest.recordings.find((r: { stem: string }) => r.stem === stemOf('03', '2'));
    expect(done).toMatchObject({ status: 'done', subject: '03', entities: { sub: '03', task: 'tidepool', run: '2' }, datatype: 'eeg', events: 'sub-03/eeg/sub-03_task-tidepool_run-2_events.tsv', channels: 'sub-03/eeg/sub-03_task-tidepool_run-2_channels.tsv', reused: false });
    expect(done.fingerprint).toMatch(/^[0-9a-f]{64}$/);
    expect(done.result.path).toBe(`results/${stemOf('03', '2')}.json`);
    // the stderr report ends with the failure, one line
    expect(first.stderr).toContain(`batch: failed: ${join(dataset, `sub-${TIDEPOOL.corrupt.sub}`, 'eeg', `${corruptStem}.edf`)}: data record count`);
  });

  it('gives the single-file command line’s result and summary byte for byte, channels and events files included', async () => {
    const picks = [stemOf(TIDEPOOL.bad.sub, TIDEPOOL.bad.run), stemOf('01', '1'), stemOf('06', '2')];
    const outs = await Promise.all(
      picks.map(async (stem) => {
        const base = join(dataset, `sub-${stem.slice(4, 6)}`, 'eeg', stem.replace(/_eeg$/, ''));
        const target = join(dir, `${stem}.analyze.json`);
        const summary = join(dir, `${stem}.summary.json`);
        const o = await analyze([`${base}_eeg.edf`, '--recipe', recipe, '--events', `${base}_events.tsv`, '--channels', `${base}_channels.tsv`, '--out', target, '--summary', summary, '--subject', stem.slice(4, 6)]);
        expect(o.code).toBe(0);
        expect(readFileSync(join(out, 'summaries', `${stem}.json`), 'utf8')).toBe(readFileSync(summary, 'utf8'));
        return readFileSync(target, 'utf8');
      }),
    );
    picks.forEach((stem, i) => expect(readFileSync(join(out, 'results', `${stem}.json`), 'utf8')).toBe(outs[i]));
    // the summary is the study page's upload: subject code from the BIDS label, the file's SHA-256, no file name
    const manifest = JSON.parse(readFileSync(join(out, 'batch-manifest.json'), 'utf8'));
    const entry = manifest.recordings.find((r: { stem: string }) => r.stem === picks[0]);
    const summary = JSON.parse(readFileSync(join(out, entry.summary.path), 'utf8'));
    expect(summary).toMatchObject({ format: 'tidemark-cli-summary-1', subjectCode: TIDEPOOL.bad.sub, fingerprint: entry.fingerprint });
    expect(summary.summary.channels).toEqual(['C3', 'Pz']);
    // what the server accepts (src/lib/schemas/review.ts): the summary, the subject code, the format-2 recipe
    expect(SummaryInput.safeParse(summary.summary).success).toBe(true);
    expect(SubjectCode.safeParse(summary.subjectCode).success).toBe(true);
    expect(RecipeSchema.safeParse(summary.recipe).success).toBe(true);
    expect(summary.recipe.recording.fingerprint).toBe(entry.fingerprint);
    expect(JSON.stringify(summary)).not.toMatch(/\.edf|tidepool_run/);
    // the channels file's status = bad left C4 out; its HEOG type kept the eye channel off the default brain list
    const bad = JSON.parse(outs[0]);
    expect(bad.channels).toEqual(['C3', 'Pz']);
    expect(bad.warnings[0]).toContain('C4 marked bad (status = bad) and left out');
    expect(JSON.parse(outs[1]).channels).toEqual(['C3', 'C4', 'Pz']);
    expect(JSON.parse(outs[1]).conditions.gull.trials).toBe(5);
  }, 180_000);

  it('skips all 11 on a rerun, leaving their files untouched, and tries the bad one again', async () => {
    const stamp = (stem: string) => statSync(join(out, 'results', `${stem}.json`)).mtimeMs;
    const before = stamp(stemOf('05', '1'));
    const again = await batch([dataset, '--recipe', recipe, '--out', out, '--workers', '2']);
    expect(again.code).toBe(3);
    const manifest = JSON.parse(readFileSync(join(out, 'batch-manifest.json'), 'utf8'));
    expect(manifest.counts).toEqual({ recordings: 12, done: 11, failed: 1, reused: 11 });
    expect(stamp(stemOf('05', '1'))).toBe(before);
    expect(again.stderr).toContain('11 reused');
    // --collect rebuilds the same manifest from the records
    const collected = await batch(['--collect', out]);
    expect(collected.code).toBe(3);
    const rebuilt = JSON.parse(readFileSync(join(out, 'batch-manifest.json'), 'utf8'));
    expect(rebuilt.recordings.map((r: { stem: string; status: string }) => [r.stem, r.status])).toEqual(manifest.recordings.map((r: { stem: string; status: string }) => [r.stem, r.status]));
  }, 240_000);

  it('analyses again only the recording whose events file changed, and only the filtered ones', async () => {
    const stem = stemOf('06', '1');
    const events = join(dataset, 'sub-06', 'eeg', 'sub-06_task-tidepool_run-1_events.tsv');
    writeFileSync(events, readFileSync(events, 'utf8').replace(/foghorn\n$/, 'gull\n'));
    const o = await batch([dataset, '--recipe', recipe, '--out', out, '--subject', 'sub-06,05', '--run', '01']);
    expect(o.code).toBe(0);
    const manifest = JSON.parse(readFileSync(join(out, 'batch-manifest.json'), 'utf8'));
    expect(manifest.filters).toEqual({ subject: 'sub-06,05', run: '01' });
    expect(manifest.recordings.map((r: { stem: string; reused: boolean }) => [r.stem, r.reused])).toEqual([
      [stemOf('05', '1'), true],
      [stem, false],
    ]);
    expect(JSON.parse(readFileSync(join(out, 'results', `${stem}.json`), 'utf8')).conditions.gull.trials).toBe(6);
  }, 240_000);
});

describe('batch refuses bad input with one line and writes nothing', () => {
  it('a folder that is not a BIDS dataset', async () => {
    const plain = join(dir, 'plain');
    mkdirSync(join(plain, 'sub-01', 'eeg'), { recursive: true });
    const target = join(dir, 'never-1');
    expectOneLine(await refused([plain, '--recipe', recipe, '--out', target]), /^batch: .*plain: is not a BIDS dataset: it has no dataset_description\.json at its top$/);
    expect(existsSync(target)).toBe(false);
  });

  it('a dataset without a matching recording', async () => {
    const empty = join(dir, 'empty');
    mkdirSync(join(empty, 'sub-01', 'anat'), { recursive: true });
    writeFileSync(join(empty, 'dataset_description.json'), JSON.stringify({ Name: 'empty', BIDSVersion: '1.9.0' }));
    expectOneLine(await refused([empty, '--recipe', recipe, '--out', join(dir, 'never-2')]), /^batch: .*empty: holds no EEG, iEEG or MEG recording/);
    expect(existsSync(join(dir, 'never-2'))).toBe(false);
  });

  it('an entity filter no recording has', async () => {
    const target = join(dir, 'never-3');
    expectOneLine(await refused([dataset, '--recipe', recipe, '--out', target, '--subject', '07']), /^batch: --subject: no recording has sub-07 \(sub labels: 01, 02, 03, 04, 05, 06\)$/);
    expectOneLine(await refused([dataset, '--recipe', recipe, '--out', target, '--session', 'night']), /^batch: --session: no recording has ses-night \(no recording has a ses entity\)$/);
    expect(existsSync(target)).toBe(false);
  });

  it('options that do not fit together, and a recipe bound to one recording', async () => {
    expectOneLine(await refused([dataset, '--recipe', recipe, '--out', join(dir, 'x'), '--mem', '2G']), /^batch: --mem: applies only with --slurm$/);
    expectOneLine(await refused([dataset, '--recipe', recipe, '--out', join(dir, 'x'), '--slurm', '--time', 'soon']), /^batch: --time: "soon" is not a Slurm time limit/);
    const bound = join(dir, 'bound.json');
    writeFileSync(bound, JSON.stringify({ ...tidepoolRecipe, recording: { fingerprint: 'a'.repeat(64) } }));
    expectOneLine(await refused([dataset, '--recipe', bound, '--out', join(dir, 'x')]), /bound\.json: recording\.fingerprint names one recording/);
    expect(existsSync(join(dir, 'x'))).toBe(false);
  });

  it('a scheduler that cannot be reached', async () => {
    const target = join(dir, 'unreachable');
    if (slurmUnavailable() === null) {
      // slurm.conf(5): a controller on a loopback port where nothing listens.
      const conf = join(dir, 'nowhere.conf');
      writeFileSync(conf, 'ClusterName=nowhere\nSlurmctldHost=localhost(127.0.0.1)\nSlurmctldPort=9\nMessageTimeout=2\nNodeName=n1 CPUs=1 State=UNKNOWN\nPartitionName=p Nodes=n1 Default=YES\n');
      expectOneLine(await refused([dataset, '--recipe', recipe, '--out', target, '--slurm'], { SLURM_CONF: conf }), /^batch: --slurm: sbatch could not submit the job \(.*(contact|connect).*\)$/);
    } else {
      // without the binaries, the same refusal says sbatch is missing
      expectOneLine(await refused([dataset, '--recipe', recipe, '--out', target, '--slurm'], { PATH: '/nonexistent' }), /^batch: --slurm: sbatch is not on PATH/);
    }
    expect(existsSync(join(target, 'results'))).toBe(false);
  }, 180_000);
});
