// The Maps screen's live state, kept by the controller so the screen only paints: which channels and conditions
// are shown, and the normalized map re-made whenever the baseline, method or selection changes. A baseline move
// re-normalizes here, in the store's own notification (average scope: F × T per channel into reused buffers;
// single-trial scope: the explorer worker), and only the components that read the normalized map re-render.
import { create } from 'zustand';
import type { BaselineMethod } from '../../analysis/baseline';
import { extentLimits, ratioLimits, symmetricLimits, neutralValue } from '../../plot/colour-scale';
import { baselinePoints, baselineWarnings, channelIndicesOf, contrastOf, difference, groupsOf, normalizedOf, rawPowerOf } from './maps';
import { ensureTrials, selectActive, useResultsStore, type Decomposition, type TrialHold } from './results';
import { useWorkspace, type WorkspaceState } from './store';
import { requestTrialMaps, useTrialMaps, type TrialMaps } from './trial-maps';

export const METHODS: { value: BaselineMethod; label: string }[] = [
  { value: 'decibel', label: 'dB' },
  { value: 'percent-change', label: 'percent change' },
  { value: 'z-score', label: 'z-score' },
  { value: 'power-ratio', label: 'power ratio' },
];

/** What the maps show: the channels averaged, condition A (and B of A − B), and where the normalized map comes from. */
export interface MapSelection {
  indices: number[];
  /** The channel or the group with its channels, as titles name it. */
  where: string;
  /** The group shown, or null for one channel. */
  group: string | null;
  /** The one channel shown, or null for a group. */
  channel: string | null;
  a: number;
  /** Condition B of A − B, or −1. */
  b: number;
  /** z-scores with S across trials: made from the held single trials, like single-trial scope. */
  spreadTrials: boolean;
  /** The normalized map comes from the explorer worker's held single trials (one channel only). */
  useTrials: boolean;
  /** `${decomposition key}|${channel}` of the held trials, or null for a group. */
  holdKey: string | null;
}

type ViewFields = Pick<WorkspaceState, 'channel' | 'channelGroup' | 'condition' | 'compareTo' | 'method' | 'scope' | 'spread'>;

/** The selection for the view's choices on `d` (an unknown channel, group or condition falls back to the first). */
export function mapSelectionOf(d: Decomposition, view: ViewFields): MapSelection {
  const group = view.channelGroup !== null && groupsOf(d).some((g) => g.name === view.channelGroup) ? view.channelGroup : null;
  let picked: ReturnType<typeof channelIndicesOf>;
  try {
    picked = channelIndicesOf(d, view.channel, group);
  } catch {
    picked = channelIndicesOf(d, view.channel, null);
  }
  const shownGroup = picked.group === null ? null : group;
  const channel = shownGroup === null ? d.channels[picked.indices[0]] : null;
  const a = Math.max(0, view.condition === null ? 0 : d.labels.indexOf(view.condition));
  const bRaw = view.compareTo === null ? -1 : d.labels.indexOf(view.compareTo);
  const spreadTrials = view.method === 'z-score' && view.spread === 'trials';
  const useTrials = (view.scope === 'trial' || spreadTrials) && shownGroup === null;
  return { indices: picked.indices, where: picked.label, group: shownGroup, channel, a, b: bRaw === a ? -1 : bRaw, spreadTrials, useTrials, holdKey: channel === null ? null : `${d.key}|${channel}` };
}

/** The key of the held colour limits for a method and view (limits taken for another key are not applied). */
export function limitsKeyOf(method: BaselineMethod, b: number, contrastBaseline: 'own' | 'shared', rawScale: 'linear' | 'log'): string {
  return `${method}|${b >= 0 ? `difference ${contrastBaseline}` : 'single'}|${rawScale}`;
}

/** The raw (or induced) power map of the selection, A − B for a difference, with its colour limits. */
export function rawMapOf(d: Decomposition, s: MapSelection, rawScale: 'linear' | 'log', held: [number, number] | null) {
  const nt = d.times.length;
  const pa = rawPowerOf(d, s.indices, s.a);
  const values = s.b >= 0 ? difference(new Float64Array(d.frequencies.length * nt), pa, rawPowerOf(d, s.indices, s.b)) : pa;
  const power = d.recipe.trialPower === 'induced' ? 'Induced power' : 'Raw power';
  return {
    title: s.b >= 0 ? `${power} ${d.labels[s.a]} − ${d.labels[s.b]} · ${s.where}` : `${power} · ${d.labels[s.a]} · ${s.where}`,
    values,
    domain: held ?? (s.b >= 0 ? symmetricLimits(values, 0, d.mask) : extentLimits(values, rawScale, d.mask)),
    kind: s.b >= 0 ? ('linear' as const) : rawScale,
  };
}

