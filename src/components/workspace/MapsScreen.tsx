import { useEffect, useLayoutEffect, useMemo, useRef, useState } from 'react';
import type { WorkspaceProps } from './types';
import type { BaselineMethod, BaselineSpread } from '../../lib/analysis/baseline';
import { divergingColormap, sequentialColormap } from '../../lib/plot/colormap';
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
import { averageNormalized, baselinePoints, baselineWarnings, difference, snapToGrid } from '../explorer/map-model';
import { renderMapsPng } from '../explorer/export-maps';
import { downloadBlob, fileSafe } from '../explorer/download';
import { useWorkspace } from '../../lib/client/workspace/store';

const METHODS: { value: BaselineMethod; label: string }[] = [
  { value: 'decibel', label: 'dB' },
  { value: 'percent-change', label: 'percent change' },
  { value: 'z-score', label: 'z-score' },
  { value: 'power-ratio', label: 'power ratio' },
];

/** Raw and normalized time-frequency maps side by side, with the live baseline window. */
export default function MapsScreen(_props: WorkspaceProps) {
  const d = useResultsStore(selectActive);
  const trialHold = useResultsStore((s) => s.trialHold);
  const channel = useWorkspace((s) => s.channel);
  const condition = useWorkspace((s) => s.condition);
  const compareTo = useWorkspace((s) => s.compareTo);
  const baseline = useWorkspace((s) => s.baseline);
  const method = useWorkspace((s) => s.method);
  const scope = useWorkspace((s) => s.scope);
  const spread = useWorkspace((s) => s.spread);
  // Across-trials z-scores need every trial's baseline: they come from the held trials, like single-trial scope.
  const spreadTrials = method === 'z-score' && spread === 'trials';
  const useTrials = scope === 'trial' || spreadTrials;
  const rawScale = useWorkspace((s) => s.rawScale);
  const heldLimits = useWorkspace((s) => s.heldLimits);
  const setView = useWorkspace((s) => s.set);
  const setBaseline = useWorkspace((s) => s.setBaseline);
  const [cursor, setCursor] = useState<Cell | null>(null);
  const trialMaps = useTrialMaps((s) => s.latest);
  const buffers = useRef<{ a: Float64Array; b: Float64Array; diff: Float64Array; rawDiff: Float64Array } | null>(null);

  const ci = d === null ? -1 : Math.max(0, channel === null ? 0 : d.channels.indexOf(channel));
  const ch = d === null ? null : d.channels[ci];
  const a = d === null ? -1 : Math.max(0, condition === null ? 0 : d.labels.indexOf(condition));
  const bRaw = d === null || compareTo === null ? -1 : d.labels.indexOf(compareTo);
  const b = bRaw === a ? -1 : bRaw;
  const points = d === null ? { first: 0, last: 0 } : baselinePoints(d, baseline);
  const holdKey = d === null || ch === null ? null : `${d.key}|${ch}`;

  // Keep the view's selection valid for the shown decomposition.
  useEffect(() => {
    if (d === null) return;
    const patch: Parameters<typeof setView>[0] = {};
    if (channel === null || !d.channels.includes(channel)) patch.channel = d.channels[0];
    if (condition === null || !d.labels.includes(condition)) patch.condition = d.labels[0];
    if (compareTo !== null && !d.labels.includes(compareTo)) patch.compareTo = null;
    if (Object.keys(patch).length > 0) setView(patch);
  }, [d, channel, condition, compareTo, setView]);

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
  if (d !== null && (buffers.current === null || buffers.current.a.length !== nf * nt)) {
    const n = nf * nt;
    buffers.current = { a: new Float64Array(n), b: new Float64Array(n), diff: new Float64Array(n), rawDiff: new Float64Array(n) };
  }

  const limitsKey = `${method}|${b >= 0 ? 'difference' : 'single'}|${rawScale}`;
  const rawSpec = useMemo((): PanelSpec | null => {
    if (d === null || buffers.current === null) return null;
    const pa = d.power[ci][a];
    const values = b >= 0 ? difference(new Float64Array(nf * nt), pa, d.power[ci][b]) : pa;
    const kind = b >= 0 ? 'linear' : rawScale;
    const held = heldLimits !== null && heldLimits.key === limitsKey ? heldLimits.raw : null;
    const scale: ColourScale = { domain: held ?? (b >= 0 ? symmetricLimits(values, 0, d.mask) : extentLimits(values, rawScale, d.mask)), kind };
    return {
      title: b >= 0 ? `Raw power ${d.labels[a]} − ${d.labels[b]} · ${ch}` : `Raw power · ${d.labels[a]} · ${ch}`,
      unit: 'µV²',
      values,
      times: d.times,
      frequencies: d.frequencies,
      spacing: d.spacing,
      edges: d.edges,
      colormap: b >= 0 ? divergingColormap() : sequentialColormap(),
      scale,
    };
  }, [d, ci, a, b, rawScale, ch, nf, nt, heldLimits, limitsKey]);

  let normValues: Float64Array | null = null;
  let normFresh = true;
  if (d !== null && buffers.current !== null) {
    const buf = buffers.current;
    if (!useTrials) {
      const na = averageNormalized(buf.a, d.power[ci][a], nt, points, method);
      normValues = b >= 0 ? difference(buf.diff, na, averageNormalized(buf.b, d.power[ci][b], nt, points, method)) : na;
    } else if (trialMaps !== null && trialMaps.key === holdKey) {
      normFresh = trialMaps.first === points.first && trialMaps.last === points.last && trialMaps.method === method && trialMaps.spread === (spreadTrials ? 'trials' : 'time');
      const na = trialMaps.maps[a];
      normValues = b >= 0 ? difference(buf.diff, na, trialMaps.maps[b]) : na;
    }
  }
  const neutral = b >= 0 ? 0 : neutralValue(method);
  // A power ratio is drawn on a log scale centred on 1, so a halving looks as strong as a doubling.
  const ratioScale = b < 0 && method === 'power-ratio';
  const heldNorm = heldLimits !== null && heldLimits.key === limitsKey ? heldLimits.normalized : null;
  const normSpec: PanelSpec | null =
    d === null || normValues === null
      ? null
      : {
          title: `${b >= 0 ? `${d.labels[a]} − ${d.labels[b]}` : d.labels[a]} · ${METHODS.find((m) => m.value === method)!.label} · ${scope === 'trial' ? 'single-trial' : 'trial-average'}${spreadTrials ? ' · S across trials' : ''} · ${ch}`,
          unit: methodUnit(method),
          values: normValues,
          times: d.times,
          frequencies: d.frequencies,
          spacing: d.spacing,
          edges: d.edges,
          colormap: divergingColormap(),
          scale: { domain: heldNorm ?? (ratioScale ? ratioLimits(normValues, d.mask) : symmetricLimits(normValues, neutral, d.mask)), kind: ratioScale ? 'log' : 'linear' },
        };
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
  // The run's own baseline warning describes the baseline it ran with; the live one is drawn on the map.
  const runWarnings = d.warnings.filter((w) => !w.startsWith('baseline:'));
  const dt = 1 / d.sampleRateHz;
  const snap = (s: number) => snapToGrid(d, s);
  const cell = cursor;
  const readout =
    cell === null || rawSpec === null
      ? null
      : { t: d.times[cell.t], f: d.frequencies[cell.f], raw: rawSpec.values[cell.f * nt + cell.t], norm: normValues === null ? NaN : normValues[cell.f * nt + cell.t] };

  const exportPng = async () => {
    if (rawSpec === null || normSpec === null) return;
    const caption = `${ch} · baseline ${Number(baseline.start.toFixed(4))} to ${Number(baseline.end.toFixed(4))} s · ${method} · ${scope} scope · Tidemark`;
    const blob = await renderMapsPng({ ...rawSpec, baseline }, { ...normSpec, baseline }, caption);
    downloadBlob(blob, `maps-${fileSafe(ch ?? 'channel')}-${fileSafe(d.labels[a])}${b >= 0 ? `-minus-${fileSafe(d.labels[b])}` : ''}-${method}.png`);
  };
  const exportRecipe = () => {
    // The run's recipe with the live baseline and fit range: everything `npm run analyze` needs to give these numbers.
    const { fitRange } = useWorkspace.getState();
    const recipe = { ...d.recipe, baseline: { start: baseline.start, end: baseline.end, method, scope, ...(spreadTrials ? { spread: 'trials' } : {}) }, aperiodic: { ...d.recipe.aperiodic, range: [fitRange[0], fitRange[1]] } };
    downloadBlob(new Blob([JSON.stringify(recipe, null, 2) + '\n'], { type: 'application/json' }), 'recipe.json');
  };

  return (
    <div className="flex flex-col gap-4" data-testid="maps-screen">
      <div className="card flex flex-wrap items-end gap-4 p-3">
        <MapSelection d={d} channel={ch ?? ''} a={a} b={b} onView={setView} />
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
        <div className="flex gap-2">
          <button type="button" className="rounded-sm border border-kelp px-3 py-1 text-sm text-kelp-deep hover:bg-kelp-pale" onClick={() => void exportPng()} data-testid="export-png">
            Export PNG
          </button>
          <button type="button" className="rounded-sm border border-kelp px-3 py-1 text-sm text-kelp-deep hover:bg-kelp-pale" onClick={exportRecipe} data-testid="export-recipe">
            Export recipe JSON
          </button>
        </div>
      </div>
      {useTrials && trialHold?.key === holdKey && trialHold.status !== 'ready' && (
        <p className={trialHold.status === 'failed' ? 'text-coral-deep' : 'text-ink-soft'} role="status">
          {trialHold.message}
        </p>
      )}
      <div className="@container">
      <div className="grid grid-cols-1 gap-3 @3xl:grid-cols-2">
        {rawSpec !== null && (
          <div className="card p-2">
            <MapPanel testId="map-raw" spec={rawSpec} baseline={baseline} dt={dt} snap={snap} onBaseline={setBaseline} focusable={false} cursor={cursor} onCursor={setCursor} overlay={(g) => <MapPins geometry={g} testId="map-raw" />} />
          </div>
        )}
        <div className="card p-2">
          {normSpec !== null ? (
            <MapPanel testId="map-normalized" spec={normSpec} baseline={baseline} dt={dt} snap={snap} onBaseline={setBaseline} focusable cursor={cursor} onCursor={setCursor} warnings={warnings} overlay={(g) => <MapPins geometry={g} testId="map-normalized" keyboard />} />
          ) : (
            <p className="p-4 text-ink-soft">Preparing single-trial maps…</p>
          )}
        </div>
      </div>
      </div>
      <MapNotesList />
      <MapReadout readout={readout} fresh={normFresh} unit={methodUnit(method)} />
      {runWarnings.length > 0 && (
        <ul className="text-sm text-coral-deep">
          {runWarnings.map((w) => (
            <li key={w}>{w}</li>
          ))}
        </ul>
      )}
      <p className="text-xs text-ink-soft">
        Hatched: the edge zone, where the wavelet at that frequency overlaps the epoch's edge (3σ). Dashed line: the event at 0 s. Colour limits are
        symmetric around the method's neutral value (a power ratio on a log scale centred on 1) and leave edge-zone cells out.
      </p>
    </div>
  );
}
