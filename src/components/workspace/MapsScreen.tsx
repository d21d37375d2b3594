import { useEffect, useLayoutEffect, useMemo, useRef, useState } from 'react';
import type { WorkspaceProps } from './types';
import type { BaselineMethod } from '../../lib/analysis/baseline';
import { consistencyColormap, divergingColormap, sequentialColormap } from '../../lib/plot/colormap';
import { extentLimits, methodUnit, neutralValue, ratioLimits, symmetricLimits, type ColourScale } from '../../lib/plot/colour-scale';
import type { PanelSpec } from '../../lib/plot/panel';
import { requestTrialMaps, useTrialMaps } from '../../lib/client/workspace/trial-maps';
import { useResultsStore, selectActive, ensureTrials } from '../../lib/client/workspace/results';
import MapPanel, { type Cell } from '../explorer/MapPanel';
import MapPins from '../review/MapPins';
import MapNotesList from '../review/MapNotesList';
import MapSelection, { MapReadout } from '../explorer/MapSelection';
import NumberField from '../explorer/NumberField';
import Choice from '../explorer/Choice';
import { baselinePoints, baselineWarnings, difference, snapToGrid } from '../explorer/map-model';
import { channelIndicesOf, contrastOf, evokedOf, exportedRecipe, groupsOf, isRoutineNotice, itpcOf, normalizedOf, rawPowerOf, rayleighMarks, trialValuesCsv } from '../../lib/client/workspace/maps';
import EvokedTrace from '../explorer/EvokedTrace';
import { renderMapsPng } from '../explorer/export-maps';
import { downloadBlob, fileSafe } from '../explorer/download';
import { downloadCsv } from '../explorer/download-figure';
import MapExports from '../explorer/MapExports';
import MethodsText from '../explorer/MethodsText';
import { useWorkspace } from '../../lib/client/workspace/store';

const METHODS: { value: BaselineMethod; label: string }[] = [
  { value: 'decibel', label: 'dB' },
  { value: 'percent-change', label: 'percent change' },
  { value: 'z-score', label: 'z-score' },
  { value: 'power-ratio', label: 'power ratio' },
];

/** Why a single-trial-scope map looks nearly uniform (shown whenever that scope is). */
function singleTrialNote(method: BaselineMethod): string {
  const base =
    'Single-trial scope: every trial is divided by its own baseline before the trials are averaged. One trial’s power at one point scatters widely around its mean, so the per-trial values are noisy';
  return method === 'decibel'
    ? `${base}, and the logarithm of a noisy ratio is biased downwards (for pure noise power about −2.5 dB, 10·log10 of e^−γ; from memory) at every point alike. The map then looks nearly uniform around that offset; the trial average shows event-related changes with less bias.`
    : `${base}; their mean changes little from point to point, so the map can look nearly uniform. The trial average shows event-related changes with less noise.`;
}

