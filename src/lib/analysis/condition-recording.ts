import { isBrainType, resolveChannels, shortList, type ChannelType, type ChannelUnit, type SignalsSpec } from './channel-types';
import { AnalysisInputError } from './errors';
import type { Recording } from './recording';
import { butterworthHighPass, filtfilt, notch, type Biquad } from './filters';
import { bipolar, commonAverage, meanOfChannels, shaftContacts } from './reference';

/** The recipe's `reference` (DEVELOPERS.md, "References"). */
export type ReferenceSpec =
  | { kind: 'as-recorded' }
  | { kind: 'common-average' }
  | { kind: 'mean-of-channels'; channels: readonly string[] }
  | { kind: 'bipolar'; pairs?: readonly (readonly [string, string])[]; shafts?: readonly string[] };

/** The recipe's `filters` (DEVELOPERS.md, "Filters"). */
export interface FiltersSpec {
  highPass?: { cutoffHz: number; order?: number };
  notch?: { lineHz?: number; harmonics?: number; q?: number };
}

/** The recipe fields that change the continuous recording before it is cut into epochs. */
export interface ConditionSpec {
  signals?: SignalsSpec;
  reference?: ReferenceSpec;
  filters?: FiltersSpec;
}

// Referencing applies to electrodes on or in the brain; MEG sensors measure fields and have no reference.
const ELECTRODE: ReadonlySet<ChannelType> = new Set(['eeg', 'intracranial']);

export interface ConditionedRecording {
  /** Bad channels left out, every channel's type and unit set; samples shared with the input where unchanged. */
  recording: Recording & { channelTypes: ChannelType[]; channelUnits: ChannelUnit[] };
  /** Names of the channels marked bad (left out). */
  bad: string[];
  warnings: string[];
}

// One conditioned recording per input recording, for the last spec asked: the Recipe screen checks a recipe on
// every edit, and conditioning must not run again when only the baseline or the frequencies changed.
const cache = new WeakMap<Recording, { key: string; result: ConditionedRecording }>();

/**
 * The continuous recording as the recipe conditions it before epoching (DEVELOPERS.md, "Channel types",
 * "References"): each channel's type resolved (reader's inference, then `signals.types`), channels in `signals.bad`
 * left out, then the `reference` applied, then the `filters` (each continuous stretch between gaps on its own).
 * Pure in (recording, spec); throws AnalysisInputError naming the field.
 */
export function conditionRecording(recording: Recording, spec: ConditionSpec): ConditionedRecording {
  const key = conditionKey(spec);
  const hit = cache.get(recording);
  if (hit !== undefined && hit.key === key) return hit.result;
  const resolved = resolveChannels(recording, spec.signals);
  const keep: number[] = [];
  const bad: string[] = [];
  recording.channelNames.forEach((name, c) => (resolved.bad[c] ? bad.push(name) : keep.push(c)));
  let out: ConditionedRecording['recording'] = {
    ...recording,
    channelNames: keep.map((c) => recording.channelNames[c]),
    data: keep.map((c) => recording.data[c]),
    channelTypes: keep.map((c) => resolved.types[c]),
    channelUnits: keep.map((c) => resolved.units[c]),
  };
  const warnings: string[] = [];
  if (spec.reference !== undefined) out = applyReference(out, spec.reference, bad, warnings);
  if (spec.filters !== undefined) out = applyFilters(out, spec.filters);
  const result: ConditionedRecording = { recording: out, bad, warnings };
  cache.set(recording, { key, result });
  return result;
}

/**
 * The spec in one canonical spelling (defaults filled, fields in a fixed order), so the Source screen's settings and
 * a parsed recipe that mean the same conditioning share one cache entry (and a planner can tell two recipes that
 * condition the recording alike).
 */
export function conditionKey(spec: ConditionSpec): string {
  const r = spec.reference;
  const f = spec.filters;
  return JSON.stringify([
    spec.signals?.types === undefined ? {} : Object.fromEntries(Object.entries(spec.signals.types).sort(([x], [y]) => (x < y ? -1 : x > y ? 1 : 0))),
    spec.signals?.bad ?? [],
    r === undefined || r.kind === 'as-recorded' ? null : r.kind === 'bipolar' ? [r.kind, r.pairs ?? [], r.shafts ?? []] : r.kind === 'mean-of-channels' ? [r.kind, r.channels] : [r.kind],
    f?.highPass === undefined ? null : [f.highPass.cutoffHz, f.highPass.order ?? 4],
    f?.notch === undefined ? null : [f.notch.lineHz ?? null, f.notch.harmonics ?? 1, f.notch.q ?? 30],
  ]);
}

