/**
 * `npm run bench:stats`: the statistics map test on the workload — 12 subjects, a 40 × 256 map, all 4,096
 * sign flips — in a worker thread (workers/map-test.node-worker.ts, as a page would run it), then in-process.
 * Prints wall times: the worker's start apart, then the test in the ready worker (target ≤ 2 s, issue 12,
 * "Numbers"), a whole runMapTestInWorker call, and the test in-process; each with the process's CPU time. Not a test.
 */
import * as Comlink from 'comlink';
import { cpus, loadavg } from 'node:os';
import { runMapTestInWorker } from '../src/lib/client/map-test-runner';
import { runMapTestSync, type MapTestInput } from '../src/lib/statistics/map-test';
import type { MapTestApi } from '../workers/map-test-api';
import { createNodeMapTestWorker } from '../workers/node-worker-factory';

const SUBJECTS = 12;
const FREQS = 40;
const TIMES = 256;

// Scenario of our own: 12 subjects' dB maps with unit noise and a +1.2 dB patch (frequencies 10–19, times 100–139).
function makeInput(subjects = SUBJECTS): MapTestInput {
  let seed = 11;
  const next = () => {
    seed = (seed * 16807) % 2147483647;
    return seed / 2147483647;
  };
  const points = FREQS * TIMES;
  const values = new Float64Array(subjects * points);
  for (let s = 0; s < subjects; s++) {
    for (let p = 0; p < points; p++) {
      const f = Math.floor(p / TIMES);
      const t = p % TIMES;
      const z = Math.sqrt(-2 * Math.log(1 - next())) * Math.cos(2 * Math.PI * next());
      values[s * points + p] = z + (f >= 10 && f < 20 && t >= 100 && t < 140 ? 1.2 : 0);
    }
  }
  return { values, nSubjects: subjects, nFrequencies: FREQS, nTimes: TIMES };
}

// process.cpuUsage() counts every thread of the process, the worker's included: on a shared machine the CPU time
// says what the run costs when wall time is inflated by other load.
let cpuMark = process.cpuUsage();
const line = (label: string, ms: number) => {
  const cpu = process.cpuUsage(cpuMark);
  cpuMark = process.cpuUsage();
  console.log(`${label.padEnd(46)} ${(ms / 1000).toFixed(3).padStart(7)} s wall ${((cpu.user + cpu.system) / 1e6).toFixed(3).padStart(7)} s CPU`);
};

async function main(): Promise<void> {
  const input = makeInput();
  console.log(`map test: ${SUBJECTS} subjects, ${FREQS} × ${TIMES} map, 2^${SUBJECTS} = ${2 ** SUBJECTS} flips`);
  console.log(`machine: ${cpus().length} cores, load average ${loadavg().map((l) => l.toFixed(2)).join(' ')}`);

  // One worker, as a page keeps it: the first call also pays for starting the thread and compiling the TypeScript
  // with tsx (a browser loads a bundled worker instead), so the start is timed apart from the runs.
  const worker = createNodeMapTestWorker();
  const remote = Comlink.wrap<MapTestApi>(worker.endpoint);
  cpuMark = process.cpuUsage();
  let start = performance.now();
  await remote.run({ values: new Float64Array([1, 2]), nSubjects: 2, nFrequencies: 1, nTimes: 1 });
  line('worker start (thread + tsx) and a 2-point test', performance.now() - start);
  for (let round = 1; round <= 3; round++) {
    const values = input.values.slice();
    cpuMark = process.cpuUsage();
    start = performance.now();
    const result = await remote.run(Comlink.transfer({ ...input, values }, [values.buffer]), Comlink.proxy(() => undefined));
    line(`map test in the worker, round ${round} (target ≤ 2 s)`, performance.now() - start);
    if (round === 1) {
      const top = result.clusters[0];
      console.log(`  ${result.permutations} permutations; largest cluster: mass ${top.mass.toFixed(1)}, ${top.size} points, p = ${top.p}`);
    }
  }
  remote[Comlink.releaseProxy]();
  worker.terminate();
  cpuMark = process.cpuUsage();
  start = performance.now();
  await runMapTestInWorker(input, { createWorker: createNodeMapTestWorker });
  line('runMapTestInWorker: new worker + test + end', performance.now() - start);

  cpuMark = process.cpuUsage();
  start = performance.now();
  runMapTestSync(input);
  line('in-process (runMapTestSync)', performance.now() - start);

  // Above 12 subjects the null comes from 10,000 seeded random flips (not a target; for scale).
  const large = makeInput(20);
  cpuMark = process.cpuUsage();
  start = performance.now();
  runMapTestSync({ ...large, seed: 7 });
  line('in-process, 20 subjects, 10,000 random flips', performance.now() - start);
}

main().catch((error: unknown) => {
  console.error(error);
  process.exitCode = 1;
});
