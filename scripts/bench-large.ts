/**
 * `npm run bench:large`: a large recording opened in Chromium through the real app. Writes a 64-channel EDF+ of about
 * 500 MB (TIDEMARK_BENCH_LARGE_MB) with our own writer (src/lib/formats/edf-writer.ts) into a temporary folder,
 * boots the app like `npm run bench:ui` (own cluster, slot TIDEMARK_BENCH_SLOT, default 8, demo flavour), signs in
 * as the demo analyst, opens the Source screen and chooses the file with the file input. It reports, from the
 * input's change event, when the header details, the events (the proposed conditions) and the overview trace are
 * on screen, and the page's peak memory: the renderer process's peak resident set (VmHWM in /proc, which holds the
 * page and its workers) against its size before the file was chosen, next to the file's size and the decoded
 * Float32 samples' size. The temporary folder is deleted afterwards. Target (issue 10): ≤ 5 s to header, events
 * and overview; the file is never held twice.
 *
 * The recording is invented for this benchmark (the demo's "Harbour Lights" scenario: 64 channels at 512 Hz,
 * `lamp-watch` and `oar-pull` cues every 3 s, 1/f-like noise with a 10 Hz rhythm); it describes nobody.
 */
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { writeEdf, type EdfWriteAnnotation, type EdfWriteSignal } from '../src/lib/formats/edf-writer';
import { bytesSource } from '../src/lib/formats/byte-source';
import { openEdf, toRecording } from '../src/lib/formats/edf-reader';
import { Sha256 } from '../src/lib/formats/fingerprint';
import { conditionsPerLabel, decideEpochs, defaultConditioning, defaultRejection } from '../src/lib/client/workspace/source-rules';
import {
  assertPortFree, buildIfStale, ensureNodeModules, log, migrate, onSignals, outDir, requireChromium, root, runMain, seed,
  startChild, startCluster, stopAll,
} from './lib/bootstrap.mjs';

const SLOT = Number(process.env.TIDEMARK_BENCH_SLOT ?? 8);
const APP_PORT = 4331 + SLOT;
const PG_PORT = 54339 + SLOT;
const SMTP_PORT = 2535 + SLOT;
const TARGET_MB = Number(process.env.TIDEMARK_BENCH_LARGE_MB ?? 500);
const CHANNELS = 64;
const FS = 512;
const TEN_TWENTY = ['Fp1', 'Fp2', 'F7', 'F3', 'Fz', 'F4', 'F8', 'T7', 'C3', 'Cz', 'C4', 'T8', 'P7', 'P3', 'Pz', 'P4', 'P8', 'O1', 'Oz', 'O2'];
process.env.TIDEMARK_OUT_DIR = `dist-${SLOT}`;
process.env.TIDEMARK_BUILD = 'demo';

/** Writes the benchmark recording; returns its path, size and sample count per channel. */
async function writeRecording(folder: string): Promise<{ file: string; bytes: number; samplesPerChannel: number; events: number; core: string }> {
  // One record = 1 s: 64 × 512 int16 samples plus the annotation signal.
  const recordBytes = CHANNELS * FS * 2;
  const records = Math.max(10, Math.floor((TARGET_MB * 1e6) / (recordBytes + 64)));
  const n = records * FS;
  // Four source traces, shared by the channels in turn (the reader and the page do the same work either way).
  let seed = 20260;
  const next = () => {
    seed = (seed * 16807) % 2147483647;
    return seed / 2147483647;
  };
  const bases = Array.from({ length: 4 }, (_, b) => {
    const x = new Float32Array(n);
    let brown = 0;
    for (let i = 0; i < n; i++) {
      brown = 0.995 * brown + (next() - 0.5) * 6;
      x[i] = brown + 8 * Math.sin((2 * Math.PI * (10 + b) * i) / FS) + (next() - 0.5) * 4;
    }
    return x;
  });
  const signals: EdfWriteSignal[] = Array.from({ length: CHANNELS }, (_, c) => ({
    label: `EEG ${c < TEN_TWENTY.length ? TEN_TWENTY[c] : `E${c + 1}`}`,
    physicalDimension: 'uV',
    physicalMin: -800,
    physicalMax: 800,
    samplesPerRecord: FS,
    samples: bases[c % bases.length],
  }));
  const annotations: EdfWriteAnnotation[] = [];
  for (let t = 2; t < records - 2; t += 3) annotations.push({ onsetSeconds: t, durationSeconds: 0, texts: [annotations.length % 2 === 0 ? 'lamp-watch' : 'oar-pull'] });
  const bytes = writeEdf({
    patientIdentification: 'X X X DEMO-ONLY-NOT-A-PERSON',
    start: { year: 2026, month: 3, day: 14, hour: 9, minute: 0, second: 0 },
    recordDurationSeconds: 1,
    signals,
    annotations,
  });
  const file = path.join(folder, 'harbour-lights-large.edf');
  writeFileSync(file, bytes);
  return { file, bytes: bytes.length, samplesPerChannel: n, events: annotations.length, core: await coreCpu(bytes) };
}

