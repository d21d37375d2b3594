import * as Comlink from 'comlink';
import { create } from 'zustand';
import { AnalysisCancelledError, AnalysisInputError } from '../../analysis/errors';
import type { AperiodicFit } from '../../analysis/aperiodic';
import type { EpochSpectra } from '../../analysis/epoch-spectra';
import type { Recording } from '../../analysis/recording';
import type { RecipeInput } from '../../analysis/recipe';
import type { ChannelAnalysis, RecipePlan } from '../../analysis/run-recipe';
import type { CoarseTrials } from '../../analysis/decompose';
import { DecomposePool } from '../decompose-pool';
import { plannedChannel, RecipePlanner, type PlannedRecipe } from '../recipe-planner';
import { explorerWorker } from '../explorer-worker';
import { edgeMask, edgeZones, type EdgeZones } from '../../plot/edge-zone';
import { decompositionKey } from './recipe';
import { useWorkspace } from './store';
import { fitBudget, sizeOfDecomposition } from './cache-budget';
import { renameFits } from './spectra';

/** One channel's Welch spectrum, µV²/Hz. */
export interface RecipeSpectrum {
  frequencies: Float64Array;
  psd: Float64Array;
}

/**
 * A finished decomposition kept in memory: trial-averaged power per channel and condition (`[f·T + t]`, µV²), so
 * re-normalizing for a new baseline or method is F × T work per map.
 */
export interface Decomposition {
  key: string;
  recipe: RecipeInput;
  recordingId: string;
  sampleRateHz: number;
  /** `epochs.start`, seconds from the event. */
  epochStart: number;
  channels: string[];
  labels: string[];
  trials: number[];
  times: Float64Array;
  frequencies: Float64Array;
  spacing: 'log' | 'linear';
  edgeSeconds: Float64Array;
  edges: EdgeZones;
  /** `[f·T + t]` 1 inside an edge zone. */
  mask: Uint8Array;
  /** power[channel][condition] */
  power: Float64Array[][];
  /** itpc[channel][condition] `[f·T + t]`, 0 … 1, with recipe `"itpc": true`; absent otherwise. */
  itpc?: Float64Array[][] | null;
  /** evoked[channel][condition], µV per time point: the evoked response taken out with `"trialPower": "induced"`. */
  evoked?: Float64Array[][] | null;
  /** The recipe's Welch spectrum per channel over the bins inside `spectrum.range` (the Result's `spectrum`). */
  spectrum: { frequencies: Float64Array; psd: Float64Array[] };
  /** Per channel, the same Welch spectrum over every bin 0 Hz … Nyquist: what the run fitted, and the Spectrum screen refits. */
  recipeSpectra: RecipeSpectrum[];
  /** Per channel, one Welch spectrum per kept epoch (all conditions) inside `spectrum.range`, made by the run's workers. */
  epochSpectra: EpochSpectra[] | null;
  aperiodic: (AperiodicFit & { channel: string })[];
  /** Per condition (label → one fit per channel) when the recipe spectrum comes from the kept epochs; else null. */
  aperiodicByCondition: Record<string, (AperiodicFit & { channel: string })[]> | null;
  warnings: string[];
  epochStarts: Int32Array[];
  epochSamples: number;
  spectrumSegmentSamples: number;
  spectrumOverlapSamples: number;
  /** Sample spans `[start, end, …]` of the recipe's spectrum (`spectrum.source`: whole recording or kept epochs). */
  spectrumSpans: Int32Array;
  /** Per condition, epochs left out by rejection rules or by hand. */
  rejected: number[];
  /** Per condition, epochs outside the recording or across a gap (the methods paragraph reports them). */
  dropped: number[];
}

export interface TrialHold {
  /** `${decomposition key}|${channel}` */
  key: string;
  status: 'loading' | 'ready' | 'failed';
  message: string | null;
}

