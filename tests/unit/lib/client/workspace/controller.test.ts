// The workspace controller with fake workers: in-process comlink endpoints (node:worker_threads MessageChannel)
// running the real worker API, so the pool, the plan and the cache are the browser's own code. Checks: one plan
// per recipe, eviction under the memory budget, cancel, and the history (undo/redo, saved and restored per
// account and recording).
import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import type { Recording } from '../../../../../src/lib/analysis/recording';
import { analyzeChannel, planRun, runRecipe } from '../../../../../src/lib/analysis/run-recipe';
import { DecomposePool, type PoolWorker } from '../../../../../src/lib/client/decompose-pool';
import { WorkspaceHistory } from '../../../../../src/lib/client/workspace/controller';
import { historyKeyOf } from '../../../../../src/lib/client/workspace/keys';
import { checkRecipe, clearResults, conditionedSamples, configureResults, cancelDecomposition, ensureTrials, plannedRecipe, runDecomposition, useResultsStore } from '../../../../../src/lib/client/workspace/results';
import { RecipePlanner } from '../../../../../src/lib/client/recipe-planner';
import { conditionRecording } from '../../../../../src/lib/analysis/condition-recording';
import { parseRecipe, type RecipeInput } from '../../../../../src/lib/analysis/recipe';
import { planApi, type PlanReply } from '../../../../../workers/plan-api';
import { memoryShelf } from '../../../../../src/lib/client/workspace/saved-workspaces';
import { INITIAL_WORKSPACE, recipeOf, useWorkspace } from '../../../../../src/lib/client/workspace/store';
import { BudgetCache, fitBudget } from '../../../../../src/lib/client/workspace/cache-budget';
import { channelWorker, countingPoolWorkers } from '../../../../helpers/fake-pool-workers';
import { knockLocal, knockRecording } from '../../../../helpers/knock-recording';

const makeRecording = () => knockRecording(41);
const local = knockLocal;
const fakeWorkers = countingPoolWorkers;

function open(fingerprint = 'a'.repeat(64)) {
  useWorkspace.getState().load({ recording: makeRecording(), local, fingerprint });
  useWorkspace.getState().setEpochWindow({ start: -0.4, end: 1.0 });
  useWorkspace.getState().setDraft({ frequencies: { min: 6, max: 30, count: 4, spacing: 'log' }, cyclesMode: 'fixed', cyclesFixed: 4, spectrum: { segment: 1, overlap: 0.5, range: [1, 50], source: 'recording' } });
  useWorkspace.getState().set({ baseline: { start: -0.3, end: -0.1 } });
}

