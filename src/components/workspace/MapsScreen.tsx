import { useCallback, useEffect, useLayoutEffect, useMemo } from 'react';
import type { WorkspaceProps } from './types';
import type { BaselineMethod } from '../../lib/analysis/baseline';
import { methodUnit } from '../../lib/plot/colour-scale';
import { useResultsStore, selectActive } from '../../lib/client/workspace/results';
import { evokedOf, exportedRecipe, groupsOf, isRoutineNotice, snapToGrid, trialValuesCsv, baselinePoints } from '../../lib/client/workspace/maps';
import { limitsKeyOf, mapSelectionOf, useMapView, watchMapView } from '../../lib/client/workspace/map-view';
import { useWorkspace } from '../../lib/client/workspace/store';
import MapPanel from '../explorer/MapPanel';
import NormalizedPanel from '../explorer/NormalizedPanel';
import MapControls from '../explorer/MapControls';
import MapExports, { type MapFigure } from '../explorer/MapExports';
import { LiveReadout } from '../explorer/MapSelection';
import { itpcSpecOf, normalizedSpecOf, rawSpecOf } from '../explorer/map-specs';
import { fileSafe } from '../explorer/download';
import MapPins from '../review/MapPins';
import MapNotesList from '../review/MapNotesList';
import EvokedTrace from '../explorer/EvokedTrace';
import MethodsText from '../explorer/MethodsText';

/** Why a single-trial-scope map looks nearly uniform (shown whenever that scope is). */
function singleTrialNote(method: BaselineMethod): string {
  const base =
    'Single-trial scope: every trial is divided by its own baseline before the trials are averaged. One trial’s power at one point scatters widely around its mean, so the per-trial values are noisy';
  return method === 'decibel'
    ? `${base}, and the logarithm of a noisy ratio is biased downwards (for pure noise power about −2.5 dB, 10·log10 of e^−γ; from memory) at every point alike. The map then looks nearly uniform around that offset; the trial average shows event-related changes with less bias.`
    : `${base}; their mean changes little from point to point, so the map can look nearly uniform. The trial average shows event-related changes with less noise.`;
}

/**
 * Raw and normalized time-frequency maps side by side, with the live baseline window, phase consistency and the
 * evoked trace. The controller (map-view.ts) re-normalizes; a baseline move re-renders only the bands, the baseline
 * fields and the normalized panel, never this screen.
 */