export interface ResultsState {
  cache: Record<string, Decomposition>;
  /** Cache keys, least recently used first; the budget evicts from the front. */
  order: string[];
  activeKey: string | null;
  trialHold: TrialHold | null;
  /** A field-level problem from the last attempted run (AnalysisInputError), shown beside the field. */
  fieldError: { field: string; problem: string } | null;
  set: (patch: Partial<Pick<ResultsState, 'activeKey' | 'fieldError'>>) => void;
}

export const useResultsStore = create<ResultsState>((set) => ({
  cache: {},
  order: [],
  activeKey: null,
  trialHold: null,
  fieldError: null,
  set: (patch) => set(patch),
}));

/** The shown decomposition, or null. */
export const selectActive = (s: ResultsState): Decomposition | null => (s.activeKey === null ? null : (s.cache[s.activeKey] ?? null));

const recordingIds = new WeakMap<Float32Array, string>();
let nextRecordingId = 1;

/** A stable id of the recording's samples: its fingerprint when known, else one per loaded sample array. */
export function recordingIdOf(recording: Recording, fingerprint: string | null): string {
  if (fingerprint !== null) return fingerprint;
  const first = recording.data[0];
  let id = recordingIds.get(first);
  if (id === undefined) {
    id = `local-${nextRecordingId++}`;
    recordingIds.set(first, id);
  }
  return id;
}

/**
 * A large file's fingerprint arrived after runs were made under its samples' local id: those decompositions are
 * kept under the fingerprint from now on (id, key and the recipe's `recording.fingerprint`, as `toRecipe` writes
 * it), so the Recipe screen still finds them. Single trials held by the explorer are fetched again when asked.
 */
export function adoptFingerprint(recording: Recording, fingerprint: string): void {
  const local = recordingIds.get(recording.data[0]);
  if (local === undefined || !/^[0-9a-f]{64}$/.test(fingerprint)) return;
  useResultsStore.setState((s) => {
    const renamed = new Map<string, string>();
    const cache: Record<string, Decomposition> = {};
    for (const [key, d] of Object.entries(s.cache)) {
      if (d.recordingId !== local) {
        cache[key] = d;
        continue;
      }
      const recipe: RecipeInput = { ...d.recipe, recording: { fingerprint, ...d.recipe.recording } };
      const next = decompositionKey(fingerprint, recipe);
      renamed.set(key, next);
      cache[next] = { ...d, key: next, recordingId: fingerprint, recipe };
      sizes.set(next, sizes.get(key) ?? 0);
      sizes.delete(key);
      // Its plan follows it, so the Slope check and trial maps do not plan again.
      const planned = plannedByKey.get(key);
      if (planned !== undefined) {
        plannedByKey.delete(key);
        plannedByKey.set(next, planned);
      }
    }
    if (renamed.size === 0) return {};
    renameFits(renamed);
    // The same recording run earlier under its fingerprint (then reopened) may already be there: one entry each.
    const order = [...new Set(s.order.map((k) => renamed.get(k) ?? k))];
    return { cache, order, activeKey: s.activeKey === null ? null : (renamed.get(s.activeKey) ?? s.activeKey) };
  });
}

/** How the results layer gets its workers and how much it may keep (tests inject fake workers and small budgets). */
export interface ResultsConfig {
  /** Makes the pool that decomposes every channel (default: DecomposePool over Web Workers). */
  createPool: (size?: number) => Pick<DecomposePool, 'run' | 'cancel'>;
  /** Bytes of decompositions kept in memory; the least recently shown are dropped beyond it. */
  budgetBytes: number;
  /**
   * Plans a recipe on a recording (default: the plan worker, `RecipePlanner`; Node and tests may pass the core's
   * `planRun`); the controller calls it once per recording and recipe, and tests count the calls.
   */
  plan: (recording: Recording, recipe: RecipeInput) => PlannedRecipe | Promise<PlannedRecipe>;
  /** Hands one channel's single-trial power to the explorer worker (default: the explorer's one worker). */
  holdTrials: (key: string, trials: Float32Array[], counts: number[], frequencies: number, times: number, coarse?: CoarseTrials | null) => Promise<unknown>;
}

