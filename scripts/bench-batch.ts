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

function timed(args: string[]): number {
  const t0 = performance.now();
  const r = spawnSync(process.execPath, ['--import', 'tsx', ...args], { cwd: root, encoding: 'utf8' });
  const ms = performance.now() - t0;
  if (r.status !== 0 && r.status !== 3) {
    process.stderr.write(`bench:batch: ${args.slice(0, 2).join(' ')} failed (${r.status}): ${(r.stderr || '').trim().split('\n').pop()}\n`);
    process.exit(1);
  }
  return ms / 1000;
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
const singleTimes: number[] = [];
for (let i = 0; i < singles; i++) {
  const f = join(dataset, `sub-${String(i + 1).padStart(2, '0')}`, 'eeg', `sub-${String(i + 1).padStart(2, '0')}_task-harbourlights_eeg.edf`);
  singleTimes.push(timed(['src/cli/analyze.ts', f, '--recipe', recipe, '--out', join(dir, `single-${i}.json`), '--summary', join(dir, `single-${i}.summary.json`), '--subject', String(i + 1).padStart(2, '0')]));
}
const single = singleTimes.reduce((a, b) => a + b, 0) / singleTimes.length;
const expected = (single * 12) / workers;
const out = join(dir, 'out');
const batch = timed(['src/cli/batch.ts', dataset, '--recipe', recipe, '--out', out, '--workers', String(workers)]);
const rerun = timed(['src/cli/batch.ts', dataset, '--recipe', recipe, '--out', out, '--workers', String(workers)]);
const pct = ((batch - expected) / expected) * 100;
console.log(`single-file analyze (mean of ${singles}):       ${single.toFixed(2).padStart(7)} s per recording (${singleTimes.map((t) => t.toFixed(2)).join(', ')})`);
console.log(`single-file time × 12 / ${workers}:              ${expected.toFixed(2).padStart(7)} s`);
console.log(`batch, ${workers} worker thread${workers > 1 ? 's' : ' '}:                ${batch.toFixed(2).padStart(7)} s (${(12 / batch * 60).toFixed(1)} recordings/min; ${pct >= 0 ? '+' : ''}${pct.toFixed(1)} % vs single × 12 / workers; target within 15 %)`);
console.log(`rerun, all 12 reused:                 ${rerun.toFixed(2).padStart(7)} s`);
console.log(`load average after: ${loadavg().map((l) => l.toFixed(2)).join(' ')}`);
rmSync(dir, { recursive: true, force: true });
