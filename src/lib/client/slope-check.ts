// The Slope check's client side: runs the bench, the sensitivity and the broadband-shift checks in a worker of their
// own (ended afterwards, or at once on cancel). Screens call these and paint; reports are in slope-report.ts.
import * as Comlink from 'comlink';
import type { PoolWorker } from '../../../workers/pool-worker';
import type { SlopeCheckWorkerApi } from '../../../workers/slope-check.worker';
import type { SlopeSweepCell, SlopeSweepInput } from '../analysis/slope-check/sweep';
import type { ModelComparison } from '../analysis/slope-check/sensitivity';
import type { BandShare } from '../analysis/slope-check/shift';
import type { AperiodicFit, AperiodicModel } from '../analysis/aperiodic';
import { baselinePointsIn, type BaselineMethod } from '../analysis/baseline';
import type { Recording } from '../analysis/recording';
import { conditionedSamples, type Decomposition } from './workspace/results';
import { webPoolWorker } from './web-worker';

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
  return webPoolWorker(new Worker(new URL('../../../workers/slope-check.worker.ts', import.meta.url), { type: 'module' }));
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
export async function runSlopeBenchInWorker(input: SlopeSweepInput, options: SlopeRunOptions = {}): Promise<SlopeSweepCell[]> {
  // Progress arrives on the proxy's own port and may still be queued when the run ends (answer, failure or cancel):
  // once settled, late reports are dropped, so a caller never sees progress after the promise settles.
  let settled = false;
  const onProgress = options.onProgress;
  const progress = onProgress === undefined ? undefined : Comlink.proxy((f: number) => void (settled || onProgress(f)));
  try {
    const cells = await inWorker(options, (remote) => remote.bench(input, progress));
    settled = true;
    onProgress?.(1);
    return cells;
  } finally {
    settled = true;
  }
}

export interface SensitivityRequest {
  channel: string;
  /** The open recording's SHA-256 (kept with a report so the team knows which recording it describes). */
  fingerprint: string | null;
  rangeHz: [number, number];
  model: AperiodicModel;
  startsHz: number[];
  endsHz: number[];
  bootstrap: { repetitions: number; level: number; seed: number };
}

export interface SensitivityResult {
  request: SensitivityRequest;
  /** Exponent per start × end, `[i·ends + j]`, NaN where the range held no fit. */
  grid: Float64Array;
  interval: { estimate: number; lower: number; upper: number; level: number; segments: number };
  comparison: ModelComparison;
  /** Welch segment and overlap of the recipe (samples), for the words beside the interval. */
  segmentSamples: number;
  overlapSamples: number;
}

/**
 * A copy of one channel as decomposition `d` saw it (types, bad channels, reference, filters): the workspace
 * controller's conditioned samples from the run's plan, never conditioned again here.
 */
async function conditionedChannel(d: Decomposition, recording: Recording, channel: string): Promise<Float32Array> {
  const c = d.channels.indexOf(channel);
  if (c < 0) throw new SlopeCheckError(`channel "${channel}" is not among the decomposition's channels`, 'channel');
  return (await conditionedSamples(d, recording))[c].slice();
}

/**
 * The sensitivity of one channel's exponent: the recipe's spectrum of that channel (Welch over the recipe's spans,
 * segment and overlap, as the Spectrum screen fits it), its exponent over fit-range starts × ends, a bootstrap
 * interval over its segments and power law against knee by BIC. The samples go to the worker, never further.
 */
export async function checkSensitivityInWorker(d: Decomposition, recording: Recording, request: SensitivityRequest, options: SlopeRunOptions = {}): Promise<SensitivityResult> {
  const samples = await conditionedChannel(d, recording, request.channel);
  return inWorker(options, async (remote) => {
    const out = await remote.sensitivity(
      Comlink.transfer(samples, [samples.buffer as ArrayBuffer]),
      d.sampleRateHz,
      d.spectrumSegmentSamples,
      d.spectrumOverlapSamples,
      d.spectrumSpans.slice(),
      request.rangeHz,
      request.model,
      request.startsHz,
      request.endsHz,
      request.bootstrap,
    );
    return { request, ...out, segmentSamples: d.spectrumSegmentSamples, overlapSamples: d.spectrumOverlapSamples };
  });
}

export interface ShiftRequest {
  channel: string;
  condition: string;
  baseline: { start: number; end: number };
  post: { start: number; end: number };
  method: BaselineMethod;
  rangeHz: [number, number];
  model: AperiodicModel;
  bands: { name: string; lowHz: number; highHz: number }[];
}

export interface ShiftResult {
  request: ShiftRequest;
  baselineFit: AperiodicFit;
  postFit: AperiodicFit;
  /** Per frequency of the map, what the aperiodic change alone gives after normalization. */
  predicted: Float64Array;
  /** The measured normalized map `[f·T + t]` (average scope, the same baseline and method). */
  measured: Float64Array;
  shares: BandShare[];
  /** Time indices of both windows on the map's grid. */
  baselinePoints: { first: number; last: number };
  postPoints: { first: number; last: number };
}

/**
 * The broadband-shift check (Gyurkovics et al., 2021, NeuroImage 237:118192; Donoghue et al., 2020, Nat Neurosci
 * 23:1655) for one channel and condition of decomposition `d`, in a worker.
 */
export async function checkBroadbandShiftInWorker(d: Decomposition, recording: Recording, request: ShiftRequest, options: SlopeRunOptions = {}): Promise<ShiftResult> {
  const k = d.labels.indexOf(request.condition);
  if (k < 0) throw new SlopeCheckError(`condition "${request.condition}" is not in the decomposition`, 'condition');
  const nTimes = d.times.length;
  const baselinePoints = baselinePointsIn(request.baseline.start, request.baseline.end, d.epochStart, d.sampleRateHz, nTimes);
  const postPoints = baselinePointsIn(request.post.start, request.post.end, d.epochStart, d.sampleRateHz, nTimes);
  if (request.post.end <= request.post.start) throw new SlopeCheckError(`the post-event window must end after it starts (${request.post.start}–${request.post.end} s)`, 'post');
  const samples = await conditionedChannel(d, recording, request.channel);
  const power = d.power[d.channels.indexOf(request.channel)][k].slice();
  const neutral = request.method === 'power-ratio' ? 1 : 0;
  return inWorker(options, async (remote) => {
    const out = await remote.shift(
      Comlink.transfer(samples, [samples.buffer as ArrayBuffer]),
      d.sampleRateHz,
      d.epochStarts[k].slice(),
      baselinePoints,
      postPoints,
      request.rangeHz,
      request.model,
      d.frequencies.slice(),
      Comlink.transfer(power, [power.buffer as ArrayBuffer]),
      nTimes,
      request.method,
      neutral,
      request.bands.map((b) => ({ name: b.name, low: b.lowHz, high: b.highHz })),
    );
    return { request, ...out, baselinePoints, postPoints };
  });
}
