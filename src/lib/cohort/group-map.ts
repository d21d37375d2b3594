/**
 * The group map: the mean over subjects of their reduced maps (one condition, one channel group; or the paired
 * difference of two conditions), and the map test's input built from the same maps. A subject whose map has
 * other axes than the first subject's, or an undefined cell, is left out of the test with a warning.
 */
import type { MapTestInput } from '../statistics/map-test';

export interface ReducedMapLike {
  condition: string;
  channelGroup: string;
  frequenciesHz: number[];
  timesS: number[];
  values: (number | null)[][];
}

export interface SubjectMaps {
  subject: string;
  maps: ReducedMapLike[];
}

export interface GroupMap {
  frequenciesHz: number[];
  timesS: number[];
  /** Mean over subjects, `[f·T + t]`; NaN where no subject has a value. */
  mean: Float64Array;
  /** Subjects per cell. */
  n: Int32Array;
  /** Subjects whose maps entered, in order. */
  subjects: string[];
  /** The map test's input (x = map − neutral, or first − second): subjects with a complete map only. */
  testInput: MapTestInput | null;
  testSubjects: string[];
  warnings: string[];
}

const sameAxis = (a: number[], b: number[]) => a.length === b.length && a.every((x, i) => x === b[i]);

/**
 * `conditions` of one name: the one-sample map against `neutral`; of two: the paired difference first − second.
 * Returns null when no subject has the map.
 */
export function buildGroupMap(subjects: SubjectMaps[], channelGroup: string, conditions: [string] | [string, string], neutral: number, options: { alpha?: number; seed?: number } = {}): GroupMap | null {
  const warnings: string[] = [];
  let axes: { frequenciesHz: number[]; timesS: number[] } | null = null;
  const entered: { subject: string; x: (number | null)[] }[] = [];
  for (const s of subjects) {
    const found = conditions.map((c) => s.maps.find((m) => m.condition === c && m.channelGroup === channelGroup));
    if (found.some((m) => m === undefined)) continue;
    const maps = found as ReducedMapLike[];
    axes ??= { frequenciesHz: maps[0].frequenciesHz, timesS: maps[0].timesS };
    if (!maps.every((m) => sameAxis(m.frequenciesHz, axes!.frequenciesHz) && sameAxis(m.timesS, axes!.timesS))) {
      warnings.push(`${s.subject}: its ${channelGroup} map has other frequencies or times than ${entered[0]?.subject ?? 'the first subject'}'s; left out`);
      continue;
    }
    const nT = axes.timesS.length;
    const x: (number | null)[] = new Array(axes.frequenciesHz.length * nT);
    for (let f = 0; f < axes.frequenciesHz.length; f++) {
      for (let t = 0; t < nT; t++) {
        const a = maps[0].values[f]?.[t] ?? null;
        const b = maps.length === 2 ? (maps[1].values[f]?.[t] ?? null) : neutral;
        x[f * nT + t] = a === null || b === null ? null : a - b;
      }
    }
    entered.push({ subject: s.subject, x });
  }
  if (axes === null) return null;
  const points = axes.frequenciesHz.length * axes.timesS.length;
  const sum = new Float64Array(points);
  const n = new Int32Array(points);
  for (const { x } of entered) {
    for (let p = 0; p < points; p++) {
      const v = x[p];
      if (v !== null && Number.isFinite(v)) {
        sum[p] += v;
        n[p]++;
      }
    }
  }
  const mean = new Float64Array(points);
  // Shown in the method's own units: the one-sample map adds the neutral value back.
  const offset = conditions.length === 1 ? neutral : 0;
  for (let p = 0; p < points; p++) mean[p] = n[p] === 0 ? NaN : sum[p] / n[p] + offset;
  const complete = entered.filter(({ subject, x }) => {
    const ok = x.every((v) => v !== null && Number.isFinite(v));
    if (!ok) warnings.push(`${subject}: its map has undefined cells; left out of the map test`);
    return ok;
  });
  let testInput: MapTestInput | null = null;
  if (complete.length >= 2) {
    const values = new Float64Array(complete.length * points);
    complete.forEach(({ x }, s) => {
      for (let p = 0; p < points; p++) values[s * points + p] = x[p] as number;
    });
    testInput = { values, nSubjects: complete.length, nFrequencies: axes.frequenciesHz.length, nTimes: axes.timesS.length, alpha: options.alpha ?? 0.05, seed: options.seed ?? 1 };
  } else {
    warnings.push(`the map test needs 2 subjects with complete maps; ${complete.length} ${complete.length === 1 ? 'has' : 'have'} one`);
  }
  return { ...axes, mean, n, subjects: entered.map((e) => e.subject), testInput, testSubjects: complete.map((c) => c.subject), warnings };
}
