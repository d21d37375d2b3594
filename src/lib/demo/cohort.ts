/**
 * The demo cohort, an invented scenario: the Saltmarsh Rhythms Lab's "Harbour Lights" task (the demo team of src/db/seed.ts). Participants watch a harbour
 * at dusk. On `lamp-watch` trials a lighthouse lamp blinks a pattern to remember (a frontal-midline power increase
 * near 6 Hz follows); on `oar-pull` trials a rowing boat appears and they squeeze a handle (an ongoing central
 * rhythm near 20 Hz is suppressed after the cue). Subjects are TM-S01…; nobody real is behind any of it.
 *
 * Everything is derived from one seed, so the same options always give byte-identical EDF+ files.
 */
import type { RecordingEvent } from '../analysis/recording';
import { writeEdf } from '../formats/edf-writer';
import { synthesizeAperiodic } from './aperiodic-noise';
import { DEMO_CHANNELS, topographyGains } from './montage';
import { createRandom, mix32 } from './random';

/** Bump when the synthesis changes, so cached files are rewritten. */
export const DEMO_GENERATOR_VERSION = 1;
export const DEMO_PATIENT_FIELD = 'X X X DEMO-ONLY-NOT-A-PERSON';
export const DEMO_LAB = 'Saltmarsh Rhythms Lab (invented)';
export const DEMO_TASK = 'Harbour Lights (invented)';
export const DEMO_CONDITIONS = {
  'lamp-watch': 'a lighthouse lamp blinks a pattern to remember; power near 6 Hz rises after the cue',
  'oar-pull': 'a rowing boat appears and the handle is squeezed; the ongoing rhythm near 20 Hz is suppressed',
} as const;

export interface CohortOptions {
  seed?: number;
  subjects?: number;
  seconds?: number;
}

export interface DemoArtifact {
  /** Index into the subject's events. */
  eventIndex: number;
  kind: 'step' | 'spike' | 'flat';
  channels: string[];
  startSeconds: number;
  endSeconds: number;
  /** Size of the step or spike in µV; 0 for a flat stretch (the signal is held at its first value). */
  amplitudeUv: number;
}

export interface DemoEvent {
  onsetSeconds: number;
  durationSeconds: number | null;
  label: keyof typeof DEMO_CONDITIONS;
}

export interface SubjectParameters {
  generatorVersion: number;
  code: string;
  fileName: string;
  seed: number;
  sampleRateHz: number;
  seconds: number;
  recordSeconds: number;
  start: { year: number; month: number; day: number; hour: number; minute: number; second: number };
  channels: string[];
  /** Aperiodic exponent χ per channel (power ∝ f^−χ). */
  exponents: number[];
  /** RMS of the aperiodic background per channel, µV. */
  backgroundRmsUv: number[];
  theta: {
    label: 'lamp-watch';
    frequencyHz: number;
    /** Peak amplitude of the added burst at the centre channel, µV. */
    amplitudeUv: number;
    centre: string;
    /** The burst's Hann envelope runs from latency to latency + duration after each cue. */
    latencySeconds: number;
    durationSeconds: number;
    gains: number[];
  };
  beta: {
    label: 'oar-pull';
    frequencyHz: number;
    /** Amplitude of the ongoing rhythm at the centre channel, µV. */
    amplitudeUv: number;
    /** Fraction of the amplitude removed at the bottom of the dip. */
    suppression: number;
    centre: string;
    latencySeconds: number;
    durationSeconds: number;
    gains: number[];
  };
  events: DemoEvent[];
  artifacts: DemoArtifact[];
}

export interface CohortParameters {
  generatorVersion: number;
  lab: string;
  task: string;
  conditions: typeof DEMO_CONDITIONS;
  seed: number;
  subjects: SubjectParameters[];
}

const round = (x: number, digits: number) => Number(x.toFixed(digits));

/** Every subject's parameters: cheap, so a script can compare them with a previous run before synthesising. */
export function describeCohort(options: CohortOptions = {}): CohortParameters {
  const seed = options.seed ?? 20240314;
  const count = options.subjects ?? 12;
  const seconds = options.seconds ?? 300;
  const subjects: SubjectParameters[] = [];
  for (let i = 0; i < count; i++) subjects.push(describeSubject(mix32(seed + i * 7919), i, seconds));
  return { generatorVersion: DEMO_GENERATOR_VERSION, lab: DEMO_LAB, task: DEMO_TASK, conditions: DEMO_CONDITIONS, seed, subjects };
}

