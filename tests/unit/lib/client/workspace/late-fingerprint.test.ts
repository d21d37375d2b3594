// A large recording is shown before its SHA-256 fingerprint is known (src/lib/client/intake.ts): what is keyed by
// the fingerprint waits for it or follows it. Checks, on the controller with an in-memory shelf and fake workers:
// edits made meanwhile are saved when it arrives and come back on the next opening; a saved workspace found after
// the person has edited is offered, never put in place unasked; runs made meanwhile are still found afterwards.
// The recording is a scenario of our own: three channels at 128 Hz, 24 s, "knock" and "bell" cues.
import { planRun } from '../../../../../src/lib/analysis/run-recipe';
import { countingPoolWorkers } from '../../../../helpers/fake-pool-workers';
import { knockLocal, knockRecording } from '../../../../helpers/knock-recording';
import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { DecomposePool } from '../../../../../src/lib/client/decompose-pool';
import { WorkspaceHistory } from '../../../../../src/lib/client/workspace/controller';
import { adoptFingerprint, conditionedSamples, clearResults, configureResults, recordingIdOf, runDecomposition, useResultsStore } from '../../../../../src/lib/client/workspace/results';
import { memoryShelf } from '../../../../../src/lib/client/workspace/saved-workspaces';
import { configureSpectra, spectrumWork } from '../../../../../src/lib/client/workspace/spectra';
import { fitAperiodicEach } from '../../../../../src/lib/analysis/aperiodic';
import { fingerprintOfOpenRecording, INITIAL_WORKSPACE, recipeOf, useWorkspace } from '../../../../../src/lib/client/workspace/store';

const FP = 'e'.repeat(64);

const makeRecording = () => knockRecording(7);
const local = knockLocal;

/** Opens the recording as the intake does: with its fingerprint, or (null) before it is known. */
function open(fingerprint: string | null): number {
  useWorkspace.getState().load({ recording: makeRecording(), local, fingerprint });
  useWorkspace.getState().setEpochWindow({ start: -0.4, end: 1.0 });
  useWorkspace.getState().setDraft({ frequencies: { min: 6, max: 30, count: 4, spacing: 'log' }, cyclesMode: 'fixed', cyclesFixed: 4, spectrum: { segment: 1, overlap: 0.5, range: [1, 50], source: 'recording' } });
  useWorkspace.getState().set({ baseline: { start: -0.3, end: -0.1 } });
  return useWorkspace.getState().openCount;
}

const tick = () => new Promise((r) => setTimeout(r, 0));
const settle = () => new Promise((r) => setTimeout(r, 30));

describe('a recording shown before its fingerprint is known', () => {
  let t = 0;
  let history: WorkspaceHistory;
  beforeEach(() => {
    useWorkspace.setState(INITIAL_WORKSPACE);
    t = 10_000;
    history = new WorkspaceHistory({ store: useWorkspace, now: () => t, saveDelayMs: 5 });
  });
  afterEach(() => history.detach());

  it('edits made before the fingerprint wait for it, are saved when it arrives, and come back on the next opening', async () => {
    const shelf = memoryShelf();
    history.useShelf(shelf);
    const count = open(null);
    await tick();
    expect(useWorkspace.getState().fingerprintWait).toEqual({ state: 'computing', fraction: 0 });
    useWorkspace.getState().setOverride(2, 'reject');
    t += 5000;
    useWorkspace.getState().set({ bands: [{ name: 'low', lowHz: 4, highHz: 8 }] });
    await settle();
    // Nothing can be saved without the key.
    expect(shelf.map.size).toBe(0);
    const waiting = fingerprintOfOpenRecording();
    useWorkspace.getState().fingerprintKnown(count, FP);
    expect(await waiting).toBe(FP);
    expect(useWorkspace.getState().recording!.fingerprint).toBe(FP);
    await settle();
    expect(shelf.map.get(FP)?.edits.bands).toEqual([{ name: 'low', lowHz: 4, highHz: 8 }]);
    expect(Object.values(shelf.map.get(FP)!.edits.rejection.overrides)).toEqual(['reject']);
    expect(history.memory.getState().savedAt).toBe(shelf.map.get(FP)!.savedAt);
    // The undo steps made before the fingerprint are still there.
    expect(history.memory.getState().canUndo).toBe(true);

    // The same file opened again (its fingerprint late again): untouched since opening, it is put back.
    useWorkspace.setState({ bands: INITIAL_WORKSPACE.bands });
    const again = open(null);
    await tick();
    expect(useWorkspace.getState().rejection.overrides).toEqual({});
    useWorkspace.getState().fingerprintKnown(again, FP);
    await settle();
    expect(history.memory.getState().restoredFrom).toBe(shelf.map.get(FP)!.savedAt);
    expect(history.memory.getState().offer).toBeNull();
    expect(useWorkspace.getState().bands).toEqual([{ name: 'low', lowHz: 4, highHz: 8 }]);
    expect(Object.values(useWorkspace.getState().rejection.overrides)).toEqual(['reject']);
  });

  it('a saved workspace found after the person edited is offered, not put in place; taking it is one undo step', async () => {
    const shelf = memoryShelf();
    history.useShelf(shelf);
    open(FP);
    await tick();
    useWorkspace.getState().set({ bands: [{ name: 'earlier', lowHz: 13, highHz: 30 }] });
    await settle();
    const earlier = shelf.map.get(FP)!;

    const count = open(null);
    await tick();
    useWorkspace.getState().setOverride(0, 'keep');
    t += 5000;
    useWorkspace.getState().set({ method: 'z-score' });
    useWorkspace.getState().fingerprintKnown(count, FP);
    await settle();
    // The edits made meanwhile stay, and are what is saved now; the earlier work is offered.
    expect(history.memory.getState().offer).toEqual({ savedAt: earlier.savedAt });
    expect(history.memory.getState().restoredFrom).toBeNull();
    expect(useWorkspace.getState().method).toBe('z-score');
    expect(Object.values(useWorkspace.getState().rejection.overrides)).toEqual(['keep']);
    expect(shelf.map.get(FP)!.edits.method).toBe('z-score');
    // Taken: the earlier work is in place, and one undo returns to the edits made before the fingerprint.
    history.takeOffer();
    expect(useWorkspace.getState().bands).toEqual([{ name: 'earlier', lowHz: 13, highHz: 30 }]);
    expect(useWorkspace.getState().method).toBe(INITIAL_WORKSPACE.method);
    expect(history.memory.getState().offer).toBeNull();
    expect(history.undo()).toBe(true);
    expect(useWorkspace.getState().method).toBe('z-score');
    expect(Object.values(useWorkspace.getState().rejection.overrides)).toEqual(['keep']);
  });

  it('a fingerprint that arrives after another recording was opened changes nothing', async () => {
    const shelf = memoryShelf();
    history.useShelf(shelf);
    const first = open(null);
    await tick();
    const waiting = fingerprintOfOpenRecording();
    open('f'.repeat(64));
    expect(await waiting).toBeNull();
    useWorkspace.getState().fingerprintKnown(first, FP);
    expect(useWorkspace.getState().fingerprint).toBe('f'.repeat(64));
  });
});