describe('the controller runs each recipe through one plan and the worker pool', () => {
  let plans = 0;
  let workers: ReturnType<typeof fakeWorkers>;
  beforeEach(() => {
    useWorkspace.setState(INITIAL_WORKSPACE);
    clearResults();
    plans = 0;
    workers = fakeWorkers();
    configureResults({
      createPool: (size) => new DecomposePool({ size: size ?? 2, createWorker: workers.factory }),
      plan: (recording, recipe) => {
        plans++;
        return planRun(recording, recipe);
      },
      holdTrials: async () => undefined,
    });
    open();
  });
  afterEach(() => configureResults(null));

  it('plans once per recipe: the check and the run share it, and the numbers are runRecipe\'s bit for bit', async () => {
    const s = useWorkspace.getState();
    const recording = s.recording!;
    const recipe = recipeOf(s);
    expect(await checkRecipe(recording, 'rec', recipe)).toBeNull();
    expect(await checkRecipe(recording, 'rec', recipe)).toBeNull();
    const d = await runDecomposition(recording, 'rec', recipe, null);
    expect(plans).toBe(1);
    // The single-thread core is the reference (the parity test compares it with the CLI).
    const reference = runRecipe(recording, recipe);
    const row = reference.conditions[d!.labels[0]].power[0][2];
    const T = d!.times.length;
    expect(Array.from(d!.power[0][0].subarray(2 * T, 3 * T))).toEqual(row.map((v) => (v === null ? NaN : v)));
    // A new baseline re-normalizes live: the decomposition comes from the cache, nothing is planned again.
    useWorkspace.getState().setBaseline({ start: -0.35, end: -0.15 });
    await runDecomposition(recording, 'rec', recipeOf(useWorkspace.getState()), null);
    expect(plans).toBe(1);
    expect(useWorkspace.getState().run.message).toMatch(/^From the cache/);
    // Another frequency grid is another recipe: one more plan.
    useWorkspace.getState().setDraft({ frequencies: { min: 6, max: 30, count: 5, spacing: 'log' } });
    await runDecomposition(recording, 'rec', recipeOf(useWorkspace.getState()), null);
    expect(plans).toBe(2);
  });

  it('keeps decompositions under the memory budget, least recently shown out first, the shown one always', async () => {
    const recording = useWorkspace.getState().recording!;
    const first = await runDecomposition(recording, 'rec', recipeOf(useWorkspace.getState()), null);
    expect(useResultsStore.getState().order).toEqual([first!.key]);
    const bytes = estimate(first!);
    expect(bytes).toBeGreaterThan(1000);
    // Room for one and a half decompositions of this size.
    configureResults({ budgetBytes: Math.floor(bytes * 1.5) });
    useWorkspace.getState().setDraft({ frequencies: { min: 6, max: 30, count: 4, spacing: 'linear' } });
    const second = await runDecomposition(recording, 'rec', recipeOf(useWorkspace.getState()), null);
    expect(Object.keys(useResultsStore.getState().cache)).toEqual([second!.key]);
    expect(useResultsStore.getState().order).toEqual([second!.key]);
    expect(useResultsStore.getState().activeKey).toBe(second!.key);
    // A budget smaller than one decomposition still keeps the shown one.
    configureResults({ budgetBytes: 1 });
    useWorkspace.getState().setDraft({ frequencies: { min: 6, max: 30, count: 3, spacing: 'linear' } });
    const third = await runDecomposition(recording, 'rec', recipeOf(useWorkspace.getState()), null);
    expect(Object.keys(useResultsStore.getState().cache)).toEqual([third!.key]);
  });

  it('cancel ends a run at once, keeps nothing from it and terminates its workers', async () => {
    workers.state.stall = true;
    const recording = useWorkspace.getState().recording!;
    const running = runDecomposition(recording, 'rec', recipeOf(useWorkspace.getState()), null);
    await new Promise((r) => setTimeout(r, 30));
    expect(useWorkspace.getState().run.status).toBe('running');
    cancelDecomposition();
    expect(await running).toBeNull();
    expect(useWorkspace.getState().run).toMatchObject({ status: 'cancelled' });
    expect(useResultsStore.getState().cache).toEqual({});
    expect(workers.state.terminated).toBe(workers.state.created);
  });
});

/**
 * A plan worker over MessageChannel running the real `planApi`: counts plans, can hold them back (`gate`), and keeps
 * what it sent so a test can see the conditioned copies were transferred (detached here), not cloned.
 */
function fakePlanWorker() {
  const state = { plans: 0, created: 0, terminated: 0, sent: [] as Float32Array[], gate: null as Promise<void> | null, failures: [] as ((problem: string) => void)[] };
  const factory = (): PoolWorker => {
    state.created++;
    const api = planApi();
    const counted = {
      ...api,
      plan: async (recipe: unknown, known: Parameters<typeof api.plan>[1]): Promise<PlanReply> => {
        state.plans++;
        if (state.gate !== null) await state.gate;
        const reply = api.plan(recipe, known);
        if (reply.ok) state.sent.push(...reply.channels.filter((c): c is Float32Array => c instanceof Float32Array));
        return reply;
      },
    };
    return { ...channelWorker(counted, state), onFailure: (listener) => void state.failures.push(listener) };
  };
  return { state, factory };
}

