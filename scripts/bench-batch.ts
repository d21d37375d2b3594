/**
 * `npm run bench:batch [-- --workers N --singles K]`: the local batch's throughput on the demo cohort (12 recordings,
 * `npm run demo:data`), laid out as a BIDS dataset of symbolic links in a temporary folder, with the example recipe
 * (public/recipes/harbour-lights.json). Compares the batch's wall time with the single-file command line's:
 * `analyze` (result and summary, as the batch writes per recording) timed on K recordings, times 12, divided by the
 * workers (issue 16, "Numbers": within 15 %). Then a rerun, where every recording is reused. Not a test.
 */
import { spawnSync } from 'node:child_process';
import { mkdirSync, mkdtempSync, readdirSync, rmSync, symlinkSync, writeFileSync } from 'node:fs';
import { availableParallelism, cpus, loadavg, tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';

const root = fileURLToPath(new URL('..', import.meta.url));
const demo = join(root, 'demo-data');
const recipe = join(root, 'public', 'recipes', 'harbour-lights.json');

function option(name: string, fallback: number): number {
  const i = process.argv.indexOf(`--${name}`);
  if (i < 0) return fallback;
  const v = Number(process.argv[i + 1]);
  if (!Number.isInteger(v) || v < 1) {
    process.stderr.write(`bench:batch: --${name} must be a whole number of at least 1\n`);
    process.exit(2);
  }
  return v;
}

/** Wall time and CPU time (user + system of the child and its threads, from bash's `times`) of one command. */
function timed(args: string[]): { wall: number; cpu: number } {
  const quoted = [process.execPath, '--import', 'tsx', ...args].map((a) => `'${a.replace(/'/g, `'\\''`)}'`).join(' ');
  const t0 = performance.now();
  const r = spawnSync('bash', ['-c', `${quoted} >/dev/null 2>&1; code=$?; times; exit $code`], { cwd: root, encoding: 'utf8' });
  const wall = (performance.now() - t0) / 1000;
  if (r.status !== 0 && r.status !== 3) {
    process.stderr.write(`bench:batch: ${args.slice(0, 2).join(' ')} failed (exit ${r.status})\n`);
    process.exit(1);
  }
  // `times` prints the shell's own user/system times, then its children's: "0m1.234s 0m0.123s".
  const children = r.stdout.trim().split('\n').pop() ?? '';
  const cpu = [...children.matchAll(/(\d+)m([\d.]+)s/g)].reduce((sum, m) => sum + Number(m[1]) * 60 + Number(m[2]), 0);
  return { wall, cpu };
}

const workers = option('workers', Math.max(1, availableParallelism() - 1));
const singles = option('singles', 2);
const gen = spawnSync(process.execPath, ['--import', 'tsx', 'scripts/demo-data.ts'], { cwd: root, stdio: ['ignore', 'ignore', 'inherit'] });
if (gen.status !== 0) process.exit(1);
const files = readdirSync(demo).filter((f) => /^harbour-lights-\d+\.edf$/.test(f)).sort();
if (files.length !== 12) {
  process.stderr.write(`bench:batch: expected the 12 demo recordings in ${demo}, found ${files.length}\n`);
  process.exit(1);
}
const dir = mkdtempSync(join(tmpdir(), 'tidemark-bench-batch-'));
const dataset = join(dir, 'harbour');
mkdirSync(dataset);
writeFileSync(join(dataset, 'dataset_description.json'), JSON.stringify({ Name: 'Harbour Lights demo cohort', BIDSVersion: '1.9.0' }));
files.forEach((f, i) => {
  const sub = String(i + 1).padStart(2, '0');
  mkdirSync(join(dataset, `sub-${sub}`, 'eeg'), { recursive: true });
  symlinkSync(join(demo, f), join(dataset, `sub-${sub}`, 'eeg', `sub-${sub}_task-harbourlights_eeg.edf`));
});

console.log(`batch benchmark: 12 demo recordings (32 channels, 500 Hz, 300 s), recipe ${recipe}`);
console.log(`machine: ${cpus().length} cores, load average ${loadavg().map((l) => l.toFixed(2)).join(' ')}; ${workers} worker thread${workers > 1 ? 's' : ''}`);
const singleRuns: { wall: number; cpu: number }[] = [];
for (let i = 0; i < singles; i++) {
  const sub = String(i + 1).padStart(2, '0');
  const f = join(dataset, `sub-${sub}`, 'eeg', `sub-${sub}_task-harbourlights_eeg.edf`);
  singleRuns.push(timed(['src/cli/analyze.ts', f, '--recipe', recipe, '--out', join(dir, `single-${i}.json`), '--summary', join(dir, `single-${i}.summary.json`), '--subject', sub]));
}
const mean = (xs: number[]) => xs.reduce((a, b) => a + b, 0) / xs.length;
const single = { wall: mean(singleRuns.map((r) => r.wall)), cpu: mean(singleRuns.map((r) => r.cpu)) };
const expected = (single.wall * 12) / workers;
const out = join(dir, 'out');
const batch = timed(['src/cli/batch.ts', dataset, '--recipe', recipe, '--out', out, '--workers', String(workers)]);
const rerun = timed(['src/cli/batch.ts', dataset, '--recipe', recipe, '--out', out, '--workers', String(workers)]);
const pct = ((batch.wall - expected) / expected) * 100;
const f = (x: number) => x.toFixed(2).padStart(7);
console.log(`single-file analyze (mean of ${singles}):     ${f(single.wall)} s wall ${f(single.cpu)} s CPU per recording (${singleRuns.map((r) => r.wall.toFixed(2)).join(', ')} s wall)`);
console.log(`single-file × 12 / ${workers} worker${workers > 1 ? 's' : ' '}:          ${f(expected)} s wall ${f(single.cpu * 12)} s CPU (× 12)`);
console.log(`batch, ${workers} worker thread${workers > 1 ? 's' : ' '}:              ${f(batch.wall)} s wall ${f(batch.cpu)} s CPU (${((12 / batch.wall) * 60).toFixed(1)} recordings/min; ${pct >= 0 ? '+' : ''}${pct.toFixed(1)} % vs single × 12 / workers; target within 15 %)`);
console.log(`rerun, all 12 reused:               ${f(rerun.wall)} s wall ${f(rerun.cpu)} s CPU`);
console.log(`load average after: ${loadavg().map((l) => l.toFixed(2)).join(' ')}`);
rmSync(dir, { recursive: true, force: true });