function describeSubject(seed: number, index: number, seconds: number): SubjectParameters {
  if (!(seconds >= 10 && Number.isInteger(seconds))) throw new Error('demo recordings need a whole number of seconds ≥ 10');
  const random = createRandom(seed);
  const fs = 500;
  const channels = DEMO_CHANNELS.map((c) => c.name);
  const exponents = channels.map(() => round(random.uniform(1, 2), 3));
  const backgroundRmsUv = channels.map(() => round(random.uniform(8, 12), 2));
  const theta = {
    label: 'lamp-watch' as const,
    frequencyHz: round(random.uniform(5.5, 6.5), 2),
    amplitudeUv: round(random.uniform(8, 11), 2),
    centre: 'Fz',
    latencySeconds: 0.1,
    durationSeconds: 0.6,
    gains: topographyGains('Fz', 0.35).map((g) => round(g, 3)),
  };
  const beta = {
    label: 'oar-pull' as const,
    frequencyHz: round(random.uniform(19, 21), 2),
    amplitudeUv: round(random.uniform(3, 5), 2),
    suppression: round(random.uniform(0.5, 0.7), 2),
    centre: 'Cz',
    latencySeconds: 0.2,
    durationSeconds: 0.6,
    gains: topographyGains('Cz', 0.4).map((g) => round(g, 3)),
  };

  // ~60 cues per condition in 5 minutes, evenly spread with jitter, on the sample grid, 3 s clear at each end.
  const perCondition = Math.max(1, Math.round((60 * seconds) / 300));
  const total = 2 * perCondition;
  const spacing = (seconds - 6) / total;
  const labels: DemoEvent['label'][] = [];
  for (let k = 0; k < total; k++) labels.push(k < perCondition ? 'lamp-watch' : 'oar-pull');
  for (let k = total - 1; k > 0; k--) {
    const j = random.integer(0, k);
    [labels[k], labels[j]] = [labels[j], labels[k]];
  }
  const jitter = Math.min(0.2, spacing / 4);
  const events: DemoEvent[] = labels.map((label, k) => ({
    onsetSeconds: Math.round((3 + (k + 0.5) * spacing + random.uniform(-jitter, jitter)) * fs) / fs,
    durationSeconds: label === 'lamp-watch' ? 0.5 : null,
    label,
  }));

  // About one epoch in twenty carries an artifact that rejection should find.
  const artifactCount = Math.max(1, Math.round(total / 20) + random.integer(-1, 1));
  const chosen = new Set<number>();
  while (chosen.size < Math.min(artifactCount, total)) chosen.add(random.integer(0, total - 1));
  const artifacts: DemoArtifact[] = [...chosen]
    .sort((a, b) => a - b)
    .map((eventIndex) => {
      const onset = events[eventIndex].onsetSeconds;
      const kind = (['step', 'spike', 'flat'] as const)[random.integer(0, 2)];
      const first = random.integer(0, channels.length - 1);
      const picked = kind === 'step' ? [first, (first + 1 + random.integer(0, channels.length - 2)) % channels.length] : [first];
      const names = [...new Set(picked)].sort((a, b) => a - b).map((c) => channels[c]);
      const at = round(onset + random.uniform(-0.3, 1.2), 3);
      if (kind === 'step') return { eventIndex, kind, channels: names, startSeconds: at, endSeconds: round(at + 0.3, 3), amplitudeUv: round(random.uniform(250, 400), 1) };
      if (kind === 'spike') return { eventIndex, kind, channels: names, startSeconds: at, endSeconds: round(at + 0.03, 3), amplitudeUv: round(random.uniform(300, 500), 1) };
      return { eventIndex, kind, channels: names, startSeconds: round(onset - 1.5, 3), endSeconds: round(onset + 2.5, 3), amplitudeUv: 0 };
    });

  const number = String(index + 1).padStart(2, '0');
  return {
    generatorVersion: DEMO_GENERATOR_VERSION,
    code: `TM-S${number}`,
    fileName: `harbour-lights-${number}.edf`,
    seed,
    sampleRateHz: fs,
    seconds,
    recordSeconds: 1,
    start: { year: 2024, month: 3, day: 4 + (index % 20), hour: 9 + (index % 8), minute: 30, second: 0 },
    channels,
    exponents,
    backgroundRmsUv,
    theta,
    beta,
    events,
    artifacts,
  };
}

/** Hann bump on [0, 1]: 0.5·(1 − cos 2πu), zero outside. */
const hann = (u: number) => (u <= 0 || u >= 1 ? 0 : 0.5 * (1 - Math.cos(2 * Math.PI * u)));

/**
 * One subject's signals in µV: aperiodic background + the ongoing ~20 Hz rhythm (dipping after `oar-pull`) +
 * ~6 Hz bursts after `lamp-watch` (random phase per trial) + the listed artifacts.
 */