const defaults: ResultsConfig = {
  createPool: (size) => new DecomposePool(size === undefined ? {} : { size }),
  // 512 MiB: a 64-channel, 4-condition, 30 × 1536 map decomposition is about 100 MB.
  budgetBytes: 512 * 1024 * 1024,
  plan: (recording, recipe) => (planner ??= new RecipePlanner()).plan(recording, recipe),
  // The worker keeps these; the main thread does not, so they move rather than being copied (tens of MB).
  holdTrials: (key, trials, counts, frequencies, times, coarse = null) =>
    explorerWorker().holdTrials(key, Comlink.transfer(trials, [...trials, ...(coarse?.samples ?? [])].map((t) => t.buffer)), counts, frequencies, times, coarse),
};
let planner: RecipePlanner | null = null;
let config: ResultsConfig = defaults;
let pool: Pick<DecomposePool, 'run' | 'cancel'> | null = null;
let trialPool: Pick<DecomposePool, 'run' | 'cancel'> | null = null;

/** Replaces parts of the configuration (and drops pools made with the old one); `null` restores the defaults. */
export function configureResults(patch: Partial<ResultsConfig> | null): void {
  config = patch === null ? defaults : { ...config, ...patch };
  pool = null;
  trialPool = null;
  lastPlan = null;
  plannedByKey.clear();
}

/** Shows a kept decomposition on the screens (and marks it the most recently used). */
export function showDecomposition(key: string): void {
  if (useResultsStore.getState().cache[key] !== undefined) touch(key);
}

/** Forgets every decomposition (a new recording, or starting clean). */
export function clearResults(): void {
  plannedByKey.clear();
  useResultsStore.setState({ cache: {}, order: [], activeKey: null, trialHold: null, fieldError: null });
}

/** Marks `key` the most recently used and drops what no longer fits the budget (the shown one always stays). */
function touch(key: string, added?: Decomposition): void {
  useResultsStore.setState((s) => {
    const cache = added !== undefined ? { ...s.cache, [key]: added } : s.cache;
    const order = [...s.order.filter((k) => k !== key), key];
    const { kept, evicted } = fitBudget(order, (k) => sizes.get(k) ?? 0, config.budgetBytes, new Set([key]));
    if (evicted.length === 0) return { cache, order: kept, activeKey: key };
    const next = { ...cache };
    for (const k of evicted) {
      delete next[k];
      sizes.delete(k);
    }
    return { cache: next, order: kept, activeKey: key };
  });
}

const sizes = new Map<string, number>();

/** What a plan is known by: the recording and the whole recipe (`plannedRecipe`, `useRecipeCheck`). */
export function planKey(recordingId: string, recipe: RecipeInput): string {
  return `${recordingId}|${JSON.stringify(recipe)}`;
}

/**
 * The plan of the last recipe asked about: planning scans every sample (conditioning, epoch decisions), so it runs
 * once per recording and recipe, in the plan worker, and the check, the run, the summary and the Slope check share
 * it. A recipe the core refuses stays refused (same error, no second plan); any other failure is forgotten.
 */
let lastPlan: { key: string; recording: Recording; planned: Promise<PlannedRecipe> } | null = null;

/** The plans of the kept decompositions (their conditioned channels feed the spectra and the Slope check). */
const plannedByKey = new Map<string, PlannedRecipe>();

// Another recording makes the plan worker's copy of the last one useless: end the worker (and free that copy) now
// rather than at the next plan.
useWorkspace.subscribe((state, previous) => {
  if (state.recording === previous.recording) return;
  lastPlan = null;
  planner?.terminate();
  // Plans hold their recording's samples (and conditioned copies): another file's plans go with it. A kept
  // decomposition of that file plans again if its file is opened again (plannedFor).
  if (state.recording?.data[0] !== previous.recording?.data[0]) plannedByKey.clear();
});

