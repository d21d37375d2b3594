/**
 * `npm run bench`: the analysis core on a realistic workload (32 channels, 100 epochs of 3 s at 512 Hz, 40
 * log-spaced frequencies 2–60 Hz, 3–10 cycles, dB baseline), single-threaded and through the worker pool on
 * node:worker_threads, with peak memory; then the numpy reference (scripts/bench-numpy.py) when python3 is there.
 */
import { spawnSync } from 'node:child_process';
import { availableParallelism } from 'node:os';
import { fileURLToPath } from 'node:url';
import { decomposeChannel } from '../src/lib/analysis/decompose';
import type { Recording } from '../src/lib/analysis/recording';
import { planRecipe, runRecipe } from '../src/lib/analysis/run-recipe';
import { DecomposePool } from '../src/lib/client/decompose-pool';
import { createNodeDecomposeWorker } from '../workers/node-worker-factory';

const CHANNELS = 32;
const EPOCHS = 100;
const FS = 512;
const FREQS = 40;

const recipe = {
  epochs: { events: ['cue'], tmin: -1, tmax: 2 },
  frequencies: { min: 2, max: 60, count: FREQS, spacing: 'log' },
  cycles: { min: 3, max: 10 },
  baseline: { start: -0.5, end: -0.2, method: 'db', scope: 'average' },
  spectrum: { segment: 2, overlap: 0.5, range: [1, 60], source: 'recording' },
  aperiodic: { range: [2, 40], mode: 'fixed' },
};

// Same layout as bench-numpy.py: epochs of L samples 64 samples apart, the first starting at sample 512.
function makeRecording(): Recording {
  const L = 3 * FS + 1;
  const n = EPOCHS * (L + 64) + 1024;
  let seed = 7;
  const next = () => {
    seed = (seed * 16807) % 2147483647;
    return seed / 2147483647;
  };
  const data = Array.from({ length: CHANNELS }, () => {
    const x = new Float32Array(n);
    for (let i = 0; i < n; i++) x[i] = 10 * Math.sqrt(-2 * Math.log(1 - next())) * Math.cos(2 * Math.PI * next());
    return x;
  });
  const events = Array.from({ length: EPOCHS }, (_, k) => ({ onsetSeconds: (512 + k * (L + 64) + FS) / FS, durationSeconds: 0, label: 'cue' }));
  return { sampleRateHz: FS, channelNames: Array.from({ length: CHANNELS }, (_, i) => `E${i + 1}`), data, events };
}

const maxRssMb = () => process.resourceUsage().maxRSS / 1024;
const maps = CHANNELS * EPOCHS * FREQS;
const line = (label: string, seconds: number) =>
  console.log(`${label.padEnd(44)} ${seconds.toFixed(3).padStart(7)} s  ${Math.round(maps / seconds).toString().padStart(7)} epoch-frequency maps/s`);

async function main() {
  const recording = makeRecording();
  console.log(`workload: ${CHANNELS} channels × ${EPOCHS} epochs × 3 s at ${FS} Hz, ${FREQS} log-spaced frequencies 2–60 Hz, 3–10 cycles, dB`);
  console.log(`node ${process.version}, ${availableParallelism()} cores; recording ${(CHANNELS * recording.data[0].length * 4 / 1048576).toFixed(0)} MB of Float32`);

  const plan = planRecipe(recording, recipe);
  const job = (c: number) => ({
    samples: recording.data[c],
    epochStarts: plan.epochStarts,
    epochSamples: plan.epochSamples,
    sampleRateHz: FS,
    frequencies: plan.frequencies,
    sigmas: plan.sigmas,
    baseline: plan.baseline,
  });
  decomposeChannel(job(0)); // warm-up: JIT and the wavelet bank
  let t = performance.now();
  for (let c = 0; c < CHANNELS; c++) decomposeChannel(job(c));
  const tfSeconds = (performance.now() - t) / 1000;
  line('wavelet power + dB, 1 thread (numpy task)', tfSeconds);

  t = performance.now();
  const result = runRecipe(recording, recipe);
  const wholeSeconds = (performance.now() - t) / 1000;
  line('runRecipe (+ Welch, aperiodic, JSON shape)', wholeSeconds);
  const singlePeak = maxRssMb();
  console.log(`peak RSS after single-thread runs: ${singlePeak.toFixed(0)} MB (result ${result.channels.length} channels)`);

  const cores = availableParallelism();
  for (const size of [...new Set([Math.max(1, cores - 1), cores])]) {
    const pool = new DecomposePool({ size, createWorker: createNodeDecomposeWorker });
    await pool.run(recording, { ...recipe, channels: recording.channelNames.slice(0, size) }); // start and warm the workers
    t = performance.now();
    const pooled = await pool.run(recording, recipe);
    const poolSeconds = (performance.now() - t) / 1000;
    pool.terminate();
    line(`worker pool, ${size} worker${size > 1 ? 's' : ''} (whole recipe)`, poolSeconds);
    if (JSON.stringify(pooled.result.conditions.cue.normalized[5]) !== JSON.stringify(result.conditions.cue.normalized[5])) {
      throw new Error('pool and single-thread results differ');
    }
  }
  console.log(`peak RSS of the whole benchmark (main + workers): ${maxRssMb().toFixed(0)} MB`);

  const script = fileURLToPath(new URL('./bench-numpy.py', import.meta.url));
  const env = { ...process.env };
  delete env.OPENBLAS_CORETYPE;
  delete env.OPENBLAS_L2_SIZE;
  const py = spawnSync('python3', [script], { encoding: 'utf8', env });
  if (py.status === 0) {
    const out = py.stdout.trim();
    console.log(out);
    const m = /cpu ([\d.]+) s/.exec(out) ?? /wall ([\d.]+) s/.exec(out);
    if (m) console.log(`ratio, Node single thread / numpy (wavelet power + dB): ${(tfSeconds / Number(m[1])).toFixed(2)}×  (target ≤ 1.5×)`);
  } else {
    console.log('numpy reference skipped (python3 with numpy not available)');
  }
}

main().catch((e) => {
  console.error(e);
  process.exitCode = 1;
});