/**
 * CPU time of the page's three steps on this file, run here in Node with the same code (the figure to compare across
 * loads and machines): decoding (the intake worker), the SHA-256 (the hashing worker), the epoch decisions (main thread).
 */
async function coreCpu(bytes: Uint8Array): Promise<string> {
  const cpu = async <T>(work: () => T | Promise<T>): Promise<{ value: T; seconds: number }> => {
    const start = process.cpuUsage();
    const value = await work();
    const used = process.cpuUsage(start);
    return { value, seconds: (used.user + used.system) / 1e6 };
  };
  const decoded = await cpu(() => openEdf(bytesSource(bytes)));
  const hashed = await cpu(() => new Sha256().update(bytes).hex());
  const recording = toRecording(decoded.value);
  const decided = await cpu(() =>
    decideEpochs({ recording, conditions: conditionsPerLabel(recording.events), epochWindow: { start: -1, end: 2 }, rejection: defaultRejection, conditioning: defaultConditioning }),
  );
  return `decode ${decoded.seconds.toFixed(2)} s, SHA-256 ${hashed.seconds.toFixed(2)} s, epoch decisions ${decided.seconds.toFixed(2)} s (${decided.value.decisions.length} epochs)`;
}

/** Resident set and its peak (kB) of a process, from /proc. */
function memoryOf(pid: number): { rssKb: number; peakKb: number } | null {
  try {
    const status = readFileSync(`/proc/${pid}/status`, 'utf8');
    const field = (name: string) => Number(new RegExp(`^${name}:\\s+(\\d+) kB`, 'm').exec(status)?.[1] ?? NaN);
    return { rssKb: field('VmRSS'), peakKb: field('VmHWM') };
  } catch {
    return null;
  }
}

interface CpuProfile {
  nodes: { id: number; callFrame: { functionName: string; url: string; lineNumber: number; columnNumber: number } }[];
  samples: number[];
  timeDeltas: number[];
}

/** The profile's functions by own (self) time, summed over their nodes: "1234 ms name file:line:col". */
function topSelfTime(profile: CpuProfile, count: number): string[] {
  const byNode = new Map(profile.nodes.map((n) => [n.id, n.callFrame]));
  const self = new Map<string, number>();
  profile.samples.forEach((id, i) => {
    const f = byNode.get(id)!;
    const key = `${f.functionName || '(anonymous)'} ${f.url.replace(/^.*\//, '')}:${f.lineNumber + 1}:${f.columnNumber + 1}`;
    self.set(key, (self.get(key) ?? 0) + (profile.timeDeltas[i] ?? 0) / 1000);
  });
  return [...self.entries()].sort((a, b) => b[1] - a[1]).slice(0, count).map(([k, ms]) => `${ms.toFixed(0).padStart(6)} ms ${k}`);
}

const mb = (kb: number) => `${(kb / 1024).toFixed(0)} MB`;