/** The plan of `recipe` on `recording`, made once (see `lastPlan`); rejects with AnalysisInputError for a recipe that does not fit. */
export function plannedRecipe(recording: Recording, recordingId: string, recipe: RecipeInput): Promise<PlannedRecipe> {
  const key = planKey(recordingId, recipe);
  if (lastPlan !== null && lastPlan.key === key && lastPlan.recording === recording) return lastPlan.planned;
  const planned = Promise.resolve().then(() => config.plan(recording, recipe));
  const entry = { key, recording, planned };
  lastPlan = entry;
  planned.catch((error: unknown) => {
    if (!(error instanceof AnalysisInputError) && lastPlan === entry) lastPlan = null;
  });
  return planned;
}

/** A recipe problem the core found, in the words a field shows. */
export interface RecipeProblem {
  field: string;
  problem: string;
  message: string;
}

/**
 * Checks `recipe` against the recording the way a run will (the same plan, kept for that run): null when it fits,
 * else the field and the problem. A plan that could not be made for another reason (the worker failed) is no verdict
 * on the recipe: null, and the run says what went wrong.
 */
export async function checkRecipe(recording: Recording, recordingId: string, recipe: RecipeInput): Promise<RecipeProblem | null> {
  try {
    await plannedRecipe(recording, recordingId, recipe);
    return null;
  } catch (error) {
    if (error instanceof AnalysisInputError) return { field: error.field, problem: error.problem, message: error.message };
    return null;
  }
}

/**
 * The decomposition of a run straight from the workers' typed arrays (no Result JSON in between): the same numbers,
 * bit for bit, that `assembleResult` writes for the same plan and channels (run-output test).
 */
export function decompositionOf(key: string, recipe: RecipeInput, recordingId: string, plan: RecipePlan, channels: readonly ChannelAnalysis[]): Decomposition {
  const edges = edgeZones(plan.edgeSeconds, plan.sampleRateHz, plan.times.length);
  const fit = (i: number, a: AperiodicFit) => ({ channel: plan.channels[i], ...a });
  return {
    key,
    recipe,
    recordingId,
    sampleRateHz: plan.sampleRateHz,
    epochStart: plan.epochStartSeconds,
    channels: plan.channels.slice(),
    labels: plan.labels,
    trials: plan.epochStarts.map((s) => s.length),
    times: plan.times,
    frequencies: plan.frequencies,
    spacing: recipe.frequencies.spacing ?? 'log',
    edgeSeconds: plan.edgeSeconds,
    edges,
    mask: edgeMask(edges, plan.times.length),
    power: channels.map((ch) => ch.power),
    itpc: plan.itpc ? channels.map((ch) => ch.itpc!) : null,
    evoked: plan.induced ? channels.map((ch) => ch.evoked!) : null,
    spectrum: { frequencies: channels.length > 0 ? channels[0].spectrumFrequencies : new Float64Array(0), psd: channels.map((ch) => ch.psd) },
    recipeSpectra: channels.map((ch) => ch.welch),
    epochSpectra: channels.every((ch) => ch.epochSpectra !== null) ? channels.map((ch) => ch.epochSpectra!) : null,
    aperiodic: channels.map((ch, i) => fit(i, ch.aperiodic)),
    aperiodicByCondition:
      plan.spectrum.conditionSpans === null ? null : Object.fromEntries(plan.labels.map((label, c) => [label, channels.map((ch, i) => fit(i, ch.aperiodicByCondition![c]))])),
    warnings: plan.warnings.slice(),
    epochStarts: plan.epochStarts,
    epochSamples: plan.epochSamples,
    spectrumSegmentSamples: plan.spectrum.segmentSamples,
    spectrumOverlapSamples: plan.spectrum.overlapSamples,
    spectrumSpans: plan.spectrum.spans,
    rejected: plan.rejected.slice(),
    dropped: plan.dropped.slice(),
  };
}

