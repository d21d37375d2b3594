import { analyzeChannel, type ChannelAnalysis, type RecipePlan } from './analyze-channel';
import type { AperiodicFit } from './aperiodic';
import { baselinePointsIn } from './baseline';
import { baselineEdgeOverlap, edgeZones } from './edge-zone';
import { epochLength, epochTimes, selectEpochs } from './epochs';
import { AnalysisCancelledError, AnalysisInputError } from './errors';

import { frequencyGrid } from './frequency-grid';
import { groupIndices } from './channel-groups';
import { brainChannels, conditionRecording } from './condition-recording';
import { prepareRecording } from './prepare-recording';
import { parseRecipe, type Recipe } from './recipe';
import type { Recording } from './recording';
import { roundHalfUp } from './rounding';
import { cyclesOf, edgeSecondsOf, gaussianSigmas, resolutionOf } from './wavelet';
import { isBrainType, shortList, type ChannelType, type ChannelUnit } from './channel-types';

export { analyzeChannel, type ChannelAnalysis, type ChannelOptions, type RecipePlan } from './analyze-channel';

export interface ResultCondition {
  trials: number;
  /** Epochs of this label dropped (outside the recording or across a gap). */
  dropped: number;
  /** Epochs that fit but were left out by the recipe's rejection rules or a manual decision (0 without rejection). */
  rejected: number;
  /** [channel][frequency][time], µV² */
  power: number[][][];
  /** [channel][frequency][time] in the baseline method's unit; undefined values are null in JSON. */
  normalized: number[][][];
  /** [channel][frequency][time], 0 … 1, with recipe `"itpc": true` (analysis contract, "Inter-trial phase consistency"). */
  itpc?: number[][][];
  /** [channel][time], µV: the evoked response taken out of each epoch, with recipe `"trialPower": "induced"`. */
  evoked?: number[][];
}

export interface ResultAperiodic extends AperiodicFit {
  channel: string;
}

/**
 * The Result JSON of the analysis contract ("Result (output)"), plus `cycles`, `dropped`, `rejected`, `points`,
 * `excluded`, each frequency's resolution (`temporalFwhmSeconds`, `spectralFwhmHz`), and each channel's type and unit (`channelTypes`, `channelUnits`: power is in unit², e.g. fT²).
 */
export interface AnalysisResult {
  frequencies: number[];
  cycles: number[];
  edgeSeconds: number[];
  /** Per frequency, the wavelet's temporal FWHM (s) and spectral FWHM (Hz) (`resolutionOf`). */
  temporalFwhmSeconds: number[];
  spectralFwhmHz: number[];
  times: number[];
  channels: string[];
  channelTypes: ChannelType[];
  channelUnits: ChannelUnit[];
  conditions: Record<string, ResultCondition>;
  spectrum: { frequencies: number[]; psd: number[][] };
  aperiodic: ResultAperiodic[];
  /** With spectrum source `epochs`: per condition, each channel's fit on that condition's kept epochs alone. */
  aperiodicByCondition?: Record<string, ResultAperiodic[]>;
  warnings: string[];
}

const EPS = 1e-9;

function fmt(x: number): string {
  return Number(x.toFixed(4)).toString();
}

/**
 * Validates a recipe against a recording and works out everything that does not depend on a channel's samples:
 * grids, wavelet widths, epoch starts, baseline indices, Welch spans. Throws AnalysisInputError naming the field.
 */
export function planRecipe(recording: Recording, recipeInput: unknown): RecipePlan {
  return planRun(recording, recipeInput).plan;
}

/**
 * `planRecipe` plus the recording the plan's channel indices point into: the input conditioned as the recipe asks
 * (channel types, bad channels left out; `conditionRecording`). Runs take each channel's samples from there.
 */