describe('the plan is made in the plan worker, once per recipe, and its conditioned channels are reused', () => {
  let planWorker: ReturnType<typeof fakePlanWorker>;
  let workers: ReturnType<typeof fakeWorkers>;
  let held: { key: string; trials: Float32Array[] }[];
  let poolRuns: boolean[];
  beforeEach(() => {
    useWorkspace.setState(INITIAL_WORKSPACE);
    clearResults();
    planWorker = fakePlanWorker();
    workers = fakeWorkers();
    held = [];
    poolRuns = [];
    const planner = new RecipePlanner({ createWorker: planWorker.factory });
    configureResults({
      // Every pool run must be handed the controller's plan (else the pool would plan on the calling thread).
      createPool: (size) => {
        const pool = new DecomposePool({ size: size ?? 2, createWorker: workers.factory });
        return { run: (input, recipe, options) => (poolRuns.push(options?.planned !== undefined), pool.run(input, recipe, options)), cancel: () => pool.cancel() };
      },
      plan: (recording, recipe) => planner.plan(recording, recipe),
      holdTrials: async (key, trials) => void held.push({ key, trials }),
    });
    open();
  });
  afterEach(() => configureResults(null));

  // A zero-phase high-pass changes every channel, so the conditioned samples are new arrays that must cross once.
  const filtered = (): RecipeInput => ({ ...recipeOf(useWorkspace.getState()), filters: { highPass: { cutoffHz: 1, order: 4 } } });

  it('check, run, summary plan, Slope check samples and trial channel share one plan; equal to planRun in this thread', async () => {
    const recording = useWorkspace.getState().recording!;
    const recipe = filtered();
    expect(await checkRecipe(recording, 'rec', recipe)).toBeNull();
    expect(await checkRecipe(recording, 'rec', recipe)).toBeNull();
    const d = (await runDecomposition(recording, 'rec', recipe, null))!;
    expect(d).not.toBeNull();
    expect(planWorker.state.plans).toBe(1);
    // The conditioned copies were transferred out of the worker (their buffers there are detached), not cloned.
    expect(planWorker.state.sent).toHaveLength(3);
    expect(planWorker.state.sent.every((c) => c.byteLength === 0)).toBe(true);
    // The same numbers as the single-thread core (the parity test compares that with the CLI).
    const reference = runRecipe(recording, recipe);
    const T = d.times.length;
    expect(Array.from(d.power[1][0].subarray(2 * T, 3 * T))).toEqual(reference.conditions[d.labels[0]].power[1][2].map((v) => (v === null ? NaN : v)));
    // "Save as version" asks for the plan of the same recipe: the kept one.
    const forSummary = await plannedRecipe(recording, 'rec', recipe);
    // The Slope check and the spectra read the run's conditioned samples: the same arrays, equal to the core's.
    const samples = await conditionedSamples(d, recording);
    const core = conditionRecording(recording, parseRecipe(recipe)).recording;
    d.channels.forEach((name, i) => {
      expect(samples[i]).toBe(forSummary.recording.data[forSummary.plan.channelIndices[i]]);
      expect(Array.from(samples[i])).toEqual(Array.from(core.data[core.channelNames.indexOf(name)]));
    });
    // Single trials of one channel: the run's plan narrowed to it, nothing planned again.
    await ensureTrials(d, 'Pz', recording);
    expect(held.map((h) => h.key)).toEqual([`${d.key}|F3`, `${d.key}|Pz`]);
    expect(useResultsStore.getState().trialHold).toMatchObject({ status: 'ready' });
    expect(planWorker.state.plans).toBe(1);
    // …and its single trials are the core's for that channel, planned with every channel in this thread.
    const whole = planRun(recording, recipe);
    const pz = analyzeChannel(whole.plan, whole.recording.data[whole.plan.channelIndices[2]], { singleTrials: true });
    expect(held[1].trials.map((t) => Array.from(t))).toEqual(pz.singleTrials!.map((t) => Array.from(t)));
    // Another baseline is another recipe: one more plan, but the conditioning is the same, so no samples cross again.
    useWorkspace.getState().setBaseline({ start: -0.35, end: -0.15 });
    const moved = await plannedRecipe(recording, 'rec', { ...filtered() });
    expect(planWorker.state.plans).toBe(2);
    expect(planWorker.state.sent).toHaveLength(3);
    expect(moved.recording.data).toEqual(forSummary.recording.data);
    moved.recording.data.forEach((x, i) => expect(x).toBe(forSummary.recording.data[i]));
    // Another frequency grid: a new plan for the run.
    useWorkspace.getState().setDraft({ frequencies: { min: 6, max: 30, count: 5, spacing: 'log' } });
    await runDecomposition(recording, 'rec', filtered(), null);
    expect(planWorker.state.plans).toBe(3);
    expect(poolRuns).toEqual([true, true, true]);
    // The recording was sent to the worker once.
    expect(planWorker.state.created).toBe(1);
  });

  it('a channel left as recorded is the recording\'s own array: nothing crosses back', async () => {
    const recording = useWorkspace.getState().recording!;
    const planned = await plannedRecipe(recording, 'rec', recipeOf(useWorkspace.getState()));
    expect(planned.plan.channels).toEqual(['F3', 'Cz', 'Pz']);
    planned.plan.channels.forEach((name, i) => expect(planned.recording.data[planned.plan.channelIndices[i]]).toBe(recording.data[recording.channelNames.indexOf(name)]));
    expect(planWorker.state.sent).toHaveLength(0);
  });

  it('a recipe the core refuses comes back with its field and problem, once, and the run names it', async () => {
    const recording = useWorkspace.getState().recording!;
    // 128 Hz sampling: Nyquist is 64 Hz (Nyquist–Shannon sampling theorem, common practice).
    useWorkspace.getState().setDraft({ frequencies: { min: 6, max: 70, count: 4, spacing: 'log' } });
    const recipe = recipeOf(useWorkspace.getState());
    const problem = await checkRecipe(recording, 'rec', recipe);
    expect(problem).toMatchObject({ field: 'frequencies.max' });
    expect(problem!.problem).toContain('Nyquist frequency (64 Hz');
    expect(await checkRecipe(recording, 'rec', recipe)).toEqual(problem);
    expect(await runDecomposition(recording, 'rec', recipe, null)).toBeNull();
    expect(useResultsStore.getState().fieldError).toEqual({ field: 'frequencies.max', problem: problem!.problem });
    expect(useWorkspace.getState().run.status).toBe('failed');
    expect(planWorker.state.plans).toBe(1);
    expect(workers.state.created).toBe(0);
  });

  /** A run whose plan the plan worker holds back until `release`. */
  async function heldPlanRun() {
    let release: () => void = () => undefined;
    planWorker.state.gate = new Promise((r) => (release = r));
    const recording = useWorkspace.getState().recording!;
    const recipe = recipeOf(useWorkspace.getState());
    const running = runDecomposition(recording, 'rec', recipe, null);
    await new Promise((r) => setTimeout(r, 30));
    return { release, recording, recipe, running };
  }

  it('cancel while planning ends the run at once and starts no worker; the plan is kept for the same recipe', async () => {
    const { release, recording, recipe, running } = await heldPlanRun();
    expect(planWorker.state.plans).toBe(1);
    expect(useWorkspace.getState().run.status).toBe('running');
    cancelDecomposition();
    expect(useWorkspace.getState().run.status).toBe('cancelled');
    expect(await running).toBeNull();
    expect(workers.state.created).toBe(0);
    expect(useResultsStore.getState().cache).toEqual({});
    release();
    const d = await runDecomposition(recording, 'rec', recipe, null);
    expect(d).not.toBeNull();
    expect(useWorkspace.getState().run.status).toBe('done');
    expect(planWorker.state.plans).toBe(1);
  });

  it('a plan worker that fails ends the run with its words; the next run plans on a new worker', async () => {
    const { release, recording, recipe, running } = await heldPlanRun();
    planWorker.state.failures[0]('an error escaped');
    expect(await running).toBeNull();
    expect(useWorkspace.getState().run).toMatchObject({ status: 'failed', message: 'the plan worker failed: an error escaped' });
    expect(planWorker.state.terminated).toBe(1);
    planWorker.state.gate = null;
    release();
    expect(await runDecomposition(recording, 'rec', recipe, null)).not.toBeNull();
    expect(planWorker.state.created).toBe(2);
  });
});