/** The plan decomposition `d` was made with (kept with it), or one made again for its recipe. */
function plannedFor(d: Decomposition, recording: Recording): Promise<PlannedRecipe> {
  const kept = plannedByKey.get(d.key);
  if (kept !== undefined && useResultsStore.getState().cache[d.key] !== undefined) return Promise.resolve(kept);
  // Planning again is only right on the recording `d` was made from (never another file's samples).
  const open = useWorkspace.getState();
  const fingerprint = open.recording !== null && open.recording.data[0] === recording.data[0] ? open.fingerprint : null;
  if (d.recordingId !== fingerprint && d.recordingId !== recordingIds.get(recording.data[0])) {
    return Promise.reject(new Error('this result was made from another recording: open that recording again to use it here'));
  }
  return plannedRecipe(recording, d.recordingId, d.recipe);
}

/**
 * Decomposition `d`'s channels as its run saw them (types, bad channels, reference, filters), in `d.channels` order:
 * the controller's own arrays, from the plan (never conditioned again here). Callers copy what they transfer.
 */
export async function conditionedSamples(d: Decomposition, recording: Recording): Promise<Float32Array[]> {
  const { plan, recording: conditioned } = await plannedFor(d, recording);
  return d.channels.map((name) => {
    const i = plan.channels.indexOf(name);
    if (i < 0) throw new Error(`channel "${name}" is not among the planned channels`);
    return conditioned.data[plan.channelIndices[i]];
  });
}

/** Drops the plans of decompositions the cache no longer keeps. */
function prunePlans(): void {
  const cache = useResultsStore.getState().cache;
  for (const key of plannedByKey.keys()) if (cache[key] === undefined) plannedByKey.delete(key);
}

/** The run waiting for its plan, so a cancel can end it at once, before any worker starts. */
let planning: { cancelled: boolean; cancel: () => void } | null = null;

/**
 * Runs (or recalls from the cache) the decomposition of `recipe`: channels spread over the core's worker pool,
 * progress per channel into the recipe store. Keeps single-trial power of `trialChannel` in the explorer worker.
 */
export async function runDecomposition(recording: Recording, recordingId: string, recipe: RecipeInput, trialChannel: string | null): Promise<Decomposition | null> {
  const key = decompositionKey(recordingId, recipe);
  const results = useResultsStore.getState();
  const setRun = useWorkspace.getState().setRun;
  const hit = results.cache[key];
  if (hit !== undefined) {
    // The key leaves out what the maps apply live (baseline, fit range, channel groups): the shown recipe takes this one's.
    const cached = hit.recipe === recipe ? hit : { ...hit, recipe };
    touch(key, cached);
    useResultsStore.setState({ fieldError: null });
    setRun({ status: 'done', message: 'From the cache: this recipe was already run on this recording.', progress: cached.channels.map((channel) => ({ channel, fraction: 1 })) });
    return cached;
  }
  let planned: PlannedRecipe;
  let cancel: () => void = () => undefined;
  const stopped = new Promise<never>((_, reject) => (cancel = () => reject(new AnalysisCancelledError())));
  stopped.catch(() => undefined);
  const waiting = { cancelled: false, cancel };
  planning = waiting;
  setRun({ status: 'running', message: 'Planning the recipe on this recording…', progress: [] });
  try {
    planned = await Promise.race([plannedRecipe(recording, recordingId, recipe), stopped]);
  } catch (error) {
    if (waiting.cancelled) return null;
    if (error instanceof AnalysisInputError) {
      useResultsStore.setState({ fieldError: { field: error.field, problem: error.problem } });
      setRun({ status: 'failed', message: error.message, progress: [] });
      return null;
    }
    setRun({ status: 'failed', message: error instanceof Error ? error.message : String(error), progress: [] });
    return null;
  } finally {
    if (planning === waiting) planning = null;
  }
  // Cancelled while planning: nothing started; the plan is kept for the same recipe.
  if (waiting.cancelled) return null;
  useResultsStore.setState({ fieldError: null });
  const plan = planned.plan;
  const channel = trialChannel !== null && plan.channels.includes(trialChannel) ? trialChannel : plan.channels[0];
  setRun({ status: 'running', message: null, progress: plan.channels.map((c) => ({ channel: c, fraction: 0 })) });
  pool ??= config.createPool();
  try {
    const { channels, singleTrials, coarseTrials } = await pool.run(recording, recipe, {
      planned,
      singleTrialChannel: channel,
      epochSpectra: true,
      onProgress: (_overall, per) => setRun({ progress: plan.channels.map((c, i) => ({ channel: c, fraction: per[i] })) }),
    });
    const labels = plan.labels;
    const decomposition = decompositionOf(key, recipe, recordingId, plan, channels);
    sizes.set(key, sizeOfDecomposition(decomposition));
    plannedByKey.set(key, planned);
    touch(key, decomposition);
    prunePlans();
    // The fingerprint may have arrived while this run went on (a large file): keep it under the fingerprint too.
    const open = useWorkspace.getState();
    if (recordingId.startsWith('local-') && open.fingerprint !== null && open.recording?.data[0] === recording.data[0]) adoptFingerprint(recording, open.fingerprint);
    setRun({ status: 'done', message: `Decomposed ${plan.channels.length} channel(s) × ${labels.length} condition(s).` });
    if (singleTrials !== null) await holdTrials(decomposition, channel, singleTrials, coarseTrials);
    return decomposition;
  } catch (error) {
    if (error instanceof AnalysisCancelledError) {
      setRun({ status: 'cancelled', message: 'Cancelled; nothing was kept from this run.' });
      return null;
    }
    setRun({ status: 'failed', message: error instanceof Error ? error.message : String(error) });
    return null;
  }
}

