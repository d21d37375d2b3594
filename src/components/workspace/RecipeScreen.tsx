import { useMemo } from 'react';
import ResolutionTable from './ResolutionTable';
import LoadRecipe from './LoadRecipe';
import type { WorkspaceProps } from './types';
import { decompositionKey, toRecipe, type CyclesMode } from '../../lib/client/workspace/recipe';
import { cancelDecomposition, recordingIdOf, runDecomposition, useResultsStore } from '../../lib/client/workspace/results';
import { useRecipeCheck } from '../../lib/client/workspace/recipe-check';
import { recipeChannelChoices } from '../../lib/client/workspace/source-panels';
import { fieldGroup, shownUnderTheForm } from '../../lib/client/workspace/recipe-fields';
import NumberField from '../explorer/NumberField';
import { usePanelVisible } from '../explorer/usePanelVisible';
import Choice from '../explorer/Choice';
import RunProgress, { ComputedList } from '../explorer/RunProgress';
import RecipeChannels from '../explorer/RecipeChannels';
import RecipeConditions from '../explorer/RecipeConditions';
import RecipeGroups, { groupProblems } from '../explorer/RecipeGroups';
import { defaultGroupsFor } from '../../lib/client/workspace/channel-groups';
import { useScreen } from '../../lib/client/workspace/navigation';
import { useWorkspace } from '../../lib/client/workspace/store';