/** The normalized map as painted: a new object for every new picture (the values may live in a reused buffer). */
export interface NormalizedMap {
  values: Float64Array;
  domain: [number, number];
  kind: 'linear' | 'log';
  title: string;
}

export interface MapViewState {
  normalized: NormalizedMap | null;
  /** False while single-trial maps for the current baseline are being made (the shown map is the previous one). */
  fresh: boolean;
  /** Baseline problems (edge zone, past the event, too short for a z-score); the same array while they stay the same. */
  warnings: string[];
}

export const useMapView = create<MapViewState>(() => ({ normalized: null, fresh: true, warnings: [] }));

/** The map cell under the pointer or the keyboard cursor (view only: not an edit, not saved). */
export const useMapCursor = create<{ cell: { f: number; t: number } | null }>(() => ({ cell: null }));
export const setMapCursor = (cell: { f: number; t: number } | null): void => useMapCursor.setState({ cell });

/** Closes the User Timing measure of a baseline input (opened by `setBaseline`) once its map is on screen. */
export function closeRenormalizeMeasure(): void {
  if (typeof performance === 'undefined' || performance.getEntriesByName('tidemark:baseline-input', 'mark').length === 0) return;
  performance.measure('tidemark:renormalize', 'tidemark:baseline-input');
  performance.clearMarks('tidemark:baseline-input');
}

// What the last normalized map was made from, so a store change that does not touch it costs a string compare.
let madeFrom = '';
let buffers: { a: Float64Array; b: Float64Array; diff: Float64Array } | null = null;
let ensured = '';
let requested = '';
let lastHold: TrialHold | null = null;
let lastTrialMaps: TrialMaps | null = null;

function sameList(a: readonly string[], b: readonly string[]): boolean {
  return a.length === b.length && a.every((x, i) => x === b[i]);
}

function titleOf(d: Decomposition, s: MapSelection, ws: WorkspaceState): string {
  const pair = s.b >= 0 ? `${d.labels[s.a]} − ${d.labels[s.b]}` : d.labels[s.a];
  const scope = s.useTrials && ws.scope === 'trial' ? 'single-trial' : 'trial-average';
  const induced = d.recipe.trialPower === 'induced' ? ' · induced' : '';
  const spread = s.spreadTrials && s.useTrials ? ' · S across trials' : '';
  const contrast = s.b >= 0 ? ` · ${s.useTrials || ws.contrastBaseline === 'own' ? 'own baselines' : 'shared baseline'}` : '';
  return `${pair} · ${METHODS.find((m) => m.value === ws.method)!.label} · ${scope}${induced}${spread}${contrast} · ${s.where}`;
}

/** Average scope: the selection's normalized map (or A − B) into reused buffers. */
function averageValues(d: Decomposition, s: MapSelection, points: { first: number; last: number }, ws: WorkspaceState): Float64Array {
  const size = d.frequencies.length * d.times.length;
  if (buffers === null || buffers.a.length !== size) buffers = { a: new Float64Array(size), b: new Float64Array(size), diff: new Float64Array(size) };
  if (s.b < 0) return normalizedOf(d, s.indices, s.a, points, ws.method, buffers.a);
  if (ws.contrastBaseline === 'shared') return contrastOf(d, s.indices, s.a, s.b, points, ws.method, 'shared');
  const na = normalizedOf(d, s.indices, s.a, points, ws.method, buffers.a);
  return difference(buffers.diff, na, normalizedOf(d, s.indices, s.b, points, ws.method, buffers.b));
}

let running = false;
let again = false;

/** Re-makes the normalized map when anything it depends on changed; cheap otherwise. */
function update(): void {
  // Asking for single trials changes the results store at once, which calls this again: finish, then look again.
  if (running) {
    again = true;
    return;
  }
  running = true;
  try {
    do {
      again = false;
      updateOnce();
    } while (again);
  } finally {
    running = false;
  }
}