/** Bytes of a decomposition's typed arrays, counted here independently of cache-budget.ts. */
function estimate(d: { power: Float64Array[][]; mask: Uint8Array; times: Float64Array; frequencies: Float64Array }): number {
  return d.power.flat().reduce((a, p) => a + p.byteLength, 0) + d.mask.byteLength + d.times.byteLength + d.frequencies.byteLength;
}

describe('byte budget', () => {
  it('fitBudget keeps the most recent that fit, pinned ones always', () => {
    const size = { a: 4, b: 4, c: 4, d: 10 } as Record<string, number>;
    expect(fitBudget(['a', 'b', 'c'], (k) => size[k], 8)).toEqual({ kept: ['b', 'c'], evicted: ['a'] });
    expect(fitBudget(['a', 'b', 'd'], (k) => size[k], 8, new Set(['d']))).toEqual({ kept: ['d'], evicted: ['a', 'b'] });
  });

  it('BudgetCache evicts the least recently used beyond its budget', () => {
    const cache = new BudgetCache<Float64Array>(64);
    cache.set('a', new Float64Array(4)); // 32 bytes
    cache.set('b', new Float64Array(4));
    cache.get('a'); // a is now the most recent
    cache.set('c', new Float64Array(4));
    expect([cache.has('a'), cache.has('b'), cache.has('c')]).toEqual([true, false, true]);
    expect(cache.bytes).toBe(64);
  });
});

