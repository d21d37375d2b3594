// The Slope check's client side: runs the bench and the sensitivity check in a worker of their own (ended afterwards,
// or at once on cancel), turns their figures into a report and saves it with the study. Screens call these and paint.
import * as Comlink from 'comlink';
import Papa from 'papaparse';
import type { PoolWorker } from '../../../workers/pool-worker';
import type { SlopeCheckWorkerApi } from '../../../workers/slope-check.worker';
import type { SlopeSweepCell, SlopeSweepInput } from '../analysis/slope-check/sweep';
import type { ModelComparison } from '../analysis/slope-check/sensitivity';
import type { AperiodicModel } from '../analysis/aperiodic';
import type { Recording } from '../analysis/recording';
import type { SlopeReportInputT, SlopeReportListItem } from '../schemas/slope-reports';
import { errorMessageOf, send } from './outbound';

/** A Slope check run stopped by its caller (the worker was ended). */
export class SlopeCheckCancelledError extends Error {
  constructor() {
    super('the slope check was cancelled');
    this.name = 'SlopeCheckCancelledError';
  }
}

/** The Slope check worker failed: bad settings (`field` names which), or the worker itself. */
export class SlopeCheckError extends Error {
  constructor(
    message: string,
    readonly field: string | null = null,
  ) {
    super(message);
    this.name = 'SlopeCheckError';
  }
}

function browserWorker(): PoolWorker {
  const worker = new Worker(new URL('../../../workers/slope-check.worker.ts', import.meta.url), { type: 'module' });
  return {
    endpoint: worker,
    terminate: () => worker.terminate(),
    onFailure: (listener) => {
      worker.addEventListener('error', (event) => {
        event.preventDefault();
        listener(event instanceof ErrorEvent && event.message ? event.message : 'its script did not load');
      });
      worker.addEventListener('messageerror', () => listener('a message from it could not be read'));
    },
  };
}

export interface SlopeRunOptions {
  onProgress?: (fraction: number) => void;
  /** Aborting ends the worker at once; the run rejects with SlopeCheckCancelledError. */
  signal?: AbortSignal;
  /** Injected for tests; default a module Web Worker. */
  createWorker?: () => PoolWorker;
}

// One worker per run: the core runs in one synchronous stretch, so ending the worker is the one prompt cancel.
async function inWorker<T>(options: SlopeRunOptions, call: (remote: Comlink.Remote<SlopeCheckWorkerApi>) => Promise<T>): Promise<T> {
  if (options.signal?.aborted) throw new SlopeCheckCancelledError();
  const worker = (options.createWorker ?? browserWorker)();
  const remote = Comlink.wrap<SlopeCheckWorkerApi>(worker.endpoint);
  let stop: (error: Error) => void = () => undefined;
  const stopped = new Promise<never>((_, reject) => (stop = reject));
  stopped.catch(() => undefined);
  worker.onFailure?.((problem) => stop(new SlopeCheckError(`the slope check worker failed: ${problem}`)));
  const onAbort = () => stop(new SlopeCheckCancelledError());
  options.signal?.addEventListener('abort', onAbort);
  try {
    return await Promise.race([call(remote), stopped]);
  } catch (error) {
    if (error instanceof SlopeCheckCancelledError || error instanceof SlopeCheckError) throw error;
    // comlink rebuilds a thrown Error from its name and message only; AnalysisInputError's message starts with its field.
    const message = error instanceof Error ? error.message : String(error);
    const field = error instanceof Error && error.name === 'AnalysisInputError' ? message.split(' ')[0] : null;
    throw new SlopeCheckError(message, field);
  } finally {
    options.signal?.removeEventListener('abort', onAbort);
    remote[Comlink.releaseProxy]();
    worker.terminate();
  }
}

/** The bench over `input`'s true exponents and settings (src/lib/analysis/slope-check/sweep.ts), in a worker. */
export function runSlopeBenchInWorker(input: SlopeSweepInput, options: SlopeRunOptions = {}): Promise<SlopeSweepCell[]> {
  return inWorker(options, async (remote) => {
    let settled = false;
    const onProgress = options.onProgress;
    const progress = onProgress === undefined ? undefined : Comlink.proxy((f: number) => void (settled || onProgress(f)));
    const cells = await remote.bench(input, progress);
    settled = true;
    onProgress?.(1);
    return cells;
  });
}

export interface SensitivityRequest {
  channel: string;
  /** The recipe's Welch segment and overlap, in seconds and as a fraction. */
  segmentSeconds: number;
  overlap: number;
  rangeHz: [number, number];
  model: AperiodicModel;
  startsHz: number[];
  endsHz: number[];
  bootstrap: { repetitions: number; level: number; seed: number };
}

export interface SensitivityResult {
  request: SensitivityRequest;
  grid: Float64Array;
  interval: { estimate: number; lower: number; upper: number; level: number; segments: number };
  comparison: ModelComparison;
}

/**
 * The sensitivity of one channel's exponent on the open recording: its Welch spectrum over the whole recording
 * (every continuous stretch between gaps), the exponent over fit-range starts × ends, a bootstrap interval over its
 * segments and power law against knee by BIC. The samples are copied to the worker; they never leave the browser.
 */