function updateOnce(): void {
  const ws = useWorkspace.getState();
  const rs = useResultsStore.getState();
  const d = selectActive(rs);
  if (d === null) {
    if (useMapView.getState().normalized !== null) useMapView.setState({ normalized: null, fresh: true, warnings: [] });
    madeFrom = '';
    return;
  }
  const s = mapSelectionOf(d, ws);
  const points = baselinePoints(d, ws.baseline);
  const previous = useMapView.getState();
  const warnings = baselineWarnings(d, points, ws.baseline.end, ws.method);
  const patch: Partial<MapViewState> = {};
  if (!sameList(warnings, previous.warnings)) patch.warnings = warnings;

  const limitsKey = limitsKeyOf(ws.method, s.b, ws.contrastBaseline, ws.rawScale);
  const held = ws.heldLimits !== null && ws.heldLimits.key === limitsKey ? ws.heldLimits.normalized : null;
  const title = titleOf(d, s, ws);
  const spread = s.spreadTrials ? 'trials' : 'time';
  let values: Float64Array | null = null;
  let fresh = true;
  let from: string;
  if (s.useTrials && s.holdKey !== null) {
    if (ensured !== s.holdKey) {
      ensured = s.holdKey;
      if (ws.recording !== null) void ensureTrials(d, s.channel!, ws.recording);
    }
    const hold = rs.trialHold;
    const conditions = s.b >= 0 ? [s.a, s.b] : [s.a];
    const job = `${s.holdKey}|${points.first}|${points.last}|${ws.method}|${spread}|${conditions.join(',')}`;
    if (hold !== null && hold.key === s.holdKey && hold.status === 'ready' && (job !== requested || hold !== lastHold)) {
      requested = job;
      lastHold = hold;
      requestTrialMaps({ key: s.holdKey, first: points.first, last: points.last, method: ws.method, spread, conditions, nFreqs: d.frequencies.length });
    }
    const tm = useTrialMaps.getState().latest;
    const ma = tm?.maps[s.a] ?? null;
    const mb = s.b >= 0 ? (tm?.maps[s.b] ?? null) : null;
    if (tm !== null && tm.key === s.holdKey && ma !== null && (s.b < 0 || mb !== null)) {
      fresh = tm.first === points.first && tm.last === points.last && tm.method === ws.method && tm.spread === spread;
      from = `trial|${s.a}|${s.b}|${title}|${held?.join(',') ?? ''}`;
      if (from !== madeFrom || tm !== lastTrialMaps) {
        values = mb !== null ? difference(new Float64Array(ma.length), ma, mb) : ma;
        lastTrialMaps = tm;
      }
    } else if (tm !== null && tm.key === s.holdKey && previous.normalized !== null) {
      // Maps of other conditions: the shown one stays, marked not fresh, until the asked ones arrive.
      from = madeFrom;
      fresh = false;
    } else {
      from = 'waiting';
      if (previous.normalized !== null) patch.normalized = null;
    }
  } else {
    ensured = '';
    from = `average|${d.key}|${s.indices.join(',')}|${s.a}|${s.b}|${points.first}|${points.last}|${ws.method}|${ws.contrastBaseline}|${title}|${held?.join(',') ?? ''}`;
    if (from !== madeFrom) values = averageValues(d, s, points, ws);
  }
  madeFrom = from;
  if (values !== null) {
    const ratio = s.b < 0 && ws.method === 'power-ratio';
    // A power ratio is drawn on a log scale centred on 1, so a halving looks as strong as a doubling.
    const domain = held ?? (ratio ? ratioLimits(values, d.mask) : symmetricLimits(values, s.b >= 0 ? 0 : neutralValue(ws.method), d.mask));
    patch.normalized = { values, domain: [domain[0], domain[1]], kind: ratio ? 'log' : 'linear', title };
  }
  if (fresh !== previous.fresh) patch.fresh = fresh;
  if (Object.keys(patch).length > 0) useMapView.setState(patch);
  // Nothing new to paint (the baseline snapped to the same grid points): the input is done.
  if (patch.normalized === undefined && fresh) closeRenormalizeMeasure();
}

let watchers = 0;
let stop: (() => void) | null = null;

/**
 * Keeps `useMapView` up to date while a Maps screen is shown; returns the function that stops it (the last stop
 * unsubscribes). Called from the screen's effect.
 */
export function watchMapView(): () => void {
  watchers++;
  if (stop === null) {
    const offs = [useWorkspace.subscribe(update), useResultsStore.subscribe(update), useTrialMaps.subscribe(update)];
    stop = () => offs.forEach((off) => off());
    madeFrom = '';
    update();
  }
  return () => {
    watchers--;
    if (watchers === 0 && stop !== null) {
      stop();
      stop = null;
      madeFrom = '';
      ensured = '';
      requested = '';
    }
  };
}