/** Indices of the brain channels of a conditioned recording (bad channels are already left out). */
export function brainChannels(recording: { channelTypes: readonly ChannelType[] }): number[] {
  const out: number[] = [];
  recording.channelTypes.forEach((t, c) => {
    if (isBrainType(t)) out.push(c);
  });
  return out;
}

type Conditioned = ConditionedRecording['recording'];

/**
 * Applies `reference` to the good channels (`rec` has the bad ones left out; `bad` names them for messages):
 * `common-average` and `mean-of-channels` re-reference the electrode channels (EEG, intracranial) and leave the
 * others as recorded; `bipolar` replaces the electrode channels by the pairs' differences, named "A-B".
 */
function applyReference(rec: Conditioned, reference: ReferenceSpec, bad: readonly string[], warnings: string[]): Conditioned {
  const names = rec.channelNames;
  const electrodes = rec.channelTypes.flatMap((t, c) => (ELECTRODE.has(t) ? [c] : []));
  const find = (field: string, name: string): number => {
    const c = names.indexOf(name);
    if (c >= 0) return c;
    if (bad.includes(name)) throw new AnalysisInputError(field, `"${name}" is marked bad (signals.bad) and cannot serve in a reference`);
    throw new AnalysisInputError(field, `names no signal in the recording ("${name}"; signals: ${shortList(names)})`);
  };
  const requireMicrovolts = (field: string, c: number) => {
    if (rec.channelUnits[c] !== 'µV') throw new AnalysisInputError(field, `"${names[c]}" is in ${rec.channelUnits[c]}; only µV channels can be subtracted from electrodes`);
  };
  const replaced = (channels: readonly number[], arrays: Float32Array[]): Conditioned => {
    const data = rec.data.slice();
    channels.forEach((c, i) => (data[c] = arrays[i]));
    return { ...rec, data };
  };
  switch (reference.kind) {
    case 'as-recorded':
      return rec;
    case 'common-average': {
      if (electrodes.length < 2) throw new AnalysisInputError('reference', `"common-average" needs at least 2 good EEG or intracranial channels; the recording has ${electrodes.length}`);
      return replaced(electrodes, commonAverage(rec.data, electrodes));
    }
    case 'mean-of-channels': {
      const refs = reference.channels.map((name, i) => {
        const c = find(`reference.channels[${i}]`, name);
        requireMicrovolts(`reference.channels[${i}]`, c);
        if (reference.channels.indexOf(name) !== i) throw new AnalysisInputError(`reference.channels[${i}]`, `repeats "${name}"`);
        return c;
      });
      if (electrodes.length === 0) throw new AnalysisInputError('reference', 'has no good EEG or intracranial channel to re-reference');
      return replaced(electrodes, meanOfChannels(rec.data, electrodes, refs));
    }
    case 'bipolar': {
      const pairs: [number, number][] = [];
      (reference.pairs ?? []).forEach(([a, b], i) => {
        const ia = find(`reference.pairs[${i}][0]`, a);
        const ib = find(`reference.pairs[${i}][1]`, b);
        requireMicrovolts(`reference.pairs[${i}][0]`, ia);
        requireMicrovolts(`reference.pairs[${i}][1]`, ib);
        if (ia === ib) throw new AnalysisInputError(`reference.pairs[${i}]`, `pairs "${a}" with itself`);
        pairs.push([ia, ib]);
      });
      (reference.shafts ?? []).forEach((shaft, i) => {
        const field = `reference.shafts[${i}]`;
        const all = shaftContacts([...names, ...bad], shaft);
        if (all.length === 0) throw new AnalysisInputError(field, `"${shaft}" matches no channel named ${shaft}<number> (signals: ${shortList(names)})`);
        const good = new Map(shaftContacts(names, shaft));
        let formed = 0;
        const skipped: string[] = [];
        for (const [n] of all) {
          if (!all.some(([m]) => m === n + 1)) continue;
          const a = good.get(n);
          const b = good.get(n + 1);
          if (a === undefined || b === undefined) {
            skipped.push(`${shaft}${n}-${shaft}${n + 1}`);
            continue;
          }
          requireMicrovolts(field, a);
          pairs.push([a, b]);
          formed++;
        }
        if (formed === 0) throw new AnalysisInputError(field, `"${shaft}" has no two neighbouring good contacts (${shaft}n and ${shaft}n+1) to pair`);
        if (skipped.length > 0) warnings.push(`reference.shafts[${i}] "${shaft}": ${skipped.join(', ')} left out (a contact is marked bad)`);
      });
      const derivedNames = pairs.map(([a, b]) => `${names[a]}-${names[b]}`);
      derivedNames.forEach((n, i) => {
        if (derivedNames.indexOf(n) !== i) throw new AnalysisInputError('reference', `gives the pair "${n}" twice`);
      });
      // The pairs replace the electrode channels; eye, heart, muscle, stimulus, other and MEG channels stay.
      const others = names.flatMap((_, c) => (ELECTRODE.has(rec.channelTypes[c]) ? [] : [c]));
      const clash = others.find((c) => derivedNames.includes(names[c]));
      if (clash !== undefined) throw new AnalysisInputError('reference', `gives the pair "${names[clash]}", a name another channel already has`);
      return {
        ...rec,
        channelNames: [...derivedNames, ...others.map((c) => names[c])],
        data: [...bipolar(rec.data, pairs), ...others.map((c) => rec.data[c])],
        channelTypes: [...pairs.map(([a]) => rec.channelTypes[a]), ...others.map((c) => rec.channelTypes[c])],
        channelUnits: [...pairs.map(() => 'µV' as const), ...others.map((c) => rec.channelUnits[c])],
      };
    }
  }
}