/** Stops the running decomposition. */
export function cancelDecomposition(): void {
  if (planning !== null) {
    planning.cancelled = true;
    planning.cancel();
    planning = null;
    // Another run may be decomposing meanwhile (one started before this one planned).
    pool?.cancel();
    useWorkspace.getState().setRun({ status: 'cancelled', message: 'Cancelled; nothing was kept from this run.' });
    return;
  }
  pool?.cancel();
}

async function holdTrials(d: Decomposition, channel: string, singleTrials: Float32Array[], coarse: CoarseTrials | null): Promise<void> {
  const key = `${d.key}|${channel}`;
  await config.holdTrials(key, singleTrials, d.trials, d.frequencies.length, d.times.length, coarse);
  useResultsStore.setState({ trialHold: { key, status: 'ready', message: null } });
}

/**
 * Makes sure the explorer worker holds single-trial power of `channel` for the decomposition `d` (trial scope):
 * decomposes that one channel again with single trials kept, unless it is already held.
 */
export async function ensureTrials(d: Decomposition, channel: string, recording: Recording): Promise<void> {
  const key = `${d.key}|${channel}`;
  const hold = useResultsStore.getState().trialHold;
  if (hold !== null && hold.key === key && hold.status !== 'failed') return;
  useResultsStore.setState({ trialHold: { key, status: 'loading', message: `Keeping single trials of ${channel}…` } });
  trialPool ??= config.createPool(1);
  try {
    // The decomposition's own plan, narrowed to the channel: nothing is planned or conditioned again.
    const planned = plannedChannel(await plannedFor(d, recording), channel);
    const { singleTrials, coarseTrials } = await trialPool.run(recording, { ...d.recipe, channels: [channel] }, { singleTrialChannel: channel, planned });
    if (useResultsStore.getState().trialHold?.key !== key) return;
    if (singleTrials === null) throw new Error('the worker returned no single trials');
    await holdTrials(d, channel, singleTrials, coarseTrials);
  } catch (error) {
    useResultsStore.setState({ trialHold: { key, status: 'failed', message: error instanceof Error ? error.message : String(error) } });
  }
}