export default function MapsScreen(_props: WorkspaceProps) {
  const d = useResultsStore(selectActive);
  const trialHold = useResultsStore((s) => s.trialHold);
  const channel = useWorkspace((s) => s.channel);
  const channelGroup = useWorkspace((s) => s.channelGroup);
  const condition = useWorkspace((s) => s.condition);
  const compareTo = useWorkspace((s) => s.compareTo);
  const contrastBaseline = useWorkspace((s) => s.contrastBaseline);
  const method = useWorkspace((s) => s.method);
  const scope = useWorkspace((s) => s.scope);
  const spread = useWorkspace((s) => s.spread);
  const rawScale = useWorkspace((s) => s.rawScale);
  const heldLimits = useWorkspace((s) => s.heldLimits);
  const setView = useWorkspace((s) => s.set);

  // Before the first paint, so the normalized map is there when the screen first shows.
  useLayoutEffect(() => watchMapView(), []);
  const s = useMemo(() => (d === null ? null : mapSelectionOf(d, { channel, channelGroup, condition, compareTo, method, scope, spread })), [d, channel, channelGroup, condition, compareTo, method, scope, spread]);
  const groups = useMemo(() => (d === null ? [] : groupsOf(d).map((g) => g.name)), [d]);

  // Keep the view's selection valid for the shown decomposition.
  useEffect(() => {
    if (d === null || s === null) return;
    const patch: Parameters<typeof setView>[0] = {};
    if (channel === null || !d.channels.includes(channel)) patch.channel = d.channels[0];
    if (condition === null || !d.labels.includes(condition)) patch.condition = d.labels[0];
    if (compareTo !== null && !d.labels.includes(compareTo)) patch.compareTo = null;
    if (channelGroup !== null && s.group === null) patch.channelGroup = null;
    if (Object.keys(patch).length > 0) setView(patch);
  }, [d, s, channel, condition, compareTo, channelGroup, setView]);

  const limitsKey = limitsKeyOf(method, s?.b ?? -1, contrastBaseline, rawScale);
  const heldRaw = heldLimits !== null && heldLimits.key === limitsKey ? heldLimits.raw : null;
  const rawSpec = useMemo(() => (d === null || s === null ? null : rawSpecOf(d, s, rawScale, heldRaw)), [d, s, rawScale, heldRaw]);
  const itpcSpec = useMemo(() => (d === null || s === null ? null : itpcSpecOf(d, s)), [d, s]);
  const evoked = useMemo(() => {
    const ea = d === null || s === null ? null : evokedOf(d, s.indices, s.a);
    if (d === null || s === null || ea === null) return null;
    const eb = s.b >= 0 ? evokedOf(d, s.indices, s.b) : null;
    return [{ values: ea, label: d.labels[s.a], colour: '#10283a' }, ...(eb !== null ? [{ values: eb, label: d.labels[s.b], colour: '#2f6f5e', dashed: true }] : [])];
  }, [d, s]);
  const snap = useCallback((seconds: number) => (d === null ? seconds : snapToGrid(d, seconds)), [d]);

  if (d === null || s === null || rawSpec === null) {
    return (
      <div className="card p-4" data-testid="maps-empty">
        <p>No decomposition yet. Open a recording on the Source screen, then run a recipe on the Recipe screen.</p>
      </div>
    );
  }
  const dt = 1 / d.sampleRateHz;
  // The run's own baseline warning describes the baseline it ran with; the live one is shown beside the map.
  const runWarnings = d.warnings.filter((w) => !w.startsWith('baseline:'));
  const routine = runWarnings.filter(isRoutineNotice);
  const problems = runWarnings.filter((w) => !isRoutineNotice(w));
  const stem = `maps-${fileSafe(s.group ?? s.channel ?? 'channel')}-${fileSafe(d.labels[s.a])}${s.b >= 0 ? `-minus-${fileSafe(d.labels[s.b])}` : ''}-${method}`;

  // The exports read the live baseline and normalized map when a button is pressed.
  const figure = (): MapFigure | null => {
    const normalized = useMapView.getState().normalized;
    if (normalized === null) return null;
    const { baseline } = useWorkspace.getState();
    const normSpec = normalizedSpecOf(d, normalized, method);
    const caption = `${s.where} · baseline ${Number(baseline.start.toFixed(4))} to ${Number(baseline.end.toFixed(4))} s · ${method} · ${scope} scope · Tidemark`;
    const maps = [{ key: 'raw', label: 'raw power', spec: rawSpec }, { key: 'normalized', label: 'normalized', spec: normSpec, notes: [caption] }, ...(itpcSpec ? [{ key: 'itpc', label: 'ITPC', spec: itpcSpec }] : [])];
    return { raw: { ...rawSpec, baseline }, normalized: { ...normSpec, baseline }, caption, stem, maps };
  };
  const csvChoices = [{ key: 'raw', label: 'raw power' }, { key: 'normalized', label: 'normalized' }, ...(itpcSpec ? [{ key: 'itpc', label: 'ITPC' }] : [])];
  // The run's recipe with the live baseline and fit range: everything `npm run analyze` needs to give these numbers.
  const recipe = () => {
    const { baseline, fitRange } = useWorkspace.getState();
    return new Blob([JSON.stringify(exportedRecipe(d, { baseline, method, scope, spreadTrials: s.spreadTrials, fitRange }), null, 2) + '\n'], { type: 'application/json' });
  };
  const trialValues = async () => {
    const { bands, windows, baseline } = useWorkspace.getState();
    const csv = await trialValuesCsv(d, s.channel!, bands, windows, baseline, baselinePoints(d, baseline), method);
    return { csv, fileName: `trial-values-${fileSafe(s.channel!)}-${method}.csv` };
  };
  const holdLimits = () => {
    const normalized = useMapView.getState().normalized;
    if (heldLimits !== null) return setView({ heldLimits: null });
    if (normalized === null) return;
    setView({ heldLimits: { key: limitsKey, raw: [...rawSpec.scale.domain], normalized: [...normalized.domain] } });
  };

  return (
    <div className="flex flex-col gap-4" data-testid="maps-screen">
      <MapControls d={d} selection={s} groups={groups} limitsKey={limitsKey} onHoldLimits={holdLimits} dt={dt} snap={snap}>
        <MapExports figure={figure} csvChoices={csvChoices} recipe={recipe} channel={s.channel} trialValues={trialValues} />
      </MapControls>
      {s.useTrials && trialHold?.key === s.holdKey && trialHold.status !== 'ready' && (
        <p className={trialHold.status === 'failed' ? 'text-coral-deep' : 'text-ink-soft'} role="status">
          {trialHold.message}
        </p>
      )}
      {scope === 'trial' && s.group === null && (
        <p className="text-sm text-ink-soft" data-testid="single-trial-note">
          {singleTrialNote(method)}
        </p>
      )}
      {s.group !== null && (scope === 'trial' || s.spreadTrials) && (
        <p className="text-sm text-ink-soft" data-testid="group-scope-note">
          Single trials are kept for one channel at a time, so a group map is the mean of its channels’ trial-average maps. Pick a channel for single-trial scope.
        </p>
      )}
      {s.b >= 0 && contrastBaseline === 'shared' && s.useTrials && (
        <p className="text-sm text-ink-soft" data-testid="contrast-scope-note">
          The shared baseline applies to trial-average maps; in single-trial scope each trial keeps its own baseline.
        </p>
      )}
      <div className="grid grid-cols-1 items-start gap-3 min-[1180px]:grid-cols-2" data-testid="maps-grid">
        <div className="card p-2">
          <MapPanel testId="map-raw" spec={rawSpec} dt={dt} snap={snap} focusable={false} overlay={(g) => <MapPins geometry={g} testId="map-raw" />} />
        </div>
        {/* Two rows tall on a wide window, so the ITPC map sits straight under the raw one, beside the evoked trace. */}
        <div className="card p-2 min-[1180px]:row-span-2">
          <NormalizedPanel d={d} method={method} dt={dt} snap={snap} overlay={(g) => <MapPins geometry={g} testId="map-normalized" keyboard />} />
          {evoked !== null && <EvokedTrace testId="evoked-trace" times={d.times} series={evoked} title={`Evoked response (taken out of each epoch) · ${s.where}`} />}
        </div>
        {itpcSpec !== null && (
          <div className="card p-2">
            <MapPanel testId="map-itpc" spec={itpcSpec} dt={dt} snap={snap} focusable={false} showBaseline={false} />
            <p className="text-xs text-ink-soft" data-testid="itpc-note">
              {s.indices.length === 1
                ? `Outlined: cells where Rayleigh’s test rejects evenly spread phases over the ${d.trials[s.a]} trials (p < 0.05, Zar’s approximation; uncorrected for the many cells tested).`
                : 'A group’s ITPC is the mean of its channels’ values; Rayleigh’s test applies to one channel’s trials, so nothing is outlined here.'}
            </p>
          </div>
        )}
      </div>
      <MapNotesList />
      <LiveReadout times={d.times} frequencies={d.frequencies} raw={rawSpec.values} itpc={itpcSpec?.values ?? null} unit={methodUnit(method)} />
      {problems.length > 0 && (
        <ul className="text-sm text-coral-deep" data-testid="run-warnings">
          {problems.map((w) => (
            <li key={w}>{w}</li>
          ))}
        </ul>
      )}
      {routine.length > 0 && (
        <ul className="text-sm text-ink-soft" data-testid="run-notices">
          {routine.map((w) => (
            <li key={w}>{w}</li>
          ))}
        </ul>
      )}
      <p className="text-xs text-ink-soft">
        Hatched: the edge zone, where the wavelet at that frequency overlaps the epoch's edge (3σ). Dashed line: the event at 0 s. Colour limits are
        symmetric around the method's neutral value (a power ratio on a log scale centred on 1) and leave edge-zone cells out.
      </p>
      <MethodsText />
    </div>
  );
}