export function planRun(input: Recording, recipeInput: unknown): { plan: RecipePlan; recording: Recording } {
  const recipe: Recipe = parseRecipe(recipeInput);
  const fs = input.sampleRateHz;
  if (!(fs > 0) || !Number.isFinite(fs)) throw new AnalysisInputError('recording.sampleRateHz', `must be a positive number of Hz (got ${fs})`);
  const total = input.data.length > 0 ? input.data[0].length : 0;
  input.data.forEach((d, i) => {
    if (d.length !== total) throw new AnalysisInputError(`recording.data[${i}]`, `has ${d.length} samples where channel 0 has ${total}`);
  });
  const bad = new Set(recipe.signals?.bad ?? []);
  recipe.channels?.forEach((name, i) => {
    if (bad.has(name)) throw new AnalysisInputError(`channels[${i}]`, `"${name}" is marked bad (signals.bad); a bad channel is left out everywhere`);
  });
  recipe.rejection?.channels?.forEach((name, i) => {
    if (bad.has(name)) throw new AnalysisInputError(`rejection.channels[${i}]`, `"${name}" is marked bad (signals.bad); a bad channel is left out everywhere`);
  });
  const conditioned = conditionRecording(input, recipe);
  const recording = conditioned.recording;
  const nyquist = fs / 2;
  const warnings: string[] = [];

  const { start: epochStart, end: epochEnd } = recipe.epochs;
  if (!(epochStart < epochEnd)) throw new AnalysisInputError('epochs.start', `must be less than epochs.end (${epochStart} s ≥ ${epochEnd} s)`);
  const L = epochLength(epochStart, epochEnd, fs);
  if (L < 2) throw new AnalysisInputError('epochs.end', `leaves fewer than 2 samples per epoch at ${fs} Hz`);

  const { start, end, method, scope } = recipe.baseline;
  if (start > end) throw new AnalysisInputError('baseline.start', `must not be after baseline.end (${start} s > ${end} s)`);
  if (start < epochStart - EPS) throw new AnalysisInputError('baseline.start', `is before the epoch start (${start} s < epochs.start ${epochStart} s)`);
  if (end > epochEnd + EPS) throw new AnalysisInputError('baseline.end', `is after the epoch end (${end} s > epochs.end ${epochEnd} s)`);
  const b = baselinePointsIn(start, end, epochStart, fs, L);
  if (method === 'z-score' && b.last - b.first < 1) {
    throw new AnalysisInputError('baseline.end', `gives a single baseline point at ${fs} Hz; z-score needs at least 2 for a standard deviation`);
  }

  const fr = recipe.frequencies;
  if (fr.max >= nyquist) throw new AnalysisInputError('frequencies.max', `must be below the Nyquist frequency (${fmt(nyquist)} Hz at ${fs} Hz sampling; got ${fr.max} Hz)`);
  if (fr.min > fr.max) throw new AnalysisInputError('frequencies.min', `must not exceed frequencies.max (${fr.min} Hz > ${fr.max} Hz)`);
  if (fr.count > 1 && fr.min === fr.max) throw new AnalysisInputError('frequencies.count', `must be 1 when frequencies.min equals frequencies.max`);
  const frequencies = frequencyGrid(fr);
  const sigmas = gaussianSigmas(frequencies, recipe.cycles);
  const edgeSeconds = edgeSecondsOf(sigmas);
  const cycles = cyclesOf(frequencies, sigmas);
  const epochSeconds = (L - 1) / fs;
  for (let i = 0; i < frequencies.length; i++) {
    if (2 * edgeSeconds[i] >= epochSeconds) {
      throw new AnalysisInputError(
        'cycles',
        `is too many for the epoch length: at ${fmt(frequencies[i])} Hz the ${fmt(cycles[i])}-cycle wavelet's edge zones (3σ = ${fmt(edgeSeconds[i])} s at each end) cover the whole ${fmt(epochSeconds)} s epoch, i.e. the epoch holds too few cycles of ${fmt(frequencies[i])} Hz; lengthen the epoch, raise frequencies.min or use fewer cycles`,
      );
    }
  }
  const edgeHit = baselineEdgeOverlap(edgeZones(edgeSeconds, fs, L), L, b.first, b.last);
  if (edgeHit.length > 0) {
    const lo = edgeHit[0];
    const hi = edgeHit[edgeHit.length - 1];
    warnings.push(
      `baseline: ${start} to ${end} s lies in the edge zone at ${edgeHit.length} of ${frequencies.length} frequencies (${fmt(frequencies[lo])}–${fmt(frequencies[hi])} Hz, edge ${fmt(edgeSeconds[lo])}–${fmt(edgeSeconds[hi])} s); those baselines include edge-affected power`,
    );
  }

  let channels: string[];
  let channelIndices: number[];
  if (recipe.channels === undefined) {
    // All good brain channels: eye, heart, muscle, stimulus and other channels only when named.
    channelIndices = brainChannels(recording);
    channels = channelIndices.map((c) => recording.channelNames[c]);
    if (channelIndices.length === 0) {
      throw new AnalysisInputError('channels', `may be left out only when the recording has good EEG, MEG or intracranial channels; this one has ${recording.channelNames.length === 0 ? 'none left' : `only ${shortList(recording.channelNames.map((n, c) => `${n} (${recording.channelTypes[c]})`))}`}: name the channels to analyse`);
    }
  } else {
    channels = recipe.channels;
    channelIndices = recipe.channels.map((name, i) => {
      const idx = recording.channelNames.indexOf(name);
      if (idx < 0) {
        const known = recording.channelNames.slice(0, 12).join(', ') + (recording.channelNames.length > 12 ? ', …' : '');
        throw new AnalysisInputError(`channels[${i}]`, `names no signal in the recording ("${name}"; signals: ${known})`);
      }
      if (recipe.channels!.indexOf(name) !== i) throw new AnalysisInputError(`channels[${i}]`, `repeats "${name}"`);
      return idx;
    });
  }
  if (channels.length === 0) throw new AnalysisInputError('recording', 'has no data signals');
  warnings.push(...conditioned.warnings);
  if (recipe.rejection !== undefined) {
    const unchecked = [...new Set(recording.channelTypes.filter((t, c) => isBrainType(t) && recording.channelUnits[c] !== 'µV' && recipe.rejection?.byType?.[t] === undefined))];
    for (const t of unchecked) warnings.push(`rejection: ${t} channels are not checked (no rejection.byType["${t}"] limits in their unit)`);
  }

  // Conditions and rejection (recipe extensions) pick the epochs; without them the contract's label selection runs.
  const prepared = prepareRecording(recording, recipe);
  const events = prepared.recording.events;
  if (recipe.recording?.fingerprint !== undefined && recording.fingerprint !== undefined && recipe.recording.fingerprint !== recording.fingerprint) {
    warnings.push(
      `recording.fingerprint: the recipe was made on a recording with SHA-256 ${recipe.recording.fingerprint.slice(0, 12)}…, but this one is ${recording.fingerprint.slice(0, 12)}…; the numbers may not match the ones it was made with`,
    );
  }
  const labels = recipe.epochs.events;
  const epochStarts: Int32Array[] = [];
  const droppedCounts: number[] = [];
  const rejectedCounts: number[] = [];
  labels.forEach((label, i) => {
    if (labels.indexOf(label) !== i) throw new AnalysisInputError(`epochs.events[${i}]`, `repeats "${label}"`);
    const sel = selectEpochs(events, label, epochStart, L, fs, total, recording.gapSampleIndices ?? []);
    const count = prepared.counts.find((c) => c.condition === label);
    if (count === undefined) {
      if (sel.matched === 0) {
        const present = [...new Set(recording.events.map((e) => e.label))];
        const shown = present.slice(0, 12).map((l) => `"${l}"`).join(', ') + (present.length > 12 ? ', …' : '');
        throw new AnalysisInputError(`epochs.events[${i}]`, `has no events labelled "${label}" in the recording (labels present: ${shown || 'none'})`);
      }
      const dropped = sel.droppedOutside + sel.droppedGap;
      if (sel.starts.length === 0) {
        throw new AnalysisInputError(`epochs.events[${i}]`, `: all ${sel.matched} epochs of "${label}" were dropped (${sel.droppedOutside} run past the recording's start or end, ${sel.droppedGap} span a gap)`);
      }
      if (dropped > 0) {
        warnings.push(`epochs.events[${i}] "${label}": ${dropped} of ${sel.matched} epochs dropped (${sel.droppedOutside} run past the recording's start or end, ${sel.droppedGap} span a gap)`);
      }
      droppedCounts.push(dropped);
      rejectedCounts.push(0);
    } else {
      const labelsOf = prepared.conditions.find((c) => c.name.trim() === label)!.labels.map((l) => `"${l}"`).join(', ');
      if (count.total === 0) throw new AnalysisInputError(`epochs.events[${i}]`, `names condition "${label}", which has no events in the recording (its labels: ${labelsOf})`);
      const dropped = count.outside + count.gap;
      if (sel.starts.length === 0) {
        throw new AnalysisInputError(
          `epochs.events[${i}]`,
          `: all ${count.total} epochs of "${label}" were left out (${count.rejected} rejected, ${count.outside} run past the recording's start or end, ${count.gap} span a gap)`,
        );
      }
      if (dropped > 0) {
        warnings.push(`epochs.events[${i}] "${label}": ${dropped} of ${count.total} epochs dropped (${count.outside} run past the recording's start or end, ${count.gap} span a gap)`);
      }
      if (count.rejected > 0 || count.manualKeeps > 0) {
        const byHand = count.manualRejects > 0 ? `, ${count.manualRejects} of them by hand` : '';
        const kept = count.manualKeeps > 0 ? `; ${count.manualKeeps} kept by hand against the rules` : '';
        warnings.push(`rejection "${label}": ${count.rejected} of ${count.total - dropped} epochs rejected${byHand}${kept}; ${count.kept} kept`);
      }
      droppedCounts.push(dropped);
      rejectedCounts.push(count.rejected);
    }
    epochStarts.push(sel.starts);
  });

  if (recipe.baseline.spread === 'trials') {
    epochStarts.forEach((starts, i) => {
      if (starts.length < 2) throw new AnalysisInputError('baseline.spread', `"trials" needs at least 2 kept epochs per condition for a standard deviation; "${labels[i]}" has ${starts.length}`);
    });
  }

  for (const [groupName, members] of Object.entries(recipe.channelGroups ?? {})) groupIndices({ name: groupName, channels: members }, channels);

  if (recipe.trialPower === 'induced') {
    epochStarts.forEach((starts, i) => {
      if (starts.length < 2) throw new AnalysisInputError('trialPower', `"induced" needs at least 2 kept epochs per condition (one epoch minus its own average is zero); "${labels[i]}" has ${starts.length}`);
    });
  }

  const sp = recipe.spectrum;
  const segmentSamples = roundHalfUp(sp.segment * fs);
  const overlapSamples = roundHalfUp(sp.overlap * segmentSamples);
  if (segmentSamples < 2) throw new AnalysisInputError('spectrum.segment', `spans fewer than 2 samples at ${fs} Hz`);
  if (overlapSamples >= segmentSamples) throw new AnalysisInputError('spectrum.overlap', `leaves no step between segments of ${segmentSamples} samples`);
  const [rLo, rHi] = sp.range;
  if (!(rLo >= 0 && rLo <= rHi && rHi <= nyquist)) throw new AnalysisInputError('spectrum.range', `must satisfy 0 ≤ low ≤ high ≤ Nyquist (${fmt(nyquist)} Hz); got [${rLo}, ${rHi}]`);
  const spanList: number[] = [];
  let conditionSpans: Int32Array[] | null = null;
  if (sp.source === 'recording') {
    const gaps = (recording.gapSampleIndices ?? []).filter((g) => g > 0 && g < total).sort((x, y) => x - y);
    let s0 = 0;
    for (const g of gaps) {
      spanList.push(s0, g);
      s0 = g;
    }
    spanList.push(s0, total);
    let longest = 0;
    for (let i = 0; i < spanList.length; i += 2) longest = Math.max(longest, spanList[i + 1] - spanList[i]);
    if (segmentSamples > longest) throw new AnalysisInputError('spectrum.segment', `(${sp.segment} s) is longer than the longest continuous stretch of the recording (${fmt(longest / fs)} s)`);
  } else {
    if (segmentSamples > L) throw new AnalysisInputError('spectrum.segment', `(${sp.segment} s) is longer than an epoch (${fmt(epochSeconds)} s) with spectrum.source "epochs"`);
    for (const starts of epochStarts) for (const s of starts) spanList.push(s, s + L);
    conditionSpans = epochStarts.map((starts) => Int32Array.from(Array.from(starts).flatMap((s) => [s, s + L])));
  }

  const ap = recipe.aperiodic;
  const [aLo, aHi] = ap.range;
  if (!(aLo > 0 && aLo < aHi && aHi <= nyquist)) throw new AnalysisInputError('aperiodic.range', `must satisfy 0 < low < high ≤ Nyquist (${fmt(nyquist)} Hz); got [${aLo}, ${aHi}]`);
  const binHz = fs / segmentSamples;
  const bins = Math.floor(aHi / binHz + EPS) - Math.ceil(aLo / binHz - EPS) + 1;
  const needed = ap.model === 'power-law' ? 3 : 4;
  if (bins < needed) throw new AnalysisInputError('aperiodic.range', `holds ${bins} spectrum bins of ${fmt(binHz)} Hz; the ${ap.model} fit needs at least ${needed} (widen the range or lengthen spectrum.segment)`);

  const plan: RecipePlan = {
    sampleRateHz: fs,
    channels,
    channelIndices,
    channelTypes: channelIndices.map((c) => recording.channelTypes[c]),
    channelUnits: channelIndices.map((c) => recording.channelUnits[c]),
    labels,
    epochStarts,
    dropped: droppedCounts,
    rejected: rejectedCounts,
    epochSamples: L,
    epochStartSeconds: epochStart,
    times: epochTimes(epochStart, epochEnd, fs),
    frequencies,
    sigmas,
    edgeSeconds,
    baseline: { first: b.first, last: b.last, method, scope, spread: recipe.baseline.spread ?? 'time' },
    spectrum: { segmentSamples, overlapSamples, range: [rLo, rHi], spans: Int32Array.from(spanList), conditionSpans },
    aperiodic: { range: [aLo, aHi], model: ap.model },
    itpc: recipe.itpc === true,
    induced: recipe.trialPower === 'induced',
    warnings,
  };
  return { plan, recording };
}

