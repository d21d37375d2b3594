/**
 * `npm run bench:stats`: the statistics map test on the workload — 12 subjects, a 40 × 256 map, all 4,096
 * sign flips — in a worker thread (workers/map-test.node-worker.ts, as a page would run it), then in-process.
 * Prints wall times; the target is ≤ 2 s for the worker run (issue 12, "Numbers"). Not a test.
 */
import { cpus, loadavg } from 'node:os';
import { runMapTestInWorker } from '../src/lib/client/map-test-runner';
import { runMapTestSync, type MapTestInput } from '../src/lib/statistics/map-test';
import { createNodeMapTestWorker } from '../workers/node-worker-factory';

const SUBJECTS = 12;
const FREQS = 40;
const TIMES = 256;

// Scenario of our own: 12 subjects' dB maps with unit noise and a +1.2 dB patch (frequencies 10–19, times 100–139).
function makeInput(): MapTestInput {
  let seed = 11;
  const next = () => {
    seed = (seed * 16807) % 2147483647;
    return seed / 2147483647;
  };
  const points = FREQS * TIMES;
  const values = new Float64Array(SUBJECTS * points);
  for (let s = 0; s < SUBJECTS; s++) {
    for (let p = 0; p < points; p++) {
      const f = Math.floor(p / TIMES);
      const t = p % TIMES;
      const z = Math.sqrt(-2 * Math.log(1 - next())) * Math.cos(2 * Math.PI * next());
      values[s * points + p] = z + (f >= 10 && f < 20 && t >= 100 && t < 140 ? 1.2 : 0);
    }
  }
  return { values, nSubjects: SUBJECTS, nFrequencies: FREQS, nTimes: TIMES };
}

const line = (label: string, ms: number) => console.log(`${label.padEnd(46)} ${(ms / 1000).toFixed(3).padStart(7)} s`);

async function main(): Promise<void> {
  const input = makeInput();
  console.log(`map test: ${SUBJECTS} subjects, ${FREQS} × ${TIMES} map, 2^${SUBJECTS} = ${2 ** SUBJECTS} flips`);
  console.log(`machine: ${cpus().length} cores, load average ${loadavg().map((l) => l.toFixed(2)).join(' ')}`);

  for (let round = 1; round <= 3; round++) {
    const start = performance.now();
    let first = 0;
    const result = await runMapTestInWorker(input, {
      createWorker: createNodeMapTestWorker,
      onProgress: (f) => {
        if (first === 0 && f === 0) first = performance.now();
      },
    });
    const end = performance.now();
    line(`worker, round ${round}: start + run (target ≤ 2 s)`, end - start);
    line(`  of which from the first progress message on`, end - first);
    if (round === 1) {
      const top = result.clusters[0];
      console.log(`  ${result.permutations} permutations; largest cluster: mass ${top.mass.toFixed(1)}, ${top.size} points, p = ${top.p}`);
    }
  }

  const cpu0 = process.cpuUsage();
  const start = performance.now();
  runMapTestSync(input);
  const wall = performance.now() - start;
  const cpu = process.cpuUsage(cpu0);
  line('in-process (runMapTestSync)', wall);
  line('  CPU time of that run', (cpu.user + cpu.system) / 1000);
}

main().catch((error: unknown) => {
  console.error(error);
  process.exitCode = 1;
});
