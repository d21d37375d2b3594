/**
 * Where a note's pin sits on a map and which notes a map shows (pure; the screens draw, the controller keeps the
 * notes). A pin anchors a note to a channel (or channel group), a condition, a time range in seconds from the event
 * and a frequency range in Hz (the server's `NoteAnchor`).
 */
import type { NoteAnchor, NoteView } from '../review/types';

/** A scale of a map axis as the panel gives it: value → CSS pixel and back (d3-scale's `scaleLinear`/`scaleLog`). */
export interface PinScale {
  (value: number): number;
  invert(pixel: number): number;
  domain(): number[];
}

export interface PinScales {
  time: PinScale;
  frequency: PinScale;
}

/** Drags shorter than this (CSS px, either way) are a click: the pin covers the one cell under the pointer. */
export const CLICK_PX = 4;

const roundTo = (x: number, digits: number) => Number(x.toFixed(digits));

/** The map cell `[lo, hi]` edges around grid value `values[i]` (cells are centred on the grid; log rows by ratio). */
function cellEdges(values: ArrayLike<number>, i: number, spacing: 'log' | 'linear'): [number, number] {
  const n = values.length;
  if (spacing === 'log' && n > 1) {
    const r = Math.pow(values[n - 1] / values[0], 1 / (n - 1));
    return [values[i] / Math.sqrt(r), values[i] * Math.sqrt(r)];
  }
  const step = n > 1 ? (values[n - 1] - values[0]) / (n - 1) : 1;
  return [values[i] - step / 2, values[i] + step / 2];
}

function nearest(values: ArrayLike<number>, x: number): number {
  let best = 0;
  for (let i = 1; i < values.length; i++) if (Math.abs(values[i] - x) < Math.abs(values[best] - x)) best = i;
  return best;
}

/**
 * The time and frequency ranges of a region drawn from pixel (x0, y0) to (x1, y1) on a map with these scales,
 * clamped to the map; a click (both sides under CLICK_PX) gives the one cell under it. Times are rounded to the
 * millisecond and frequencies to 0.01 Hz, outward, so the ranges hold every cell the region touched.
 */
export function regionRanges(
  region: { x0: number; y0: number; x1: number; y1: number },
  scales: PinScales,
  grid: { times: ArrayLike<number>; frequencies: ArrayLike<number>; spacing: 'log' | 'linear' },
): { timeS: [number, number]; frequencyHz: [number, number] } {
  const [tMin, tMax] = scales.time.domain();
  const fDomain = scales.frequency.domain();
  const fMin = Math.min(fDomain[0], fDomain[1]);
  const fMax = Math.max(fDomain[0], fDomain[1]);
  const clampT = (t: number) => Math.min(tMax, Math.max(tMin, t));
  const clampF = (f: number) => Math.min(fMax, Math.max(fMin, f));
  let t0: number, t1: number, f0: number, f1: number;
  if (Math.abs(region.x1 - region.x0) < CLICK_PX && Math.abs(region.y1 - region.y0) < CLICK_PX) {
    const ti = nearest(grid.times, scales.time.invert(region.x0));
    const fi = nearest(grid.frequencies, scales.frequency.invert(region.y0));
    [t0, t1] = cellEdges(grid.times, ti, 'linear');
    [f0, f1] = cellEdges(grid.frequencies, fi, grid.spacing);
  } else {
    const ta = clampT(scales.time.invert(region.x0));
    const tb = clampT(scales.time.invert(region.x1));
    const fa = clampF(scales.frequency.invert(region.y0));
    const fb = clampF(scales.frequency.invert(region.y1));
    [t0, t1] = [Math.min(ta, tb), Math.max(ta, tb)];
    [f0, f1] = [Math.min(fa, fb), Math.max(fa, fb)];
  }
  // Outward, but a pixel → value round trip that lands a hair off a round number (0.19999999…) stays on it.
  const down = (x: number, per: number) => Math.floor(x * per + 1e-6) / per;
  const up = (x: number, per: number) => Math.ceil(x * per - 1e-6) / per;
  const timeS: [number, number] = [down(t0, 1000), up(t1, 1000)];
  const frequencyHz: [number, number] = [Math.max(0, down(f0, 100)), up(f1, 100)];
  if (timeS[1] <= timeS[0]) timeS[1] = roundTo(timeS[0] + 0.001, 3);
  if (frequencyHz[1] <= frequencyHz[0]) frequencyHz[1] = roundTo(frequencyHz[0] + 0.01, 2);
  return { timeS, frequencyHz };
}