const fmtHz = (x: number) => Number(x.toFixed(4)).toString();

/** The filter cascade a `filters` spec asks for at `fs`, checked against Nyquist, and its padding in samples. */
export function filterDesign(filters: FiltersSpec, sampleRateHz: number): { sections: Biquad[]; padSamples: number } {
  const nyquist = sampleRateHz / 2;
  const sections: Biquad[] = [];
  let slowestHz = Infinity;
  const hp = filters.highPass;
  if (hp !== undefined) {
    if (!(hp.cutoffHz > 0 && hp.cutoffHz < nyquist)) {
      throw new AnalysisInputError('filters.highPass.cutoffHz', `must be above 0 and below the Nyquist frequency (${fmtHz(nyquist)} Hz at ${sampleRateHz} Hz sampling; got ${hp.cutoffHz} Hz)`);
    }
    const order = hp.order ?? 4;
    if (![2, 4, 6, 8].includes(order)) throw new AnalysisInputError('filters.highPass.order', `must be 2, 4, 6 or 8 (got ${order})`);
    sections.push(...butterworthHighPass(hp.cutoffHz, order, sampleRateHz));
    slowestHz = Math.min(slowestHz, hp.cutoffHz);
  }
  const nt = filters.notch;
  if (nt !== undefined) {
    if (nt.lineHz === undefined) throw new AnalysisInputError('filters.notch.lineHz', 'is required for a notch: the line frequency, 50 or 60 Hz');
    if (!(nt.lineHz > 0 && nt.lineHz < nyquist)) {
      throw new AnalysisInputError('filters.notch.lineHz', `must be above 0 and below the Nyquist frequency (${fmtHz(nyquist)} Hz at ${sampleRateHz} Hz sampling; got ${nt.lineHz} Hz)`);
    }
    const harmonics = nt.harmonics ?? 1;
    const fit = Math.ceil(nyquist / nt.lineHz) - 1;
    if (harmonics > fit) {
      throw new AnalysisInputError('filters.notch.harmonics', `asks for ${harmonics} × ${nt.lineHz} Hz = ${fmtHz(harmonics * nt.lineHz)} Hz, at or above the Nyquist frequency (${fmtHz(nyquist)} Hz); at most ${fit} fit`);
    }
    const q = nt.q ?? 30;
    // Each harmonic gets the fundamental's width in Hz (lineHz/q), so its neighbours lose as little as 45/55 Hz do.
    for (let h = 1; h <= harmonics; h++) sections.push(notch(h * nt.lineHz, h * q, sampleRateHz));
    slowestHz = Math.min(slowestHz, nt.lineHz / q);
  }
  // Three time constants of the slowest part (its bandwidth), where the odd extension lets the transient settle.
  const padSamples = Number.isFinite(slowestHz) ? Math.ceil((3 * sampleRateHz) / slowestHz) : 0;
  return { sections, padSamples };
}

/** Filters every channel but stimulus lines, each continuous stretch between gaps apart (no filter across a gap). */
function applyFilters(rec: Conditioned, filters: FiltersSpec): Conditioned {
  const { sections, padSamples } = filterDesign(filters, rec.sampleRateHz);
  if (sections.length === 0) return rec;
  const total = rec.data.length > 0 ? rec.data[0].length : 0;
  const cuts = [0, ...(rec.gapSampleIndices ?? []).filter((g) => g > 0 && g < total).sort((a, b) => a - b), total];
  const data = rec.data.map((x, c) => {
    if (rec.channelTypes[c] === 'stimulus') return x;
    const y = new Float32Array(total);
    for (let i = 0; i + 1 < cuts.length; i++) {
      const [s0, s1] = [cuts[i], cuts[i + 1]];
      if (s1 <= s0) continue;
      y.set(filtfilt(x.subarray(s0, s1), sections, padSamples), s0);
    }
    return y;
  });
  return { ...rec, data };
}