export function checkSensitivityInWorker(recording: Recording, request: SensitivityRequest, options: SlopeRunOptions = {}): Promise<SensitivityResult> {
  const c = recording.channelNames.indexOf(request.channel);
  if (c < 0) return Promise.reject(new SlopeCheckError(`channel "${request.channel}" is not in the open recording`, 'channel'));
  const fs = recording.sampleRateHz;
  const n = Math.round(request.segmentSeconds * fs);
  const samples = recording.data[c].slice();
  const cuts = [0, ...(recording.gapSampleIndices ?? []).filter((i) => i > 0 && i < samples.length), samples.length];
  const spans = new Int32Array((cuts.length - 1) * 2);
  for (let i = 0; i + 1 < cuts.length; i++) spans.set([cuts[i], cuts[i + 1]], 2 * i);
  return inWorker(options, async (remote) => {
    const out = await remote.sensitivity(Comlink.transfer(samples, [samples.buffer as ArrayBuffer]), fs, n, Math.round(request.overlap * n), spans, request.rangeHz, request.model, request.startsHz, request.endsHz, request.bootstrap);
    return { request, ...out };
  });
}

const orNull = (v: number): number | null => (Number.isFinite(v) ? v : null);

/** The report the server keeps: settings and figures only (no per-repetition estimate, no spectrum, no sample). */
export function slopeReportOf(title: string, input: SlopeSweepInput, cells: SlopeSweepCell[], sensitivity: SensitivityResult | null): SlopeReportInputT {
  const t = input.truth;
  return {
    title,
    truth: {
      offset: t.offset,
      exponents: input.exponents,
      knee: t.knee && t.knee > 0 ? t.knee : null,
      peaks: t.peaks ?? [],
      durationSeconds: t.durationSeconds,
      sampleRateHz: t.sampleRateHz,
      noiseMicrovolts: t.noiseMicrovolts ?? 0,
      repetitions: input.repetitions,
      seed: t.seed,
    },
    settings: input.settings.map((s) => ({ name: s.name, rangeHz: s.range, model: s.model, robust: s.robust, segmentSeconds: s.segmentSeconds, overlap: s.overlap })),
    coverageLevel: input.coverage?.level ?? null,
    results: cells.map((c) => ({
      setting: c.setting,
      trueExponent: c.trueExponent,
      meanEstimate: orNull(c.meanEstimate),
      bias: orNull(c.bias),
      spread: orNull(c.spread),
      rmse: orNull(c.rmse),
      failed: c.failed,
      coverage: c.coverage === null || !Number.isFinite(c.coverage) ? null : c.coverage,
    })),
    sensitivity:
      sensitivity === null
        ? null
        : {
            channel: sensitivity.request.channel,
            rangeHz: sensitivity.request.rangeHz,
            model: sensitivity.request.model,
            startsHz: sensitivity.request.startsHz,
            endsHz: sensitivity.request.endsHz,
            grid: Array.from(sensitivity.grid, orNull),
            interval: sensitivity.interval,
            comparison: { preferred: sensitivity.comparison.preferred, deltaBic: sensitivity.comparison.deltaBic, reason: sensitivity.comparison.reason.slice(0, 400) },
          },
  };
}

/** Saves a report with the study (analysts and leads); the server answers with the stored row. */
export async function saveSlopeReport(studyId: string, report: SlopeReportInputT): Promise<SlopeReportListItem> {
  const response = await send(`/api/studies/${studyId}/slope-reports`, { method: 'POST', json: report });
  if (!response.ok) throw new SlopeCheckError(await errorMessageOf(response));
  return ((await response.json()) as { report: SlopeReportListItem }).report;
}

/** One row per setting × true exponent (RFC 4180 CSV, papaparse), with the settings and the truth repeated on each row. */
export function slopeReportCsv(report: SlopeReportInputT): string {
  const fields = ['title', 'setting', 'true_exponent', 'mean_estimate', 'bias', 'spread', 'rmse', 'failed', 'coverage', 'coverage_level', 'fit_low_hz', 'fit_high_hz', 'model', 'robust', 'segment_s', 'overlap', 'offset', 'knee', 'peaks', 'duration_s', 'sample_rate_hz', 'noise_uv', 'repetitions', 'seed'];
  const t = report.truth;
  const rows = report.results.map((r) => {
    const s = report.settings.find((x) => x.name === r.setting)!;
    return [report.title, r.setting, r.trueExponent, r.meanEstimate, r.bias, r.spread, r.rmse, r.failed, r.coverage, report.coverageLevel, s.rangeHz[0], s.rangeHz[1], s.model, s.robust, s.segmentSeconds, s.overlap, t.offset, t.knee, t.peaks.map((p) => `${p.centreHz}/${p.widthHz}/${p.heightLog10}`).join(' '), t.durationSeconds, t.sampleRateHz, t.noiseMicrovolts, t.repetitions, t.seed];
  });
  return Papa.unparse({ fields, data: rows }) + '\r\n';
}