export function synthesizeSubject(p: SubjectParameters): { data: Float32Array[]; events: RecordingEvent[] } {
  const fs = p.sampleRateHz;
  const n = p.seconds * fs;
  const random = createRandom(p.seed ^ 0x5eed);
  const data = p.channels.map(() => new Float32Array(n));
  synthesizeAperiodic(data, p.exponents, p.backgroundRmsUv, fs, random);

  // Ongoing rhythm: slow amplitude wander, multiplied by the post-cue dip of every oar-pull event.
  const envelope = new Float64Array(n);
  const wanderHz = 0.11;
  const wanderPhase = random.uniform(0, 2 * Math.PI);
  for (let i = 0; i < n; i++) envelope[i] = 1 + 0.25 * Math.sin(2 * Math.PI * wanderHz * (i / fs) + wanderPhase);
  for (const e of p.events) {
    if (e.label !== p.beta.label) continue;
    const i0 = Math.round((e.onsetSeconds + p.beta.latencySeconds) * fs);
    const len = Math.round(p.beta.durationSeconds * fs);
    for (let j = 0; j < len && i0 + j < n; j++) envelope[i0 + j] *= 1 - p.beta.suppression * hann(j / len);
  }
  const betaPhase = random.uniform(0, 2 * Math.PI);
  const w = (2 * Math.PI * p.beta.frequencyHz) / fs;
  for (let c = 0; c < data.length; c++) {
    const a = p.beta.amplitudeUv * p.beta.gains[c];
    if (a < 0.01) continue;
    const x = data[c];
    for (let i = 0; i < n; i++) x[i] += a * envelope[i] * Math.sin(w * i + betaPhase);
  }

  const wt = (2 * Math.PI * p.theta.frequencyHz) / fs;
  for (const e of p.events) {
    if (e.label !== p.theta.label) continue;
    const i0 = Math.round((e.onsetSeconds + p.theta.latencySeconds) * fs);
    const len = Math.round(p.theta.durationSeconds * fs);
    const phase = random.uniform(0, 2 * Math.PI);
    for (let c = 0; c < data.length; c++) {
      const a = p.theta.amplitudeUv * p.theta.gains[c];
      if (a < 0.01) continue;
      const x = data[c];
      for (let j = 0; j < len && i0 + j < n; j++) x[i0 + j] += a * hann(j / len) * Math.sin(wt * j + phase);
    }
  }

  for (const art of p.artifacts) {
    const i0 = Math.max(0, Math.round(art.startSeconds * fs));
    const i1 = Math.min(n, Math.round(art.endSeconds * fs));
    for (const name of art.channels) {
      const x = data[p.channels.indexOf(name)];
      if (art.kind === 'flat') {
        x.fill(x[i0], i0, i1);
      } else if (art.kind === 'step') {
        for (let i = i0; i < i1; i++) x[i] += art.amplitudeUv;
      } else {
        // Biphasic spike: one period of a sine over the span.
        for (let i = i0; i < i1; i++) x[i] += art.amplitudeUv * Math.sin((2 * Math.PI * (i - i0)) / (i1 - i0));
      }
    }
  }

  const events = p.events.map((e) => ({ onsetSeconds: e.onsetSeconds, durationSeconds: e.durationSeconds ?? 0, label: e.label }));
  return { data, events };
}

const MONTHS = ['JAN', 'FEB', 'MAR', 'APR', 'MAY', 'JUN', 'JUL', 'AUG', 'SEP', 'OCT', 'NOV', 'DEC'];

/** The subject as EDF+C bytes from our writer: 1-s records, 0.1 µV digital steps, events as TALs. */
export function writeSubjectEdf(p: SubjectParameters): Uint8Array<ArrayBuffer> {
  const { data } = synthesizeSubject(p);
  const s = p.start;
  return writeEdf({
    variant: 'EDF+C',
    patientIdentification: DEMO_PATIENT_FIELD,
    recordingIdentification: `Startdate ${String(s.day).padStart(2, '0')}-${MONTHS[s.month - 1]}-${s.year} HARBOUR-LIGHTS X SYNTHETIC-DEMO`,
    start: s,
    recordDurationSeconds: p.recordSeconds,
    signals: p.channels.map((name, c) => ({
      label: `EEG ${name}`,
      transducer: 'synthetic demo signal',
      physicalDimension: 'uV',
      physicalMin: -3276.8,
      physicalMax: 3276.7,
      prefiltering: 'none (synthetic; aperiodic spectrum flat below 1 Hz)',
      samplesPerRecord: p.sampleRateHz * p.recordSeconds,
      samples: data[c],
    })),
    annotations: p.events.map((e) => ({ onsetSeconds: e.onsetSeconds, durationSeconds: e.durationSeconds, texts: [e.label] })),
  });
}