/** The Recipe screen: the decomposition's parameters, validated against the open recording, and its run. */
export default function RecipeScreen(_props: WorkspaceProps) {
  const draft = useWorkspace((s) => s.draft);
  const run = useWorkspace((s) => s.run);
  const setDraft = useWorkspace((s) => s.setDraft);
  const recording = useWorkspace((s) => s.recording);
  const fingerprint = useWorkspace((s) => s.fingerprint);
  const reading = useWorkspace((s) => s.local?.reading ?? null);
  const conditions = useWorkspace((s) => s.conditions);
  const epochWindow = useWorkspace((s) => s.epochWindow);
  const decisions = useWorkspace((s) => s.decisions);
  const rejection = useWorkspace((s) => s.rejection);
  const conditioning = useWorkspace((s) => s.conditioning);
  const eventSelection = useWorkspace((s) => s.eventSelection);
  const fitRange = useWorkspace((s) => s.fitRange);
  const setView = useWorkspace((s) => s.set);
  const settingsError = useWorkspace((s) => s.settingsError);
  const method = useWorkspace((s) => s.method);
  const scope = useWorkspace((s) => s.scope);
  const spread = useWorkspace((s) => s.spread);
  const viewChannel = useWorkspace((s) => s.channel);
  const cache = useResultsStore((s) => s.cache);
  const activeKey = useResultsStore((s) => s.activeKey);
  // Hidden, the screen skips validation: the baseline it reads changes on every drag of the Maps screen.
  const visible = usePanelVisible('Recipe');
  // Hidden, it does not follow the baseline either, so a drag on the Maps screen does not re-render it.
  const baseline = useWorkspace((s) => (visible ? s.baseline : null)) ?? useWorkspace.getState().baseline;

  const recipe = toRecipe({ draft, conditions, epochWindow, rejection, conditioning, eventSelection, fingerprint, local: { reading: reading ?? undefined }, baseline, method, scope, spread, fitRange });
  // The whole recording goes to the core with the full recipe: prepareRecording applies conditions and rejection there.
  const analysis = recording;
  const recordingId = recording === null ? null : recordingIdOf(recording, fingerprint);
  const key = recordingId === null ? null : decompositionKey(recordingId, recipe);

  // The core's verdict arrives with the recipe's plan (made in the plan worker and kept for the run).
  const planned = useRecipeCheck(analysis, recordingId, recipe, visible && recipe.epochs.events.length > 0);
  const check = useMemo((): { field: string; problem: string; message: string } | null => {
    if (analysis === null || !visible) return null;
    if (recipe.epochs.events.length === 0) return { field: 'conditions', problem: 'choose at least one condition (define them on the Source screen)', message: '' };
    return planned === null ? null : { field: fieldGroup(planned.field), problem: planned.problem, message: planned.message };
    // eslint-disable-next-line react-hooks/exhaustive-deps
  }, [analysis, visible, planned, recipe.epochs.events.length]);
  const errorFor = (group: string) => (check !== null && check.field === group ? check.problem : null);

  if (recording === null) {
    return (
      <div className="card p-4" data-testid="recipe-empty">
        <p>Open a recording on the Source screen first; the recipe is checked against its channels, events and sample rate.</p>
      </div>
    );
  }
  const running = run.status === 'running';
  const cached = key !== null && cache[key] !== undefined;
  // Channel groups are not part of the cache key: the kept decomposition is shown again with the edited groups.
  const groupsChanged = cached && JSON.stringify(cache[key!].recipe.channelGroups ?? null) !== JSON.stringify(recipe.channelGroups ?? null);
  const start = () => {
    if (analysis === null || recordingId === null) return;
    // A finished run goes on to the maps, unless the person has already moved to another screen.
    void runDecomposition(analysis, recordingId, recipe, viewChannel).then((d) => {
      if (d !== null) useScreen.getState().show('Maps', 'Recipe');
    });
  };
  const cycleOptions: { value: CyclesMode; label: string }[] = [
    { value: 'range', label: 'cycles min–max' },
    { value: 'fixed', label: 'fixed cycles' },
    { value: 'fwhm', label: 'FWHM (s)' },
  ];
  // The channels a recipe can name: the recording as conditioned (bad ones out, bipolar pairs in), brain ones first.
  const { candidates, brain } = recipeChannelChoices(recording, conditioning);
  const analysed = draft.channels.length > 0 ? draft.channels : brain;
  const localGroupProblems = draft.channelGroups ? groupProblems(draft.channelGroups) : [];
  const fs = recording.sampleRateHz;

  return (
    <form
      className="flex flex-col gap-4"
      data-testid="recipe-screen"
      onSubmit={(e) => {
        e.preventDefault();
        if (!running && check === null && localGroupProblems.length === 0) start();
      }}
    >
      <LoadRecipe />
      <fieldset className="card flex flex-wrap items-end gap-4 p-3">
        <legend className="px-1 text-sm font-semibold">Frequencies</legend>
        <NumberField label="Lowest" unit="Hz" value={draft.frequencies.min} step={0.5} testId="recipe-fmin" error={errorFor('frequencies.min')} onValue={(v) => setDraft({ frequencies: { ...draft.frequencies, min: v } })} />
        <NumberField label="Highest" unit="Hz" value={draft.frequencies.max} step={0.5} testId="recipe-fmax" error={errorFor('frequencies.max')} onValue={(v) => setDraft({ frequencies: { ...draft.frequencies, max: v } })} />
        <NumberField label="Count" value={draft.frequencies.count} step={1} testId="recipe-fcount" error={errorFor('frequencies.count')} onValue={(v) => setDraft({ frequencies: { ...draft.frequencies, count: v } })} />
        <Choice legend="Spacing" value={draft.frequencies.spacing} options={[{ value: 'log', label: 'log' }, { value: 'linear', label: 'linear' }]} onChange={(s) => setDraft({ frequencies: { ...draft.frequencies, spacing: s } })} />
      </fieldset>
      <fieldset className="card flex flex-wrap items-end gap-4 p-3">
        <legend className="px-1 text-sm font-semibold">Wavelet width</legend>
        <Choice legend="Given as" value={draft.cyclesMode} options={cycleOptions} onChange={(m) => setDraft({ cyclesMode: m })} />
        {draft.cyclesMode === 'fixed' && <NumberField label="Cycles" value={draft.cyclesFixed} step={0.5} onValue={(v) => setDraft({ cyclesFixed: v })} />}
        {draft.cyclesMode === 'range' && (
          <>
            <NumberField label="Cycles at lowest" value={draft.cyclesMin} step={0.5} testId="recipe-cycles-min" onValue={(v) => setDraft({ cyclesMin: v })} />
            <NumberField label="Cycles at highest" value={draft.cyclesMax} step={0.5} onValue={(v) => setDraft({ cyclesMax: v })} />
          </>
        )}
        {draft.cyclesMode === 'fwhm' && <NumberField label="Full width at half maximum" unit="s" value={draft.fwhmSeconds} step={0.05} onValue={(v) => setDraft({ fwhmSeconds: v })} />}
        {errorFor('cycles') && (
          <p className="basis-full text-sm text-coral-deep" role="alert" data-testid="recipe-cycles-error">
            cycles {errorFor('cycles')}
          </p>
        )}
      </fieldset>
      <ResolutionTable frequencies={draft.frequencies} cycles={draft.cyclesMode === 'fixed' ? { fixed: draft.cyclesFixed } : draft.cyclesMode === 'fwhm' ? { fwhm: draft.fwhmSeconds } : { min: draft.cyclesMin, max: draft.cyclesMax }} />
      <fieldset className="card flex flex-col gap-2 p-3">
        <legend className="px-1 text-sm font-semibold">Epochs and conditions</legend>
        <div className="flex flex-wrap items-end gap-4">
          {/* The epoch window belongs to the Source screen (its rejection rules run on it); edited here through its store. */}
          <NumberField label="Epoch from" unit="s" value={epochWindow.start} step={0.1} testId="recipe-epoch-start" error={errorFor('epochs.start')} onValue={(v) => useWorkspace.getState().setEpochWindow({ start: v, end: epochWindow.end })} />
          <NumberField label="Epoch to" unit="s" value={epochWindow.end} step={0.1} testId="recipe-epoch-end" error={errorFor('epochs.end')} onValue={(v) => useWorkspace.getState().setEpochWindow({ start: epochWindow.start, end: v })} />
          <p className="text-sm text-ink-soft">around each event; only epochs kept on the Source screen are used.</p>
        </div>
        {settingsError !== null && (
          <p className="text-sm text-coral-deep" role="alert">
            {settingsError}
          </p>
        )}
        <RecipeConditions conditions={conditions} chosen={draft.conditions} decisions={decisions} error={errorFor('conditions')} onChoose={(c) => setDraft({ conditions: c })} />
      </fieldset>
      <RecipeChannels chosen={draft.channels} candidates={candidates} brain={brain} error={errorFor('channels')} onChoose={(channels) => setDraft({ channels })} />
      <fieldset className="card flex flex-wrap items-end gap-4 p-3">
        <legend className="px-1 text-sm font-semibold">Power and phase</legend>
        <Choice
          legend="Power of"
          value={draft.trialPower ?? 'total'}
          options={[
            { value: 'total', label: 'whole epochs (total)' },
            { value: 'induced', label: 'epochs minus the evoked response (induced)' },
          ]}
          onChange={(p) => setDraft({ trialPower: p })}
        />
        <label className="flex items-center gap-1 text-sm">
          <input type="checkbox" checked={draft.itpc === true} onChange={(e) => setDraft({ itpc: e.target.checked })} data-testid="recipe-itpc" />
          inter-trial phase consistency (ITPC) beside power
        </label>
        {errorFor('trialPower') && (
          <p className="basis-full text-sm text-coral-deep" role="alert">
            trialPower {errorFor('trialPower')}
          </p>
        )}
      </fieldset>
      <RecipeGroups
        groups={draft.channelGroups ?? null}
        defaults={defaultGroupsFor(analysed)}
        error={check !== null && check.field === 'channelGroups' ? check.message || check.problem : null}
        onGroups={(channelGroups) => setDraft({ channelGroups })}
      />
      <fieldset className="card flex flex-wrap items-end gap-4 p-3">
        <legend className="px-1 text-sm font-semibold">Spectrum and aperiodic fit</legend>
        <NumberField label="Welch segment" unit="s" value={draft.spectrum.segment} step={0.25} error={errorFor('spectrum.segment')} onValue={(v) => setDraft({ spectrum: { ...draft.spectrum, segment: v } })} />
        <NumberField label="Overlap" unit="fraction" value={draft.spectrum.overlap} step={0.05} error={errorFor('spectrum.overlap')} onValue={(v) => setDraft({ spectrum: { ...draft.spectrum, overlap: v } })} />
        <NumberField label="Fit from" unit="Hz" value={fitRange[0]} step={0.5} error={errorFor('aperiodic.range')} onValue={(v) => setView({ fitRange: [v, fitRange[1]] })} />
        <NumberField label="Fit to" unit="Hz" value={fitRange[1]} step={0.5} onValue={(v) => setView({ fitRange: [fitRange[0], v] })} />
        <Choice legend="Spectrum from" value={draft.spectrum.source} options={[{ value: 'epochs', label: 'kept epochs' }, { value: 'recording', label: 'whole recording' }]} onChange={(src) => setDraft({ spectrum: { ...draft.spectrum, source: src } })} />
        <Choice legend="Aperiodic model" value={draft.aperiodic.model} options={[{ value: 'power-law', label: 'power law' }, { value: 'power-law-knee', label: 'power law with knee' }]} onChange={(m) => setDraft({ aperiodic: { ...draft.aperiodic, model: m } })} />
      </fieldset>
      {errorFor('baseline') && (
        <p className="text-sm text-coral-deep" role="alert">
          baseline {errorFor('baseline')} (set it on the Maps screen)
        </p>
      )}
      {check !== null && shownUnderTheForm(check.field) && (
        <p className="text-sm text-coral-deep" role="alert">
          {check.message}
        </p>
      )}
      <div className="flex flex-wrap items-center gap-3">
        <button type="submit" disabled={running || check !== null || localGroupProblems.length > 0} className="rounded-sm bg-kelp px-4 py-2 font-semibold text-foam hover:bg-kelp-deep disabled:opacity-50" data-testid="recipe-run">
          {cached ? (activeKey === key && !groupsChanged ? 'Shown on Maps' : groupsChanged ? 'Show with these channel groups' : 'Show (already computed)') : 'Run decomposition'}
        </button>
        {running && (
          <button type="button" className="rounded-sm border border-coral px-4 py-2 text-coral-deep" onClick={cancelDecomposition} data-testid="recipe-cancel">
            Cancel
          </button>
        )}
        <span className="text-sm text-ink-soft" role="status" data-testid="recipe-status" data-status={run.status}>
          {run.status === 'running' ? (run.message ?? 'Decomposing in workers on this device…') : (run.message ?? '')}
        </span>
        <span className="text-xs text-ink-soft">
          {fs} Hz · {recording.channelNames.length} channels · the samples stay on this device
        </span>
      </div>
      <RunProgress progress={run.progress} />
      <ComputedList cache={cache} activeKey={activeKey} />
    </form>
  );
}