function rows(flat: Float64Array, nf: number, nt: number): number[][] {
  const out: number[][] = new Array(nf);
  for (let f = 0; f < nf; f++) out[f] = Array.from(flat.subarray(f * nt, (f + 1) * nt));
  return out;
}

/** Builds the contract's Result JSON from the plan and every channel's analysis, in plan channel order. */
export function assembleResult(plan: RecipePlan, channels: ChannelAnalysis[]): AnalysisResult {
  const nf = plan.frequencies.length;
  const nt = plan.times.length;
  const conditions: Record<string, ResultCondition> = {};
  plan.labels.forEach((label, c) => {
    conditions[label] = {
      trials: plan.epochStarts[c].length,
      dropped: plan.dropped[c],
      rejected: plan.rejected[c],
      power: channels.map((ch) => rows(ch.power[c], nf, nt)),
      normalized: channels.map((ch) => rows(ch.normalized[c], nf, nt)),
      ...(plan.itpc ? { itpc: channels.map((ch) => rows(ch.itpc![c], nf, nt)) } : {}),
      ...(plan.induced ? { evoked: channels.map((ch) => Array.from(ch.evoked![c])) } : {}),
    };
  });
  const resolution = resolutionOf(plan.sigmas);
  return {
    frequencies: Array.from(plan.frequencies),
    cycles: Array.from(cyclesOf(plan.frequencies, plan.sigmas)),
    edgeSeconds: Array.from(plan.edgeSeconds),
    temporalFwhmSeconds: Array.from(resolution.temporalFwhmSeconds),
    spectralFwhmHz: Array.from(resolution.spectralFwhmHz),
    times: Array.from(plan.times),
    channels: plan.channels.slice(),
    channelTypes: plan.channelTypes.slice(),
    channelUnits: plan.channelUnits.slice(),
    conditions,
    spectrum: {
      frequencies: channels.length > 0 ? Array.from(channels[0].spectrumFrequencies) : [],
      psd: channels.map((ch) => Array.from(ch.psd)),
    },
    aperiodic: channels.map((ch, i) => ({ channel: plan.channels[i], ...ch.aperiodic })),
    ...(plan.spectrum.conditionSpans !== null
      ? { aperiodicByCondition: Object.fromEntries(plan.labels.map((label, c) => [label, channels.map((ch, i) => ({ channel: plan.channels[i], ...ch.aperiodicByCondition![c] }))])) }
      : {}),
    warnings: plan.warnings.slice(),
  };
}

export interface RunOptions {
  /** Fraction of the whole run done, 0 … 1. */
  onProgress?: (fraction: number) => void;
  /** Checked between epoch blocks and channels; true stops the run with AnalysisCancelledError. */
  shouldCancel?: () => boolean;
}

/** Runs a recipe on a recording in this thread and returns the contract's Result. */
export function runRecipe(recording: Recording, recipe: unknown, options: RunOptions = {}): AnalysisResult {
  const { plan, recording: conditioned } = planRun(recording, recipe);
  const { onProgress, shouldCancel } = options;
  const n = plan.channels.length;
  const out: ChannelAnalysis[] = [];
  for (let i = 0; i < n; i++) {
    if (shouldCancel !== undefined && shouldCancel()) throw new AnalysisCancelledError();
    out.push(
      analyzeChannel(plan, conditioned.data[plan.channelIndices[i]], {
        shouldCancel,
        onProgress: onProgress === undefined ? undefined : (f) => onProgress((i + f) / n),
      }),
    );
  }
  return assembleResult(plan, out);
}