await runMain(async () => {
  const folder = mkdtempSync(path.join(tmpdir(), 'tidemark-bench-large-'));
  onSignals(async () => {
    rmSync(folder, { recursive: true, force: true });
    await stopAll();
    process.exit(130);
  });
  try {
    ensureNodeModules();
    const chromiumPath = requireChromium();
    await assertPortFree(APP_PORT, 'the bench app');
    await assertPortFree(SMTP_PORT, 'the bench mail fake');
    let t = performance.now();
    const rec = await writeRecording(folder);
    log(`wrote ${(rec.bytes / 1e6).toFixed(0)} MB EDF+ (${CHANNELS} channels × ${rec.samplesPerChannel} samples at ${FS} Hz, ${rec.events} events) in ${((performance.now() - t) / 1000).toFixed(1)} s`);

    const cluster = await startCluster({ name: `pg-test-${SLOT}`, port: PG_PORT, fastAndLoose: true });
    const db = `tidemark_test_${SLOT}`;
    cluster.ensureDatabase(db, { fresh: true });
    const databaseUrl = cluster.url(db);
    migrate(databaseUrl);
    seed(databaseUrl);
    buildIfStale();
    const appUrl = `http://127.0.0.1:${APP_PORT}`;
    const env = { DATABASE_URL: databaseUrl, SMTP_HOST: '127.0.0.1', SMTP_PORT: String(SMTP_PORT), TIDEMARK_MAIL_FAKE: '1', HOST: '127.0.0.1', PORT: String(APP_PORT), TIDEMARK_ORIGIN: appUrl };
    await startChild('mail fake', process.execPath, [path.join(root, 'scripts', 'mail-fake.mjs')], { env, readyLine: 'mail fake listening' });
    // The same server wrapper as npm start and npm test (static files, body caps, the mail sender).
    await startChild('app', process.execPath, [path.join(root, 'server', 'main.mjs')], { env: { ...env, TIDEMARK_OUT_DIR: outDir() }, readyLine: 'Server listening' });

    const { chromium } = await import('playwright-core');
    const browser = await chromium.launch({ executablePath: chromiumPath, headless: true, args: ['--headless', '--no-sandbox', '--disable-gpu', '--no-first-run', '--disable-background-networking', '--disable-component-update', '--disable-sync'] });
    try {
      const page = await (await browser.newContext({ viewport: { width: 1500, height: 1000 }, deviceScaleFactor: 1 })).newPage();
      await page.goto(`${appUrl}/sign-in`);
      await page.getByLabel('E-mail').fill('analyst1@saltmarsh.example');
      await page.getByLabel('Password').fill('demo-analyst-pass');
      await page.getByRole('button', { name: 'Sign in' }).click();
      await page.waitForURL(/\/teams\//);
      await page.getByRole('link', { name: 'Harbour-bell anticipation' }).first().click();
      await page.waitForURL(/\/studies\//);
      await page.goto(`${page.url().replace(/\/$/, '')}/workspace`);
      await page.getByLabel('Choose a recording file…').waitFor({ state: 'attached' });

      // The renderer that holds this page (and its workers): the one whose resident set grows while the file opens.
      const cdp = await browser.newBrowserCDPSession();
      const info = (await cdp.send('SystemInfo.getProcessInfo')) as { processInfo: { type: string; id: number }[] };
      const renderers = info.processInfo.filter((p) => p.type === 'renderer').map((p) => p.id);
      const before = new Map(renderers.map((pid) => [pid, memoryOf(pid)]));

      // Times are taken in the page, from the input's change event to each part appearing. (A string, not a
      // function: tsx would add its name helpers to a function, and they do not exist in the page.)
      await page.evaluate(`(() => {
        const marks = {};
        window.__benchLarge = marks;
        document.addEventListener('change', () => { if (marks.chosen === undefined) marks.chosen = performance.now(); }, { capture: true });
        const seen = () => {
          if (marks.header === undefined && document.querySelector('[data-testid="recording-details"]')) marks.header = performance.now();
          if (marks.events === undefined && document.querySelector('[data-testid="condition"]')) marks.events = performance.now();
          if (marks.fingerprint === undefined && document.querySelector('[data-testid="fingerprint"]')) marks.fingerprint = performance.now();
          if (marks.overview === undefined && document.querySelector('canvas[aria-label^="Overview of"]')) {
            // The trace is drawn in the next animation frame after the canvas is there.
            marks.overview = -1;
            requestAnimationFrame(() => requestAnimationFrame(() => { marks.overview = performance.now(); }));
          }
        };
        new MutationObserver(seen).observe(document.body, { childList: true, subtree: true, attributes: true });
        // Where the time goes: the progress line's phases as they change, and the main thread's long tasks.
        marks.phases = [];
        let last = '';
        new MutationObserver(() => {
          const text = document.querySelector('[data-testid="intake-progress"]')?.textContent ?? '(no progress line)';
          const phase = text.replace(/[0-9]+ ?%.*$/, '').trim();
          if (phase !== last) { last = phase; marks.phases.push([phase, performance.now()]); }
        }).observe(document.body, { childList: true, subtree: true, characterData: true });
        marks.longTasks = 0;
        marks.longTaskCount = 0;
        new PerformanceObserver((list) => {
          for (const e of list.getEntries()) { if (marks.chosen !== undefined) { marks.longTasks += e.duration; marks.longTaskCount++; } }
        }).observe({ type: 'longtask' });
      })()`);
      // TIDEMARK_BENCH_PROFILE=<file.cpuprofile>: the page's main thread profiled from choosing the file to the
      // overview (open it in Chromium's DevTools, Performance panel); the functions with the most own time are listed.
      const profilePath = process.env.TIDEMARK_BENCH_PROFILE;
      const profiler = profilePath ? await page.context().newCDPSession(page) : null;
      if (profiler) {
        await profiler.send('Profiler.enable');
        await profiler.send('Profiler.setSamplingInterval', { interval: 500 });
        await profiler.send('Profiler.start');
      }
      t = performance.now();
      await page.getByLabel('Choose a recording file…').setInputFiles(rec.file);
      const marks = await (async () => {
        for (;;) {
          const m = (await page.evaluate('window.__benchLarge')) as Record<string, number> & { phases: [string, number][] };
          if (m.header !== undefined && m.events !== undefined && m.overview !== undefined && m.overview > 0) return m;
          const problem = await page.getByTestId('intake-problem').count();
          if (problem > 0) throw new Error(`the app refused the file: ${await page.getByTestId('intake-problem').textContent()}`);
          if (performance.now() - t > 600_000) throw new Error('the recording did not open within 10 minutes');
          await new Promise((r) => setTimeout(r, 50));
        }
      })();
      if (profiler) {
        const { profile } = (await profiler.send('Profiler.stop')) as { profile: CpuProfile };
        writeFileSync(profilePath!, JSON.stringify(profile));
        console.log(`main-thread profile written to ${profilePath}; most own time:`);
        for (const line of topSelfTime(profile, 12)) console.log(`  ${line}`);
      }
      // The fingerprint follows the overview (hashed in its own worker); the library keeps the file once it is known.
      const fingerprintAt = await (async () => {
        for (;;) {
          const m = (await page.evaluate('window.__benchLarge')) as { fingerprint?: number };
          if (m.fingerprint !== undefined) return m.fingerprint;
          if (performance.now() - t > 600_000) throw new Error('the fingerprint did not arrive within 10 minutes');
          await new Promise((r) => setTimeout(r, 100));
        }
      })();
      // Let the library finish keeping the file, so its cost shows in the peak too.
      await page.waitForTimeout(2000);
      const opened = renderers.map((pid) => ({ pid, now: memoryOf(pid) }));
      // A rejection rule switched off and on again: the epoch decisions are made again on the main thread, from the
      // epochs' remembered statistics (src/lib/analysis/rejection.ts), so no sample is read.
      const ruleChange: number[] = [];
      for (let i = 0; i < 2; i++) {
        await page.evaluate('window.__benchLarge.longTasks = 0; window.__benchLarge.longTaskCount = 0; window.__benchLarge.ruleAt = performance.now()');
        await page.getByLabel('Peak-to-peak rule', { exact: true }).click();
        await page.waitForTimeout(1500);
        const m = (await page.evaluate('window.__benchLarge')) as { longTasks: number };
        ruleChange.push(m.longTasks);
      }
      // Then the Recipe screen checks the draft recipe: the plan worker takes the recording (shared memory on this
      // cross-origin-isolated page, so no second copy) and conditions and epochs all of it.
      await page.getByRole('tab', { name: 'Recipe' }).click();
      const planStarted = performance.now();
      await page.waitForTimeout(8000);
      const planned = renderers.map((pid) => ({ pid, now: memoryOf(pid) }));
      const after = renderers.map((pid) => ({ pid, before: before.get(pid), now: memoryOf(pid) })).filter((r) => r.now !== null && r.before !== null && r.before !== undefined);
      const page0 = after.sort((a, b) => (b.now!.peakKb - b.before!.rssKb) - (a.now!.peakKb - a.before!.rssKb))[0];
      const since = (x: number) => `${((x - marks.chosen) / 1000).toFixed(2)} s`;
      const floatMb = (CHANNELS * rec.samplesPerChannel * 4) / 1e6;
      console.log(`large recording: ${(rec.bytes / 1e6).toFixed(0)} MB EDF+, ${CHANNELS} channels, ${rec.events} events; Chromium ${browser.version()}`);
      console.log(`CPU time of the same steps in Node (one thread each): ${rec.core}`);
      console.log(`time from choosing the file: header ${since(marks.header)}, events ${since(marks.events)}, overview ${since(marks.overview)} (target ≤ 5 s: ${Math.max(marks.header, marks.events, marks.overview) - marks.chosen <= 5000 ? 'met' : 'MISSED'})`);
      console.log(`  fingerprint (SHA-256) shown at ${since(fingerprintAt)}`);
      console.log(`  progress line: ${marks.phases.map(([p, at]) => `${since(at)} ${p}`).join(' → ')}`);
      console.log(`  main thread: ${marks.longTaskCount} long tasks (> 50 ms) totalling ${(marks.longTasks / 1000).toFixed(2)} s while the file opened`);
      console.log(`  a rejection rule switched off, then on: main-thread long tasks (> 50 ms) ${ruleChange.map((x) => `${x.toFixed(0)} ms`).join(', ')}`);
      if (page0) {
        // The open's own figures, from the reading taken before the Recipe screen (VmHWM is the peak until then).
        const open = opened.find((r) => r.pid === page0.pid)?.now ?? page0.now!;
        const grew = open.peakKb - page0.before!.rssKb;
        console.log(
          `page renderer memory: ${mb(page0.before!.rssKb)} before, peak ${mb(open.peakKb)} (+${mb(grew)}), now ${mb(open.rssKb)}; file ${(rec.bytes / 1e6).toFixed(0)} MB, decoded Float32 samples ${floatMb.toFixed(0)} MB`,
        );
        console.log(`  peak growth / decoded samples = ${((grew * 1024) / (floatMb * 1e6)).toFixed(2)} (1.00 would be the samples alone; +${((rec.bytes / (floatMb * 1e6)) ).toFixed(2)} more would mean the file held whole besides them)`);
        const o = opened.find((r) => r.pid === page0.pid)?.now;
        const p = planned.find((r) => r.pid === page0.pid)?.now;
        if (o && p) {
          const planGrew = p.peakKb - page0.before!.rssKb;
          console.log(
            `after the Recipe screen planned on it (${((performance.now() - planStarted) / 1000).toFixed(0)} s): peak ${mb(p.peakKb)}, now ${mb(p.rssKb)} (${mb(o.rssKb)} once open); ` +
              `peak growth / decoded samples = ${((planGrew * 1024) / (floatMb * 1e6)).toFixed(2)} (a plan worker holding its own copy would add 1.00)`,
          );
        }
      }
    } finally {
      await browser.close();
    }
  } finally {
    rmSync(folder, { recursive: true, force: true });
    await stopAll();
  }
});