/** Raw and normalized time-frequency maps side by side, with the live baseline window, phase consistency and the evoked trace. */
export default function MapsScreen(_props: WorkspaceProps) {
  const d = useResultsStore(selectActive);
  const trialHold = useResultsStore((s) => s.trialHold);
  const channel = useWorkspace((s) => s.channel);
  const channelGroup = useWorkspace((s) => s.channelGroup);
  const condition = useWorkspace((s) => s.condition);
  const compareTo = useWorkspace((s) => s.compareTo);
  const contrastBaseline = useWorkspace((s) => s.contrastBaseline);
  const baseline = useWorkspace((s) => s.baseline);
  const method = useWorkspace((s) => s.method);
  const scope = useWorkspace((s) => s.scope);
  const spread = useWorkspace((s) => s.spread);
  const rawScale = useWorkspace((s) => s.rawScale);
  const heldLimits = useWorkspace((s) => s.heldLimits);
  const setView = useWorkspace((s) => s.set);
  const setBaseline = useWorkspace((s) => s.setBaseline);
  const [cursor, setCursor] = useState<Cell | null>(null);
  const [trialExport, setTrialExport] = useState<{ busy: boolean; problem: string | null }>({ busy: false, problem: null });
  const trialMaps = useTrialMaps((s) => s.latest);
  // Buffers the average-scope maps are re-normalized into while the band moves (one channel: no allocation per move).
  const buffers = useRef<{ a: Float64Array; b: Float64Array; diff: Float64Array } | null>(null);

  const groups = useMemo(() => (d === null ? [] : groupsOf(d)), [d]);
  const group = channelGroup !== null && groups.some((g) => g.name === channelGroup) ? channelGroup : null;
  const selection = useMemo(() => {
    if (d === null) return null;
    try {
      return channelIndicesOf(d, channel, group);
    } catch {
      return channelIndicesOf(d, channel, null);
    }
  }, [d, channel, group]);
  // Across-trials z-scores need every trial's baseline: they come from the held trials, like single-trial scope.
  const spreadTrials = method === 'z-score' && spread === 'trials';
  // The worker holds one channel's trials: a group map is always the mean of the channels' trial-average maps.
  const useTrials = (scope === 'trial' || spreadTrials) && group === null;
  const ci = selection === null ? -1 : selection.indices[0];
  const ch = d === null || selection === null ? null : group === null ? d.channels[ci] : null;
  const where = selection?.label ?? '';
  const a = d === null ? -1 : Math.max(0, condition === null ? 0 : d.labels.indexOf(condition));
  const bRaw = d === null || compareTo === null ? -1 : d.labels.indexOf(compareTo);
  const b = bRaw === a ? -1 : bRaw;
  const points = d === null ? { first: 0, last: 0 } : baselinePoints(d, baseline);
  const holdKey = d === null || ch === null ? null : `${d.key}|${ch}`;
  const induced = d?.recipe.trialPower === 'induced';

  // Keep the view's selection valid for the shown decomposition.
  useEffect(() => {
    if (d === null) return;
    const patch: Parameters<typeof setView>[0] = {};
    if (channel === null || !d.channels.includes(channel)) patch.channel = d.channels[0];
    if (condition === null || !d.labels.includes(condition)) patch.condition = d.labels[0];
    if (compareTo !== null && !d.labels.includes(compareTo)) patch.compareTo = null;
    if (channelGroup !== null && group === null) patch.channelGroup = null;
    if (Object.keys(patch).length > 0) setView(patch);
  }, [d, channel, condition, compareTo, channelGroup, group, setView]);

  // Single-trial scope: the worker holds this channel's trials; ask it for the maps whenever the baseline moves.
  useEffect(() => {
    if (d === null || ch === null || !useTrials) return;
    // The whole recording: the decomposition's recipe carries the conditions and rejection the core applies.
    const recording = useWorkspace.getState().recording;
    if (recording !== null) void ensureTrials(d, ch, recording);
  }, [d, ch, useTrials]);
  useEffect(() => {
    if (!useTrials || holdKey === null || trialHold?.key !== holdKey || trialHold.status !== 'ready') return;
    requestTrialMaps({ key: holdKey, first: points.first, last: points.last, method, spread: spreadTrials ? 'trials' : 'time' });
  }, [useTrials, spreadTrials, holdKey, trialHold, points.first, points.last, method]);

  const nf = d === null ? 0 : d.frequencies.length;
  const nt = d === null ? 0 : d.times.length;
  const indices = selection?.indices ?? [];
  const indexKey = indices.join(',');

  const limitsKey = `${method}|${b >= 0 ? `difference ${contrastBaseline}` : 'single'}|${rawScale}`;
  const rawSpec = useMemo((): PanelSpec | null => {
    if (d === null || selection === null) return null;
    const pa = rawPowerOf(d, selection.indices, a);
    const values = b >= 0 ? difference(new Float64Array(nf * nt), pa, rawPowerOf(d, selection.indices, b)) : pa;
    const kind = b >= 0 ? 'linear' : rawScale;
    const held = heldLimits !== null && heldLimits.key === limitsKey ? heldLimits.raw : null;
    const scale: ColourScale = { domain: held ?? (b >= 0 ? symmetricLimits(values, 0, d.mask) : extentLimits(values, rawScale, d.mask)), kind };
    const power = induced ? 'Induced power' : 'Raw power';
    return {
      title: b >= 0 ? `${power} ${d.labels[a]} − ${d.labels[b]} · ${where}` : `${power} · ${d.labels[a]} · ${where}`,
      unit: 'µV²',
      values,
      times: d.times,
      frequencies: d.frequencies,
      spacing: d.spacing,
      edges: d.edges,
      colormap: b >= 0 ? divergingColormap() : sequentialColormap(),
      scale,
    };
    // eslint-disable-next-line react-hooks/exhaustive-deps
  }, [d, indexKey, a, b, rawScale, where, nf, nt, heldLimits, limitsKey, induced]);

  // Average scope: re-normalized here in the controller's functions on every baseline move (F × T per channel).
  const averageNorm = useMemo((): Float64Array | null => {
    if (d === null || selection === null || useTrials) return null;
    if (buffers.current === null || buffers.current.a.length !== nf * nt) buffers.current = { a: new Float64Array(nf * nt), b: new Float64Array(nf * nt), diff: new Float64Array(nf * nt) };
    const buf = buffers.current;
    if (b < 0) return normalizedOf(d, selection.indices, a, points, method, buf.a);
    if (contrastBaseline === 'shared') return contrastOf(d, selection.indices, a, b, points, method, 'shared');
    const na = normalizedOf(d, selection.indices, a, points, method, buf.a);
    return difference(buf.diff, na, normalizedOf(d, selection.indices, b, points, method, buf.b));
    // eslint-disable-next-line react-hooks/exhaustive-deps
  }, [d, indexKey, a, b, points.first, points.last, method, contrastBaseline, useTrials, nf, nt]);

  // Single-trial scope: the worker's maps, A − B made once per new answer (not at every render, e.g. a cursor move).
  const trialNorm = useMemo(
    () => (trialMaps === null ? null : b >= 0 ? difference(new Float64Array(nf * nt), trialMaps.maps[a], trialMaps.maps[b]) : trialMaps.maps[a]),
    [trialMaps, a, b, nf, nt],
  );
  let normValues: Float64Array | null = averageNorm;
  let normFresh = true;
  if (useTrials && trialMaps !== null && trialMaps.key === holdKey) {
    normFresh = trialMaps.first === points.first && trialMaps.last === points.last && trialMaps.method === method && trialMaps.spread === (spreadTrials ? 'trials' : 'time');
    normValues = trialNorm;
  }
  const neutral = b >= 0 ? 0 : neutralValue(method);
  // A power ratio is drawn on a log scale centred on 1, so a halving looks as strong as a doubling.
  const ratioScale = b < 0 && method === 'power-ratio';
  const heldNorm = heldLimits !== null && heldLimits.key === limitsKey ? heldLimits.normalized : null;
  const contrastWords = b >= 0 ? ` · ${useTrials || contrastBaseline === 'own' ? 'own baselines' : 'shared baseline'}` : '';
  const normSpec: PanelSpec | null =
    d === null || normValues === null
      ? null
      : {
          title: `${b >= 0 ? `${d.labels[a]} − ${d.labels[b]}` : d.labels[a]} · ${METHODS.find((m) => m.value === method)!.label} · ${useTrials && scope === 'trial' ? 'single-trial' : 'trial-average'}${induced ? ' · induced' : ''}${spreadTrials && useTrials ? ' · S across trials' : ''}${contrastWords} · ${where}`,
          unit: methodUnit(method),
          values: normValues,
          times: d.times,
          frequencies: d.frequencies,
          spacing: d.spacing,
          edges: d.edges,
          colormap: divergingColormap(),
          scale: { domain: heldNorm ?? (ratioScale ? ratioLimits(normValues, d.mask) : symmetricLimits(normValues, neutral, d.mask)), kind: ratioScale ? 'log' : 'linear' },
        };

  // Phase consistency of condition A on its own 0–1 scale; Rayleigh p < 0.05 outlined for a single channel.
  const itpcSpec = useMemo((): PanelSpec | null => {
    if (d === null || selection === null) return null;
    const values = itpcOf(d, selection.indices, a);
    if (values === null) return null;
    return {
      title: `ITPC · ${d.labels[a]} · ${where}`,
      unit: 'ITPC',
      values,
      times: d.times,
      frequencies: d.frequencies,
      spacing: d.spacing,
      edges: d.edges,
      colormap: consistencyColormap(),
      scale: { domain: [0, 1], kind: 'linear' },
      outline: selection.indices.length === 1 ? rayleighMarks(values, d.trials[a]) : null,
    };
    // eslint-disable-next-line react-hooks/exhaustive-deps
  }, [d, indexKey, a, where]);

  const evoked = useMemo(() => {
    if (d === null || selection === null) return null;
    const ea = evokedOf(d, selection.indices, a);
    if (ea === null) return null;
    const eb = b >= 0 ? evokedOf(d, selection.indices, b) : null;
    return [
      { values: ea, label: d.labels[a], colour: '#10283a' },
      ...(eb !== null ? [{ values: eb, label: d.labels[b], colour: '#2f6f5e', dashed: true }] : []),
    ];
    // eslint-disable-next-line react-hooks/exhaustive-deps
  }, [d, indexKey, a, b]);

  const holdLimits = () => {
    if (heldLimits !== null) return setView({ heldLimits: null });
    if (rawSpec === null || normSpec === null) return;
    setView({ heldLimits: { key: limitsKey, raw: [...rawSpec.scale.domain], normalized: [...normSpec.scale.domain] } });
  };

  // Both panels have painted (children's layout effects run first): close the User Timing measure.
  useLayoutEffect(() => {
    if (normSpec === null || !normFresh) return;
    if (performance.getEntriesByName('tidemark:baseline-input', 'mark').length === 0) return;
    performance.measure('tidemark:renormalize', 'tidemark:baseline-input');
    performance.clearMarks('tidemark:baseline-input');
  });

  if (d === null) {
    return (
      <div className="card p-4" data-testid="maps-empty">
        <p>No decomposition yet. Open a recording on the Source screen, then run a recipe on the Recipe screen.</p>
      </div>
    );
  }
  const warnings = baselineWarnings(d, points, baseline.end, method);
  // The run's own baseline warning describes the baseline it ran with; the live one is shown beside the map.
  const runWarnings = d.warnings.filter((w) => !w.startsWith('baseline:'));
  const routine = runWarnings.filter(isRoutineNotice);
  const problems = runWarnings.filter((w) => !isRoutineNotice(w));
  const dt = 1 / d.sampleRateHz;
  const snap = (s: number) => snapToGrid(d, s);
  const cell = cursor;
  const readout =
    cell === null || rawSpec === null
      ? null
      : {
          t: d.times[cell.t],
          f: d.frequencies[cell.f],
          raw: rawSpec.values[cell.f * nt + cell.t],
          norm: normValues === null ? NaN : normValues[cell.f * nt + cell.t],
          ...(itpcSpec !== null ? { itpc: itpcSpec.values[cell.f * nt + cell.t] } : {}),
        };

  const caption = `${where} · baseline ${Number(baseline.start.toFixed(4))} to ${Number(baseline.end.toFixed(4))} s · ${method} · ${scope} scope · Tidemark`;
  const stem = `maps-${fileSafe(group ?? ch ?? 'channel')}-${fileSafe(d.labels[a])}${b >= 0 ? `-minus-${fileSafe(d.labels[b])}` : ''}-${method}`;
  const exportPng = async () => {
    if (rawSpec === null || normSpec === null) return;
    const blob = await renderMapsPng({ ...rawSpec, baseline }, { ...normSpec, baseline }, caption);
    downloadBlob(blob, `${stem}.png`);
  };
  const exportRecipe = () => {
    // The run's recipe with the live baseline and fit range: everything `npm run analyze` needs to give these numbers.
    const recipe = exportedRecipe(d, { baseline, method, scope, spreadTrials, fitRange: useWorkspace.getState().fitRange });
    downloadBlob(new Blob([JSON.stringify(recipe, null, 2) + '\n'], { type: 'application/json' }), 'recipe.json');
  };

  const exportTrialValues = async () => {
    if (ch === null) return;
    setTrialExport({ busy: true, problem: null });
    try {
      const { bands, windows } = useWorkspace.getState();
      const csv = await trialValuesCsv(d, ch, bands, windows, baseline, points, method);
      downloadCsv(csv, `trial-values-${fileSafe(ch)}-${method}.csv`);
      setTrialExport({ busy: false, problem: null });
    } catch (error) {
      setTrialExport({ busy: false, problem: `Per-trial values of ${ch} could not be made: ${error instanceof Error ? error.message : String(error)}` });
    }
  };

  return (
    <div className="flex flex-col gap-4" data-testid="maps-screen">
      <div className="card flex flex-wrap items-end gap-4 p-3">
        <MapSelection d={d} channel={ch ?? d.channels[Math.max(0, ci)]} a={a} b={b} groups={groups.map((g) => g.name)} group={group} onView={setView} />
        {b >= 0 && (
          <Choice
            legend="A − B normalized against"
            value={contrastBaseline}
            options={[
              { value: 'own', label: 'own baseline' },
              { value: 'shared', label: 'shared baseline' },
            ]}
            onChange={(c) => setView({ contrastBaseline: c })}
          />
        )}
        <Choice legend="Method" value={method} options={METHODS} onChange={(m) => setView({ method: m })} />
        {method === 'z-score' && (
          <Choice legend="z-score spread" value={spread} options={[{ value: 'time', label: 'over baseline time' }, { value: 'trials', label: 'across trials' }]} onChange={(s) => setView({ spread: s })} />
        )}
        <Choice legend="Scope" value={scope} options={[{ value: 'average', label: 'trial average' }, { value: 'trial', label: 'single trial' }]} onChange={(s) => setView({ scope: s })} />
        <label className="flex items-center gap-1 text-sm" title="Keep the colour limits fixed while you switch channels and conditions, so maps can be compared">
          <input type="checkbox" checked={heldLimits !== null} onChange={holdLimits} data-testid="hold-limits" />
          same colour limits for every map{heldLimits !== null && heldLimits.key !== limitsKey ? ' (taken for another method or view: not applied)' : ''}
        </label>
        <Choice legend="Raw colour scale" value={rawScale} options={[{ value: 'log', label: 'log' }, { value: 'linear', label: 'linear' }]} onChange={(s) => setView({ rawScale: s })} />
        <NumberField label="Baseline start" unit="s" value={baseline.start} step={dt} testId="baseline-start" onValue={(v) => setBaseline({ start: snap(Math.min(v, baseline.end)), end: baseline.end })} />
        <NumberField label="Baseline end" unit="s" value={baseline.end} step={dt} testId="baseline-end" onValue={(v) => setBaseline({ start: baseline.start, end: snap(Math.max(v, baseline.start)) })} />
        <div className="flex flex-wrap items-end gap-2">
          <button type="button" className="rounded-sm border border-kelp px-3 py-1 text-sm text-kelp-deep hover:bg-kelp-pale" onClick={() => void exportPng()} data-testid="export-png">
            Export PNG
          </button>
          <MapExports raw={rawSpec && { ...rawSpec, baseline }} normalized={normSpec && { ...normSpec, baseline }} caption={caption} stem={stem} maps={[...(rawSpec ? [{ key: 'raw', label: 'raw power', spec: rawSpec }] : []), ...(normSpec ? [{ key: 'normalized', label: 'normalized', spec: normSpec, notes: [caption] }] : []), ...(itpcSpec ? [{ key: 'itpc', label: 'ITPC', spec: itpcSpec }] : [])]} />
          <button type="button" className="rounded-sm border border-kelp px-3 py-1 text-sm text-kelp-deep hover:bg-kelp-pale" onClick={exportRecipe} data-testid="export-recipe">
            Export recipe JSON
          </button>
          <button
            type="button"
            className="rounded-sm border border-kelp px-3 py-1 text-sm text-kelp-deep hover:bg-kelp-pale disabled:opacity-50"
            onClick={() => void exportTrialValues()}
            disabled={ch === null || trialExport.busy}
            title={ch === null ? 'Per-trial values come from one channel’s single trials: pick a channel' : 'Each trial normalized by its own baseline, averaged over each band (Bands screen) × window, one row per trial'}
            data-testid="export-trial-values"
          >
            {trialExport.busy ? 'Making per-trial values…' : 'Export per-trial values (CSV)'}
          </button>
        </div>
        {trialExport.problem !== null && (
          <p className="basis-full text-sm text-coral-deep" role="alert" data-testid="trial-values-problem">
            {trialExport.problem}
          </p>
        )}
      </div>
      {useTrials && trialHold?.key === holdKey && trialHold.status !== 'ready' && (
        <p className={trialHold.status === 'failed' ? 'text-coral-deep' : 'text-ink-soft'} role="status">
          {trialHold.message}
        </p>
      )}
      {scope === 'trial' && group === null && (
        <p className="text-sm text-ink-soft" data-testid="single-trial-note">
          {singleTrialNote(method)}
        </p>
      )}
      {group !== null && (scope === 'trial' || spreadTrials) && (
        <p className="text-sm text-ink-soft" data-testid="group-scope-note">
          Single trials are kept for one channel at a time, so a group map is the mean of its channels’ trial-average maps. Pick a channel for single-trial scope.
        </p>
      )}
      {b >= 0 && contrastBaseline === 'shared' && useTrials && (
        <p className="text-sm text-ink-soft" data-testid="contrast-scope-note">
          The shared baseline applies to trial-average maps; in single-trial scope each trial keeps its own baseline.
        </p>
      )}
      <div className="grid grid-cols-1 items-start gap-3 min-[1180px]:grid-cols-2" data-testid="maps-grid">
        {rawSpec !== null && (
          <div className="card p-2">
            <MapPanel testId="map-raw" spec={rawSpec} baseline={baseline} dt={dt} snap={snap} onBaseline={setBaseline} focusable={false} cursor={cursor} onCursor={setCursor} overlay={(g) => <MapPins geometry={g} testId="map-raw" />} />
          </div>
        )}
        {/* Two rows tall on a wide window, so the ITPC map sits straight under the raw one, beside the evoked trace. */}
        <div className="card p-2 min-[1180px]:row-span-2">
          {normSpec !== null ? (
            <MapPanel testId="map-normalized" spec={normSpec} baseline={baseline} dt={dt} snap={snap} onBaseline={setBaseline} focusable cursor={cursor} onCursor={setCursor} warnings={warnings} overlay={(g) => <MapPins geometry={g} testId="map-normalized" keyboard />} />
          ) : (
            <p className="p-4 text-ink-soft">Preparing single-trial maps…</p>
          )}
          {evoked !== null && <EvokedTrace testId="evoked-trace" times={d.times} series={evoked} title={`Evoked response (taken out of each epoch) · ${where}`} />}
        </div>
        {itpcSpec !== null && (
          <div className="card p-2">
            <MapPanel testId="map-itpc" spec={itpcSpec} baseline={baseline} dt={dt} snap={snap} onBaseline={setBaseline} focusable={false} cursor={cursor} onCursor={setCursor} showBaseline={false} />
            <p className="text-xs text-ink-soft" data-testid="itpc-note">
              {selection !== null && selection.indices.length === 1
                ? `Outlined: cells where Rayleigh’s test rejects evenly spread phases over the ${d.trials[a]} trials (p < 0.05, Zar’s approximation; uncorrected for the many cells tested).`
                : 'A group’s ITPC is the mean of its channels’ values; Rayleigh’s test applies to one channel’s trials, so nothing is outlined here.'}
            </p>
          </div>
        )}
      </div>
      <MapNotesList />
      <MapReadout readout={readout} fresh={normFresh} unit={methodUnit(method)} />
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
