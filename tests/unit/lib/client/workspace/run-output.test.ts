// What a browser run leaves in the workspace, checked against the command line and against Parseval's theorem.
// The pool runs on in-process workers (the real worker API over MessageChannel, counted), the controller builds
// the decomposition from their typed arrays, and the CLI (src/cli/analyze.ts, in this process) writes its Result
// JSON from the same EDF+ bytes: every number must be the same double. The Spectrum screen's spectra must be the
// run's own, with no second pass: no further pool job and exactly one refit per fit range.
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, afterEach, beforeAll, beforeEach, describe, expect, it, vi } from 'vitest';
import { fitAperiodicEach } from '../../../../../src/lib/analysis/aperiodic';
import { conditionRecording } from '../../../../../src/lib/analysis/condition-recording';
import { epochSpectra } from '../../../../../src/lib/analysis/epoch-spectra';
import { parseRecipe, type RecipeInput } from '../../../../../src/lib/analysis/recipe';
import type { Recording } from '../../../../../src/lib/analysis/recording';
import { planRun, type AnalysisResult } from '../../../../../src/lib/analysis/run-recipe';
import { welchPsd } from '../../../../../src/lib/analysis/welch';
import { writeEdf } from '../../../../../src/lib/formats';
import { main as analyzeCli } from '../../../../../src/cli/analyze';
import { loadRecording } from '../../../../../src/cli/load-recording';
import { DecomposePool } from '../../../../../src/lib/client/decompose-pool';
import { clearResults, configureResults, runDecomposition, type Decomposition } from '../../../../../src/lib/client/workspace/results';
import { configureSpectra, spectrumWork } from '../../../../../src/lib/client/workspace/spectra';
import { countingPoolWorkers } from '../../../../helpers/fake-pool-workers';
import { coloredNoise, seededNormal } from '../../../../helpers/seeded-random';

vi.setConfig({ testTimeout: 120_000 });

// Scenario of our own: a three-channel 128 Hz "ferry bell" recording, 32 s of 1/f^1.5 background with a 10 Hz
// burst 0.1–0.6 s after each "bell" (none after "horn"), cues every 1.5 s from 2 s.
const FS = 128;
const SECONDS = 32;
const NAMES = ['C3', 'Cz', 'C4'];
const CUES = Array.from({ length: 19 }, (_, k) => ({ onsetSeconds: 2 + 1.5 * k, label: k % 2 === 0 ? 'bell' : 'horn' }));

function ferryEdf(): Uint8Array {
  const n = FS * SECONDS;
  const signals = NAMES.map((name, c) => {
    const background = coloredNoise(n, FS, 1.5, 90 + c);
    let rms = 0;
    for (const v of background) rms += v * v;
    rms = Math.sqrt(rms / n);
    const x = Float64Array.from(background, (v) => (8 * v) / rms);
    for (const cue of CUES) {
      if (cue.label !== 'bell') continue;
      for (let i = Math.round((cue.onsetSeconds + 0.1) * FS); i < Math.round((cue.onsetSeconds + 0.6) * FS); i++) x[i] += (6 + 2 * c) * Math.sin((2 * Math.PI * 10 * i) / FS);
    }
    return {
      label: `EEG ${name}`,
      transducer: 'synthetic test signal',
      physicalDimension: 'uV',
      physicalMin: -3276.8,
      physicalMax: 3276.7,
      prefiltering: 'none',
      samplesPerRecord: FS,
      samples: x,
    };
  });
  return writeEdf({
    variant: 'EDF+C',
    patientIdentification: 'X X X X',
    recordingIdentification: 'Startdate 04-MAR-2024 X X X',
    start: { year: 2024, month: 3, day: 4, hour: 9, minute: 0, second: 0 },
    recordDurationSeconds: 1,
    signals,
    annotations: CUES.map((e) => ({ onsetSeconds: e.onsetSeconds, durationSeconds: 0, texts: [e.label] })),
  });
}