describe('runs made before the fingerprint is known', () => {
  let plans = 0;
  beforeEach(() => {
    useWorkspace.setState(INITIAL_WORKSPACE);
    clearResults();
    plans = 0;
    const { factory } = countingPoolWorkers();
    const plan = (recording: Parameters<typeof planRun>[0], recipe: Parameters<typeof planRun>[1]) => {
      plans++;
      return planRun(recording, recipe);
    };
    configureResults({ createPool: (size) => new DecomposePool({ size: size ?? 2, createWorker: factory }), plan, holdTrials: async () => undefined });
  });
  afterEach(() => configureResults(null));

  it('are kept under the fingerprint once it arrives: the same recipe is found in the cache', async () => {
    const count = open(null);
    const s = useWorkspace.getState();
    const before = await runDecomposition(s.recording!, recordingIdOf(s.recording!, null), recipeOf(s), null);
    expect(before!.recordingId).toMatch(/^local-/);
    adoptFingerprint(useWorkspace.getState().recording!, FP);
    useWorkspace.getState().fingerprintKnown(count, FP);
    const after = useWorkspace.getState();
    // The recipe now names the recording (recording.fingerprint), as toRecipe writes it.
    expect(recipeOf(after).recording?.fingerprint).toBe(FP);
    const again = await runDecomposition(after.recording!, recordingIdOf(after.recording!, after.fingerprint), recipeOf(after), null);
    expect(useWorkspace.getState().run.message).toMatch(/^From the cache/);
    expect(again!.power[0][0]).toBe(before!.power[0][0]);
    expect(useResultsStore.getState().activeKey).toBe(again!.key);
    expect(Object.keys(useResultsStore.getState().cache)).toEqual([again!.key]);
    // The run's plan moved with it: its conditioned channels are there without a second plan.
    const planned = plans;
    expect(await conditionedSamples(again!, after.recording!)).toHaveLength(again!.channels.length);
    expect(plans).toBe(planned);
    expect(useResultsStore.getState().order).toEqual([again!.key]);
  });

  it('keeps the Spectrum screen\'s fits under the fingerprint too: no refit for the same range', async () => {
    let refits = 0;
    configureSpectra(() => ({
      fitEach: async (spectra, range, model) => {
        refits++;
        return fitAperiodicEach(spectra, range, model);
      },
    }));
    try {
      const count = open(null);
      const s = useWorkspace.getState();
      const before = (await runDecomposition(s.recording!, recordingIdOf(s.recording!, null), recipeOf(s), null))!;
      const fitted = await spectrumWork.fits(before, spectrumWork.recipeSpectra(before), [2, 30], 'power-law');
      expect(refits).toBe(1);
      adoptFingerprint(useWorkspace.getState().recording!, FP);
      useWorkspace.getState().fingerprintKnown(count, FP);
      const after = useWorkspace.getState();
      const again = (await runDecomposition(after.recording!, recordingIdOf(after.recording!, after.fingerprint), recipeOf(after), null))!;
      expect(again.key).not.toBe(before.key);
      expect(await spectrumWork.fits(again, spectrumWork.recipeSpectra(again), [2, 30], 'power-law')).toEqual(fitted);
      expect(refits).toBe(1);
      // Another range is new work.
      await spectrumWork.fits(again, spectrumWork.recipeSpectra(again), [3, 30], 'power-law');
      expect(refits).toBe(2);
    } finally {
      configureSpectra(null);
    }
  });

  it('refuses to plan a kept result again on another recording', async () => {
    open(FP);
    const s = useWorkspace.getState();
    const d = await runDecomposition(s.recording!, FP, recipeOf(s), null);
    open('f'.repeat(64));
    await expect(conditionedSamples(d!, useWorkspace.getState().recording!)).rejects.toThrow(/made from another recording/);
  });
});