describe('history and the workspace kept in this browser', () => {
  let t = 0;
  let history: WorkspaceHistory;
  beforeEach(() => {
    useWorkspace.setState(INITIAL_WORKSPACE);
    t = 10_000;
    history = new WorkspaceHistory({ store: useWorkspace, now: () => t, saveDelayMs: 5 });
  });
  afterEach(() => history.detach());
  const tick = () => new Promise((r) => setTimeout(r, 0));
  const settle = () => new Promise((r) => setTimeout(r, 30));

  it('undo walks every edit back one step at a time and redo forward; opening is not an edit', async () => {
    open();
    await tick();
    expect(history.memory.getState()).toMatchObject({ canUndo: false, canRedo: false });
    const s = () => useWorkspace.getState();
    s().setOverride(0, 'reject');
    t += 5000;
    s().setOverride(2, 'keep');
    t += 5000;
    s().setConditions([{ name: 'knock', labels: ['knock'] }]);
    t += 5000;
    expect(Object.keys(s().rejection.overrides)).toHaveLength(2);
    const rejected = s().decisions.filter((d) => d.rejected).length;
    expect(history.undo()).toBe(true);
    expect(s().conditions.map((c) => c.name).sort()).toEqual(['bell', 'knock']);
    expect(history.undo()).toBe(true);
    expect(Object.keys(s().rejection.overrides)).toHaveLength(1);
    expect(history.undo()).toBe(true);
    expect(s().rejection.overrides).toEqual({});
    expect(history.undo()).toBe(false);
    expect(history.redo()).toBe(true);
    expect(history.redo()).toBe(true);
    expect(history.redo()).toBe(true);
    expect(history.redo()).toBe(false);
    expect(Object.keys(s().rejection.overrides)).toHaveLength(2);
    expect(s().conditions.map((c) => c.name)).toEqual(['knock']);
    // Decisions derive from the edits: they are back too.
    expect(s().decisions.filter((d) => d.rejected).length).toBe(rejected);
  });

  it('a drag is one step; a new edit after undo drops the redo list', async () => {
    open();
    await tick();
    const s = () => useWorkspace.getState();
    for (let k = 1; k <= 10; k++) {
      s().setBaseline({ start: -0.3 + k * 0.005, end: -0.1 });
      t += 30;
    }
    t += 5000;
    s().set({ method: 'z-score' });
    history.undo();
    history.undo();
    expect(s().baseline).toEqual({ start: -0.3, end: -0.1 });
    history.redo();
    expect(s().baseline.start).toBeCloseTo(-0.25, 12);
    s().set({ rawScale: 'linear' });
    expect(history.memory.getState().canRedo).toBe(false);
  });

  it('saves per recording, restores on opening it again with the time, and starting clean forgets it', async () => {
    const shelf = memoryShelf();
    history.useShelf(shelf);
    open('b'.repeat(64));
    await tick();
    useWorkspace.getState().setOverride(4, 'reject');
    t += 5000;
    useWorkspace.getState().set({ bands: [{ name: 'low', lowHz: 4, highHz: 8 }] });
    await settle();
    const saved = shelf.map.get('b'.repeat(64))!;
    expect(saved.edits.bands).toEqual([{ name: 'low', lowHz: 4, highHz: 8 }]);
    // Settings only: nothing of the recording's samples is in what was saved.
    expect(JSON.stringify(saved)).not.toMatch(/"data"|Float32Array/);
    expect('recording' in saved.edits).toBe(false);
    // Another recording: nothing restored.
    open('c'.repeat(64));
    await settle();
    expect(history.memory.getState().restoredFrom).toBeNull();
    expect(useWorkspace.getState().rejection.overrides).toEqual({});
    // The first one again: everything is back, and the line says from when.
    useWorkspace.setState({ bands: INITIAL_WORKSPACE.bands });
    open('b'.repeat(64));
    await settle();
    expect(history.memory.getState().restoredFrom).toBe(saved.savedAt);
    expect(Object.values(useWorkspace.getState().rejection.overrides)).toEqual(['reject']);
    expect(useWorkspace.getState().bands).toEqual([{ name: 'low', lowHz: 4, highHz: 8 }]);
    expect(history.memory.getState().canUndo).toBe(false);
    await history.startClean();
    expect(useWorkspace.getState().rejection.overrides).toEqual({});
    expect(shelf.map.has('b'.repeat(64))).toBe(false);
    expect(history.memory.getState().restoredFrom).toBeNull();
  });

  it('another account\'s shelf holds none of it', async () => {
    const mine = memoryShelf();
    const theirs = memoryShelf();
    history.useShelf(mine);
    open('d'.repeat(64));
    await tick();
    useWorkspace.getState().setOverride(0, 'reject');
    await settle();
    expect(mine.map.size).toBe(1);
    history.useShelf(theirs);
    open('d'.repeat(64));
    await settle();
    expect(history.memory.getState().restoredFrom).toBeNull();
    expect(useWorkspace.getState().rejection.overrides).toEqual({});
    expect(theirs.map.size).toBe(0);
  });
});