// Phase consistency, induced power, spectrum from the kept epochs (one fit per condition too) and a fit range
// reaching past the spectrum's range (the refit must see every bin the run fitted).
const EPOCH_RECIPE = {
  format: 2,
  epochs: { events: ['bell', 'horn'], start: -0.5, end: 1.0 },
  frequencies: { min: 4, max: 30, count: 6, spacing: 'log' },
  cycles: { min: 3, max: 6 },
  baseline: { start: -0.4, end: -0.1, method: 'decibel', scope: 'average' },
  spectrum: { segment: 0.5, overlap: 0.5, range: [1, 40], source: 'epochs' },
  aperiodic: { range: [2, 60], model: 'power-law' },
  itpc: true,
  trialPower: 'induced',
};
// The whole recording's spectrum, a knee fit, trial scope, linear frequencies and two channels in another order.
const RECORDING_RECIPE = {
  format: 2,
  epochs: { events: ['bell', 'horn'], start: -0.5, end: 1.0 },
  channels: ['Cz', 'C3'],
  frequencies: { min: 5, max: 25, count: 5, spacing: 'linear' },
  cycles: { fixed: 4 },
  baseline: { start: -0.4, end: -0.1, method: 'percent-change', scope: 'trial' },
  spectrum: { segment: 2, overlap: 0.5, range: [1, 50], source: 'recording' },
  aperiodic: { range: [2, 40], model: 'power-law-knee' },
};

let dir: string;
let edfPath: string;
let recording: Recording;
let fileWarnings: string[];

beforeAll(async () => {
  dir = mkdtempSync(join(tmpdir(), 'tidemark-run-output-'));
  edfPath = join(dir, 'ferry-bell.edf');
  writeFileSync(edfPath, ferryEdf());
  // The command line's own reader, so both sides start from the same samples.
  const loaded = await loadRecording(edfPath, {});
  recording = loaded.recording;
  fileWarnings = loaded.warnings;
});
afterAll(() => rmSync(dir, { recursive: true, force: true }));

/** The CLI's Result for `recipe` on the EDF+ file: `analyze <file> --recipe r.json --out result.json`. */
async function cliResult(recipe: object, name: string): Promise<AnalysisResult> {
  const recipePath = join(dir, `${name}.recipe.json`);
  const outPath = join(dir, `${name}.result.json`);
  writeFileSync(recipePath, JSON.stringify(recipe));
  expect(await analyzeCli([edfPath, '--recipe', recipePath, '--out', outPath])).toBe(0);
  return JSON.parse(readFileSync(outPath, 'utf8')) as AnalysisResult;
}

/** The first index where a typed array and a JSON row-major `[f][t]` (or flat) array differ as doubles, else null. */
function firstDifference(actual: ArrayLike<number>, expected: (number | null)[] | (number | null)[][]): string | null {
  const flat = (expected as unknown[]).flat() as (number | null)[];
  if (actual.length !== flat.length) return `length ${actual.length} ≠ ${flat.length}`;
  for (let i = 0; i < flat.length; i++) {
    const e = flat[i] === null ? NaN : flat[i];
    if (!Object.is(actual[i], e)) return `[${i}]: ${actual[i]} ≠ ${e}`;
  }
  return null;
}

let workers: ReturnType<typeof countingPoolWorkers>;
let refits: number;

beforeEach(() => {
  clearResults();
  workers = countingPoolWorkers();
  refits = 0;
  configureResults({ createPool: (size) => new DecomposePool({ size: size ?? 2, createWorker: workers.factory }), plan: planRun, holdTrials: async () => undefined });
  // The explorer worker's refit, in this process and counted.
  configureSpectra(() => ({
    fitEach: async (spectra, range, model) => {
      refits++;
      return fitAperiodicEach(spectra, range, model);
    },
  }));
});
afterEach(() => {
  configureResults(null);
  configureSpectra(null);
});

async function run(recipe: object): Promise<Decomposition> {
  const d = await runDecomposition(recording, 'ferry', recipe as RecipeInput, null);
  expect(d).not.toBeNull();
  return d!;
}