/**
 * The ranges of a block of map cells, times `t0…t1` and frequencies `f0…f1` (grid indices, either order), from the
 * outer edges of its corner cells (rounded outward as `regionRanges` does): what the keyboard pins.
 */
export function cellRanges(
  grid: { times: ArrayLike<number>; frequencies: ArrayLike<number>; spacing: 'log' | 'linear' },
  cells: { t0: number; t1: number; f0: number; f1: number },
): { timeS: [number, number]; frequencyHz: [number, number] } {
  const [ta, tb] = [Math.min(cells.t0, cells.t1), Math.max(cells.t0, cells.t1)];
  const [fa, fb] = [Math.min(cells.f0, cells.f1), Math.max(cells.f0, cells.f1)];
  const down = (x: number, per: number) => Math.floor(x * per + 1e-6) / per;
  const up = (x: number, per: number) => Math.ceil(x * per - 1e-6) / per;
  return {
    timeS: [down(cellEdges(grid.times, ta, 'linear')[0], 1000), up(cellEdges(grid.times, tb, 'linear')[1], 1000)],
    frequencyHz: [Math.max(0, down(cellEdges(grid.frequencies, fa, grid.spacing)[0], 100)), up(cellEdges(grid.frequencies, fb, grid.spacing)[1], 100)],
  };
}

/** The pixel box of an anchor's ranges on a map (clamped to the scales' ranges); null without both ranges. */
export function pinBox(anchor: NoteAnchor, scales: PinScales): { left: number; top: number; width: number; height: number } | null {
  if (!anchor.timeS || !anchor.frequencyHz) return null;
  const [tMin, tMax] = scales.time.domain();
  const fd = scales.frequency.domain();
  const fMin = Math.min(fd[0], fd[1]);
  const fMax = Math.max(fd[0], fd[1]);
  const t0 = Math.max(tMin, anchor.timeS[0]);
  const t1 = Math.min(tMax, anchor.timeS[1]);
  const f0 = Math.max(fMin, anchor.frequencyHz[0]);
  const f1 = Math.min(fMax, anchor.frequencyHz[1]);
  if (t1 <= t0 || f1 <= f0) return null;
  const xa = scales.time(t0);
  const xb = scales.time(t1);
  const ya = scales.frequency(f0);
  const yb = scales.frequency(f1);
  return { left: Math.min(xa, xb), top: Math.min(ya, yb), width: Math.abs(xb - xa), height: Math.abs(yb - ya) };
}

/**
 * The top-level notes a map of `channel` and `condition` shows: anchored to that channel, or to a channel group
 * holding it (`groups`: the recipe's `channelGroups`), and to that condition (or to none). Oldest first.
 */
export function notesOnMap(notes: readonly NoteView[], channel: string | null, condition: string | null, groups: Readonly<Record<string, readonly string[]>> = {}): NoteView[] {
  return notes.filter((n) => {
    const a = n.anchor;
    if (n.parentId !== null || !a || !a.timeS || !a.frequencyHz) return false;
    const onChannel = a.channel !== undefined ? a.channel === channel : a.channelGroup !== undefined ? channel !== null && (groups[a.channelGroup] ?? []).includes(channel) : true;
    const onCondition = a.condition === undefined || a.condition === condition;
    return onChannel && onCondition;
  });
}

/** The anchor in words: `Fz · lamp-watch · 0.2…0.6 s · 4…8 Hz`. */
export function describeAnchor(anchor: NoteAnchor | null): string {
  if (anchor === null) return 'the session as a whole';
  return [
    anchor.channel,
    anchor.channelGroup && `group ${anchor.channelGroup}`,
    anchor.condition,
    anchor.timeS && `${anchor.timeS[0]}…${anchor.timeS[1]} s`,
    anchor.frequencyHz && `${anchor.frequencyHz[0]}…${anchor.frequencyHz[1]} Hz`,
  ]
    .filter(Boolean)
    .join(' · ');
}

/** How a note's version stands to the maps' version: same, older (it pointed here then) or none (the session). */
export function versionStanding(note: Pick<NoteView, 'recipeVersion'>, currentVersion: number | null): 'current' | 'older' | 'session' {
  if (note.recipeVersion === null) return 'session';
  return currentVersion !== null && note.recipeVersion < currentVersion ? 'older' : 'current';
}
