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
import { resultBytes } from './lib/result-bytes';

const CHANNELS = 32;
const EPOCHS = 100;
const FS = 512;
const FREQS = 40;

const recipe = {
  format: 2,
  epochs: { events: ['cue'], start: -1, end: 2 },
  frequencies: { min: 2, max: 60, count: FREQS, spacing: 'log' },
  cycles: { min: 3, max: 10 },
  baseline: { start: -0.5, end: -0.2, method: 'decibel', scope: 'average' },
  spectrum: { segment: 2, overlap: 0.5, range: [1, 60], source: 'recording' },
  aperiodic: { range: [2, 40], model: 'power-law' },
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

interface PhaseReport {
  phase: string;
  seconds: Record<string, number>;
  maxRssMb: number;
  bytes?: ReturnType<typeof resultBytes>;
}

async function singlePhase(recording: Recording): Promise<PhaseReport> {
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
  const cpu0 = process.cpuUsage();
  for (let c = 0; c < CHANNELS; c++) decomposeChannel(job(c));
  const tf = (performance.now() - t) / 1000;
  const cpu = process.cpuUsage(cpu0);
  const tfCpu = (cpu.user + cpu.system) / 1e6;
  // The same decomposition in trial scope (each trial normalized by its own baseline, then averaged).
  const trialPlan = planRecipe(recording, { ...recipe, baseline: { ...recipe.baseline, scope: 'trial' } });
  t = performance.now();
  const cpuTrial0 = process.cpuUsage();
  for (let c = 0; c < CHANNELS; c++) decomposeChannel({ ...job(c), baseline: trialPlan.baseline });
  const tfTrial = (performance.now() - t) / 1000;
  const cpuTrial = process.cpuUsage(cpuTrial0);
  const tfTrialCpu = (cpuTrial.user + cpuTrial.system) / 1e6;
  t = performance.now();
  const cpuWhole0 = process.cpuUsage();
  runRecipe(recording, recipe);
  const whole = (performance.now() - t) / 1000;
  const cpuWhole = process.cpuUsage(cpuWhole0);
  const wholeCpu = (cpuWhole.user + cpuWhole.system) / 1e6;
  const rss = maxRssMb();
  t = performance.now();
  const cpuTrialScope0 = process.cpuUsage();
  runRecipe(recording, { ...recipe, baseline: { ...recipe.baseline, scope: 'trial' } });
  const trialScope = (performance.now() - t) / 1000;
  const cpuTrialScope = process.cpuUsage(cpuTrialScope0);
  const trialScopeCpu = (cpuTrialScope.user + cpuTrialScope.system) / 1e6;
  // Percent change, both scopes (trial scope takes the coarse-baseline path there, no per-trial rows).
  const timed = (scope: 'average' | 'trial') => {
    const t0 = performance.now();
    const c0 = process.cpuUsage();
    runRecipe(recording, { ...recipe, baseline: { ...recipe.baseline, method: 'percent-change', scope } });
    const c = process.cpuUsage(c0);
    return [(performance.now() - t0) / 1000, (c.user + c.system) / 1e6];
  };
  const [percentWhole, percentWholeCpu] = timed('average');
  const [percentTrial, percentTrialCpu] = timed('trial');
  return {
    phase: 'single',
    seconds: { tf, tfCpu, tfTrial, tfTrialCpu, whole, wholeCpu, trialScope, trialScopeCpu, percentWhole, percentWholeCpu, percentTrial, percentTrialCpu },
    maxRssMb: rss,
  };
}

async function poolPhase(recording: Recording, size: number): Promise<PhaseReport> {
  const pool = new DecomposePool({ size, createWorker: createNodeDecomposeWorker });
  await pool.run(recording, { ...recipe, channels: recording.channelNames.slice(0, size) }); // start and warm the workers
  const t = performance.now();
  // As the workspace runs it: with each epoch's spectrum for the Spectrum screen.
  const { plan, channels } = await pool.run(recording, recipe, { epochSpectra: true });
  const seconds = (performance.now() - t) / 1000;
  pool.terminate();
  if (channels.length !== CHANNELS) throw new Error('pool returned the wrong channels');
  const rss = maxRssMb();
  return { phase: `pool ${size}`, seconds: { whole: seconds }, maxRssMb: rss, bytes: resultBytes(recipe, plan, channels) };
}

// Each phase runs in its own process so its peak memory is its own.
function runPhase(args: string[]): PhaseReport {
  const script = fileURLToPath(import.meta.url);
  const child = spawnSync(process.execPath, [...process.execArgv, script, ...args], { encoding: 'utf8', maxBuffer: 1 << 24 });
  if (child.status !== 0) throw new Error(`bench phase ${args.join(' ')} failed: ${child.stderr}`);
  return JSON.parse(child.stdout.trim().split('\n').pop() as string) as PhaseReport;
}

async function main() {
  const argv = process.argv.slice(2);
  if (argv[0] === '--phase') {
    const recording = makeRecording();
    const report = argv[1] === 'single' ? await singlePhase(recording) : await poolPhase(recording, Number(argv[2]));
    console.log(JSON.stringify(report));
    return;
  }
  const cores = availableParallelism();
  console.log(`workload: ${CHANNELS} channels × ${EPOCHS} epochs × 3 s at ${FS} Hz, ${FREQS} log-spaced frequencies 2–60 Hz, 3–10 cycles, dB`);
  console.log(`node ${process.version}, ${cores} cores`);
  const single = runPhase(['--phase', 'single']);
  line('wavelet power + dB, 1 thread (numpy task)', single.seconds.tf);
  console.log(`  CPU time ${single.seconds.tfCpu.toFixed(3)} s`);
  line('runRecipe, 1 thread (+ Welch, aperiodic, JSON)', single.seconds.whole);
  console.log(`  peak RSS ${single.maxRssMb.toFixed(0)} MB`);
  line('runRecipe, 1 thread, scope trial (trial groups)', single.seconds.trialScope);
  line('wavelet power + dB, 1 thread, scope trial', single.seconds.tfTrial);
  // Trial scope against average scope, like for like (CPU time is the fairer figure on a shared machine).
  const s = single.seconds;
  console.log(
    `trial / average scope: runRecipe ${(s.trialScope / s.whole).toFixed(2)}× wall, ${(s.trialScopeCpu / s.wholeCpu).toFixed(2)}× CPU; ` +
      `wavelet power + dB ${(s.tfTrial / s.tf).toFixed(2)}× wall, ${(s.tfTrialCpu / s.tfCpu).toFixed(2)}× CPU (target ≤ 2×)`,
  );
  console.log(
    `trial / average scope, percent change: runRecipe ${(s.percentTrial / s.percentWhole).toFixed(2)}× wall, ` +
      `${(s.percentTrialCpu / s.percentWholeCpu).toFixed(2)}× CPU (target ≤ 2×)`,
  );
  for (const size of [...new Set([Math.max(1, cores - 1), cores])]) {
    const pool = runPhase(['--phase', 'pool', String(size)]);
    line(`worker pool, ${size} worker${size > 1 ? 's' : ''} (whole recipe)`, pool.seconds.whole);
    console.log(`  peak RSS ${pool.maxRssMb.toFixed(0)} MB (main thread + workers)`);
    const b = pool.bytes!;
    const mb = (x: number) => (x / 1e6).toFixed(1);
    console.log(`  held per decomposition ${mb(b.decomposition)} MB typed (spectra ${mb(b.spectra)} MB); the same run as Result JSON ${mb(b.resultJson)} MB of heap`);
  }

  const script = fileURLToPath(new URL('./bench-numpy.py', import.meta.url));
  const env = { ...process.env };
  delete env.OPENBLAS_CORETYPE;
  delete env.OPENBLAS_L2_SIZE;
  const py = spawnSync('python3', [script], { encoding: 'utf8', env });
  if (py.status === 0) {
    const out = py.stdout.trim();
    console.log(out);
    // CPU time is the fairer figure on a shared machine; wall time is printed beside it.
    for (const variant of ['standard', 'band']) {
      const m = new RegExp(`${variant}: wall ([\\d.]+) s.*cpu ([\\d.]+) s`).exec(out);
      if (m === null) continue;
      console.log(
        `ratio, Node 1 thread / numpy ${variant} (wavelet power + dB): CPU ${(single.seconds.tfCpu / Number(m[2])).toFixed(2)}×, wall ${(single.seconds.tf / Number(m[1])).toFixed(2)}×  (target ≤ 1.5×)`,
      );
    }
  } else {
    console.log('numpy reference skipped (python3 with numpy not available)');
  }
}

main().catch((e) => {
  console.error(e);
  process.exitCode = 1;
});