describe('a browser run keeps typed per-channel arrays equal to the command line’s Result', () => {
  for (const [name, recipe] of [
    ['epochs', EPOCH_RECIPE],
    ['recording', RECORDING_RECIPE],
  ] as const) {
    it(`holds the CLI's numbers to the last bit (spectrum from the ${name})`, async () => {
      const d = await run(recipe);
      const result = await cliResult(recipe, name);
      expect(d.channels).toEqual(result.channels);
      expect(d.labels).toEqual(['bell', 'horn']);
      expect(firstDifference(d.times, result.times)).toBeNull();
      expect(firstDifference(d.frequencies, result.frequencies)).toBeNull();
      expect(firstDifference(d.edgeSeconds, result.edgeSeconds)).toBeNull();
      d.labels.forEach((label, k) => {
        const condition = result.conditions[label];
        expect([d.trials[k], d.dropped[k], d.rejected[k]]).toEqual([condition.trials, condition.dropped, condition.rejected]);
        d.channels.forEach((channel, c) => {
          expect(firstDifference(d.power[c][k], condition.power[c]), `power ${label} ${channel}`).toBeNull();
          if (condition.itpc !== undefined) expect(firstDifference(d.itpc![c][k], condition.itpc[c]), `itpc ${label} ${channel}`).toBeNull();
          if (condition.evoked !== undefined) expect(firstDifference(d.evoked![c][k], condition.evoked[c]), `evoked ${label} ${channel}`).toBeNull();
        });
      });
      expect(firstDifference(d.spectrum.frequencies, result.spectrum.frequencies)).toBeNull();
      d.channels.forEach((_, c) => expect(firstDifference(d.spectrum.psd[c], result.spectrum.psd[c])).toBeNull());
      // JSON.stringify writes each double's shortest round-trip text (ECMA-262 Number::toString): equal text, equal bits.
      expect(JSON.stringify(d.aperiodic)).toBe(JSON.stringify(result.aperiodic));
      expect(JSON.stringify(d.aperiodicByCondition ?? undefined)).toBe(JSON.stringify(result.aperiodicByCondition));
      // The CLI writes the file's warnings first, then the run's.
      expect(result.warnings).toEqual([...fileWarnings, ...d.warnings]);
      // Not vacuous: both optional fields are there for the first recipe, and power varies.
      if (recipe === EPOCH_RECIPE) {
        expect(d.itpc).toHaveLength(3);
        expect(d.evoked).toHaveLength(3);
        expect(Object.keys(result.aperiodicByCondition!)).toEqual(['bell', 'horn']);
      }
      expect(new Set(d.power[0][0]).size).toBeGreaterThan(100);
    });
  }
});