describe('history keys', () => {
  const key = (k: string, mods: Partial<Record<'ctrlKey' | 'metaKey' | 'shiftKey' | 'altKey', boolean>> = {}) => ({ key: k, ctrlKey: false, metaKey: false, shiftKey: false, altKey: false, ...mods });
  it('Ctrl/Cmd+Z undoes, Ctrl/Cmd+Shift+Z and Ctrl+Y redo, text fields keep their own undo (common practice)', () => {
    const body = { tagName: 'BODY' };
    expect(historyKeyOf(key('z', { ctrlKey: true }), body as never)).toBe('undo');
    expect(historyKeyOf(key('z', { metaKey: true }), body as never)).toBe('undo');
    expect(historyKeyOf(key('Z', { ctrlKey: true, shiftKey: true }), body as never)).toBe('redo');
    expect(historyKeyOf(key('y', { ctrlKey: true }), body as never)).toBe('redo');
    expect(historyKeyOf(key('z'), body as never)).toBeNull();
    expect(historyKeyOf(key('z', { ctrlKey: true }), { tagName: 'INPUT', type: 'number' } as never)).toBeNull();
    expect(historyKeyOf(key('z', { ctrlKey: true }), { tagName: 'TEXTAREA' } as never)).toBeNull();
    expect(historyKeyOf(key('z', { ctrlKey: true }), { tagName: 'INPUT', type: 'checkbox' } as never)).toBe('undo');
  });
});