describe('the Spectrum screen shows the run’s spectra, computed once', () => {
  it('per-epoch and recipe spectra are the run’s: no pool job beyond one per channel, one refit per fit range', async () => {
    const d = await run(EPOCH_RECIPE);
    expect(workers.state.jobs.map((j) => j.channel)).toEqual(NAMES);
    expect(workers.state.jobs.every((j) => j.epochSpectra)).toBe(true);

    const perEpoch = spectrumWork.epochSpectra(d)!;
    const recipeSpectra = spectrumWork.recipeSpectra(d);
    // The reference: the same core functions on the recording conditioned as the recipe asks, here in the test.
    const conditioned = conditionRecording(recording, parseRecipe(EPOCH_RECIPE)).recording;
    const starts = Int32Array.from(d.epochStarts.flatMap((s) => Array.from(s)));
    d.channels.forEach((channel, c) => {
      const samples = conditioned.data[conditioned.channelNames.indexOf(channel)];
      const epochs = epochSpectra(samples, FS, starts, d.epochSamples, d.spectrumSegmentSamples, d.spectrumOverlapSamples, [1, 40]);
      expect(perEpoch[c].trials).toBe(d.trials[0] + d.trials[1]);
      expect(firstDifference(perEpoch[c].frequencies, Array.from(epochs.frequencies))).toBeNull();
      expect(firstDifference(perEpoch[c].perTrial, Array.from(epochs.perTrial))).toBeNull();
      expect(firstDifference(perEpoch[c].mean, Array.from(epochs.mean))).toBeNull();
      const welch = welchPsd(samples, FS, d.spectrumSegmentSamples, d.spectrumOverlapSamples, d.spectrumSpans);
      expect(firstDifference(recipeSpectra[c].psd, Array.from(welch.psd))).toBeNull();
      expect(recipeSpectra[c].frequencies[recipeSpectra[c].frequencies.length - 1]).toBe(FS / 2);
      // Welch (1967): the averaged periodogram is the mean over segments. Every epoch holds the same segments, so
      // over the kept epochs the recipe spectrum is the mean of the per-epoch spectra (up to rounding).
      const k0 = recipeSpectra[c].frequencies.indexOf(perEpoch[c].frequencies[0]);
      perEpoch[c].mean.forEach((m, i) => expect(Math.abs(m - recipeSpectra[c].psd[k0 + i])).toBeLessThanOrEqual(1e-12 * m));
    });

    // The refit over the recipe's own fit range reproduces the run's fits bit for bit (bins past the spectrum's
    // range included), then comes from the cache.
    const fits = await spectrumWork.fits(d, recipeSpectra, [2, 60], 'power-law');
    expect(refits).toBe(1);
    expect(JSON.stringify(fits.map((f) => f.fit))).toBe(JSON.stringify(d.aperiodic.map(({ channel: _channel, ...fit }) => fit)));
    await spectrumWork.fits(d, recipeSpectra, [2, 60], 'power-law');
    expect(refits).toBe(1);
    const narrower = await spectrumWork.fits(d, recipeSpectra, [3, 30], 'power-law');
    expect(refits).toBe(2);
    expect(narrower[0].fit!.points).toBeLessThan(fits[0].fit!.points);
    // Nothing was sent to the pool again.
    expect(workers.state.jobs).toHaveLength(NAMES.length);
  });

  it('each epoch’s spectrum holds its power: Parseval’s theorem on a 16 Hz and a 30 Hz tone in faint noise', async () => {
    // Scenario of our own: two channels of a "sonar ping" bench test, 24 s at 128 Hz, a ping every 2 s.
    const normal = seededNormal(5);
    const tone = (amplitude: number, hz: number) => Float32Array.from({ length: 24 * FS }, (_, i) => amplitude * Math.sin((2 * Math.PI * hz * i) / FS) + 0.05 * normal());
    const sonar: Recording = {
      sampleRateHz: FS,
      channelNames: ['O1', 'O2'],
      data: [tone(20, 16), tone(8, 30)],
      events: Array.from({ length: 10 }, (_, k) => ({ onsetSeconds: 2 + 2 * k, durationSeconds: 0, label: 'ping' })),
    };
    const recipe = {
      format: 2,
      epochs: { events: ['ping'], start: -0.5, end: 1.0 },
      frequencies: { min: 4, max: 30, count: 3, spacing: 'log' },
      cycles: { fixed: 3 },
      baseline: { start: -0.4, end: -0.1, method: 'decibel', scope: 'average' },
      spectrum: { segment: 0.5, overlap: 0.5, range: [0, FS / 2], source: 'recording' },
      aperiodic: { range: [2, 60], model: 'power-law' },
    };
    const d = (await runDecomposition(sonar, 'sonar', recipe as RecipeInput, null))!;
    const perEpoch = spectrumWork.epochSpectra(d)!;
    const n = d.spectrumSegmentSamples;
    const step = n - d.spectrumOverlapSamples;
    // Periodic Hann window (Harris, 1978, Proc. IEEE 66:51–83), written out here.
    const w = Float64Array.from({ length: n }, (_, i) => 0.5 - 0.5 * Math.cos((2 * Math.PI * i) / n));
    const w2 = w.reduce((a, v) => a + v * v, 0);
    const binHz = FS / n;
    d.channels.forEach((_, c) => {
      const x = sonar.data[c];
      let k = 0;
      for (const start of d.epochStarts[0]) {
        // Parseval's theorem for the one-sided density (common practice): Σ_k PSD_k·Δf equals the mean over the
        // epoch's segments of Σ(x − x̄)²w²/Σw², computed here in the time domain.
        let timeDomain = 0;
        let segments = 0;
        for (let s = start; s + n <= start + d.epochSamples; s += step) {
          let mean = 0;
          for (let i = 0; i < n; i++) mean += x[s + i];
          mean /= n;
          let sum = 0;
          for (let i = 0; i < n; i++) sum += ((x[s + i] - mean) * w[i]) ** 2;
          timeDomain += sum / w2;
          segments++;
        }
        timeDomain /= segments;
        const bins = perEpoch[c].frequencies.length;
        expect(bins).toBe(n / 2 + 1);
        let area = 0;
        for (let i = 0; i < bins; i++) area += perEpoch[c].perTrial[k * bins + i] * binHz;
        expect(Math.abs(area - timeDomain)).toBeLessThanOrEqual(1e-9 * timeDomain);
        // …and that power is the tone's A²/2 (400/2 and 64/2 µV²) plus the faint noise.
        expect(area / ((c === 0 ? 400 : 64) / 2)).toBeCloseTo(1, 2);
        k++;
      }
      expect(k).toBe(10);
    });
  });
});
