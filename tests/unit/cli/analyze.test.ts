import { execFile } from 'node:child_process';
import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { promisify } from 'node:util';
import { beforeAll, describe, expect, it, vi } from 'vitest';
import { runRecipe } from '../../../src/lib/analysis/run-recipe';
import { bytesSource, openEdf, parseBidsEvents, parseCsvSamples, toRecording, writeEdf } from '../../../src/lib/formats';
import { createHash } from 'node:crypto';
import { seededNormal } from '../../helpers/seeded-random';

// These tests start the command line in a child process (tsx), several runs per test: on a loaded two-core
// machine one run alone has taken 15 s, so they get more than the suite's 30 s.
vi.setConfig({ testTimeout: 120_000 });

const run = promisify(execFile);
const root = fileURLToPath(new URL('../../..', import.meta.url));

interface Outcome {
  code: number;
  stdout: string;
  stderr: string;
}

async function analyze(args: string[]): Promise<Outcome> {
  try {
    const { stdout, stderr } = await run(process.execPath, ['--import', 'tsx', 'src/cli/analyze.ts', ...args], {
      cwd: root,
      maxBuffer: 256 * 1024 * 1024,
    });
    return { code: 0, stdout, stderr };
  } catch (e) {
    const err = e as { code: number; stdout: string; stderr: string };
    return { code: err.code, stdout: err.stdout, stderr: err.stderr };
  }
}

// Scenario of our own: a two-channel 100 Hz "reach task" with go/stop cues every 2.5 s.
const fs = 100;
const seconds = 40;
const dir = mkdtempSync(join(tmpdir(), 'tidemark-cli-'));
const file = (name: string) => join(dir, name);
const recipe = {
  format: 2,
  epochs: { events: ['go', 'stop'], start: -0.5, end: 1.0 },
  channels: ['C3', 'C4'],
  frequencies: { min: 4, max: 30, count: 5, spacing: 'log' },
  cycles: { min: 3, max: 6 },
  baseline: { start: -0.4, end: -0.1, method: 'decibel', scope: 'average' },
  spectrum: { segment: 2, overlap: 0.5, range: [1, 40], source: 'recording' },
  aperiodic: { range: [2, 40], model: 'power-law' },
};

beforeAll(() => {
  const normal = seededNormal(8);
  const c3 = new Float64Array(fs * seconds);
  const c4 = new Float64Array(fs * seconds);
  let csv = 'C3,C4\n';
  for (let i = 0; i < c3.length; i++) {
    c3[i] = Math.round(4 * normal() * 1000) / 1000;
    c4[i] = Math.round((4 * normal() + 6 * Math.sin((2 * Math.PI * 12 * i) / fs)) * 1000) / 1000;
    csv += `${c3[i]},${c4[i]}\n`;
  }
  writeFileSync(file('rec.csv'), csv);
  let events = 'onset\tduration\ttrial_type\n';
  for (let k = 0; k < 14; k++) events += `${2 + 2.5 * k}\tn/a\t${k % 2 === 0 ? 'go' : 'stop'}\n`;
  writeFileSync(file('events.tsv'), events);
  // the same cues with a response time each (0.3 … 0.69 s) and a "correct" column, for eventTable
  let withRt = 'onset\tduration\ttrial_type\tresponse_time\tcorrect\n';
  for (let k = 0; k < 14; k++) withRt += `${2 + 2.5 * k}\tn/a\t${k % 2 === 0 ? 'go' : 'stop'}\t${(0.3 + 0.03 * k).toFixed(2)}\t${k % 3 === 0 ? 'no' : 'yes'}\n`;
  writeFileSync(file('events-rt.tsv'), withRt);
  writeFileSync(file('recipe.json'), JSON.stringify(recipe));
  const put = (name: string, change: object) => writeFileSync(file(name), JSON.stringify({ ...recipe, ...change }));
  // the same recipe as format 1 wrote it (no "format"; tmin/tmax, "db", mode "fixed")
  writeFileSync(
    file('format1.json'),
    JSON.stringify({ ...recipe, format: undefined, epochs: { events: recipe.epochs.events, tmin: -0.5, tmax: 1.0 }, baseline: { ...recipe.baseline, method: 'db' }, aperiodic: { range: [2, 40], mode: 'fixed' } }),
  );
  put('itpc.json', { itpc: true });
  put('itpc-bad.json', { itpc: 1 });
  put('induced.json', { trialPower: 'induced', itpc: true });
  put('start-after-end.json', { epochs: { ...recipe.epochs, start: 1.0 } });
  put('baseline.json', { baseline: { ...recipe.baseline, start: -0.9 } });
  put('nyquist.json', { frequencies: { ...recipe.frequencies, max: 50 } });
  put('cycles.json', { cycles: { fixed: 9 } });
  put('channel.json', { channels: ['C3', 'Cz'] });
  put('label.json', { epochs: { ...recipe.epochs, events: ['go', 'wait'] } });
  put('type.json', { signals: { types: { C4: 'scalp' } } });
  put('bad-channel.json', { signals: { bad: ['C4'] } });
  put('highpass.json', { filters: { highPass: { cutoffHz: 50 } } });
  put('notch.json', { filters: { notch: { harmonics: 2 } } });
  put('locked.json', { eventTable: { where: ['correct == yes'], shiftBy: 'response_time' } });
  put('reference.json', { reference: { kind: 'mean-of-channels', channels: ['A1'] } });
  put('bad-reference.json', { channels: ['C3'], signals: { bad: ['C4'] }, reference: { kind: 'mean-of-channels', channels: ['C4'] } });
  writeFileSync(file('broken.json'), '{"epochs": ');
  writeFileSync(file('ragged.csv'), 'C3,C4\n1,2\n3\n');
  // the same samples as EDF+ with the cues as annotations
  writeFileSync(
    file('rec.edf'),
    writeEdf({
      start: { year: 2024, month: 3, day: 1, hour: 9, minute: 0, second: 0 },
      recordDurationSeconds: 1,
      signals: [
        { label: 'EEG C3', physicalDimension: 'uV', physicalMin: -100, physicalMax: 100, samplesPerRecord: fs, samples: c3 },
        { label: 'EEG C4', physicalDimension: 'uV', physicalMin: -100, physicalMax: 100, samplesPerRecord: fs, samples: c4 },
      ],
      annotations: Array.from({ length: 14 }, (_, k) => ({ onsetSeconds: 2 + 2.5 * k, texts: [k % 2 === 0 ? 'go' : 'stop'] })),
    }),
  );
});

describe('analyze command line', () => {
  it('writes the Result JSON for a CSV recording with BIDS events, identical to the core run in process', async () => {
    const out = await analyze([file('rec.csv'), '--recipe', file('recipe.json'), '--events', file('events.tsv'), '--rate', '100', '--out', file('out.json')]);
    expect(out.stderr).toBe('');
    expect(out.code).toBe(0);
    const result = JSON.parse(readFileSync(file('out.json'), 'utf8'));
    expect(result.channels).toEqual(['C3', 'C4']);
    expect(result.conditions.go.trials).toBe(7);
    expect(result.conditions.go.power[1].length).toBe(5);
    expect(result.times.length).toBe(151);
    // the same core on the same input in this process gives the same numbers (JSON round trip is exact)
    const recording = parseCsvSamples(readFileSync(file('rec.csv'), 'utf8'), { sampleRateHz: fs });
    recording.events = parseBidsEvents(readFileSync(file('events.tsv'), 'utf8')).events.map((e) => ({ onsetSeconds: e.onsetSeconds, durationSeconds: e.durationSeconds, label: e.label }));
    const local = JSON.parse(JSON.stringify(runRecipe(recording, recipe)));
    expect(result.conditions).toEqual(local.conditions);
    expect(result.aperiodic).toEqual(local.aperiodic);
  });

  it('adds inter-trial phase consistency beside power with "itpc": true (analysis contract)', async () => {
    const plain = JSON.parse((await analyze([file('rec.edf'), '--recipe', file('recipe.json')])).stdout);
    const out = await analyze([file('rec.edf'), '--recipe', file('itpc.json')]);
    expect(out.stderr).toBe('');
    expect(out.code).toBe(0);
    const result = JSON.parse(out.stdout);
    for (const label of ['go', 'stop']) {
      expect(plain.conditions[label].itpc).toBeUndefined();
      const itpc = result.conditions[label].itpc as number[][][];
      expect(itpc.length).toBe(2);
      expect(itpc[0].length).toBe(5);
      expect(itpc[0][0].length).toBe(151);
      for (const v of itpc.flat(2)) expect(v >= 0 && v <= 1 + 1e-12).toBe(true);
      expect(result.conditions[label].power).toEqual(plain.conditions[label].power);
    }
    const bad = await analyze([file('rec.edf'), '--recipe', file('itpc-bad.json')]);
    expect(bad.code).toBe(2);
    expect(bad.stderr.trim().split('\n')).toHaveLength(1);
    expect(bad.stderr).toMatch(/itpc/);
  });

  it('takes the evoked response out with "trialPower": "induced" and reports it per condition', async () => {
    const plain = JSON.parse((await analyze([file('rec.edf'), '--recipe', file('itpc.json')])).stdout);
    const out = await analyze([file('rec.edf'), '--recipe', file('induced.json')]);
    expect(out.stderr).toBe('');
    expect(out.code).toBe(0);
    const result = JSON.parse(out.stdout);
    const evoked = result.conditions.go.evoked as number[][];
    expect(evoked).toHaveLength(2);
    expect(evoked[0]).toHaveLength(151);
    // induced power is total power less the evoked part, so never above it by more than rounding, and phase
    // consistency still describes the whole epochs
    const t = plain.conditions.go.power[1].flat();
    const i = result.conditions.go.power[1].flat();
    t.forEach((v: number, k: number) => expect(i[k]).toBeLessThanOrEqual(v * (1 + 1e-9)));
    expect(result.conditions.go.itpc[1][2][75]).toBeCloseTo(plain.conditions.go.itpc[1][2][75], 9);
  });

  it('reads EDF+ with annotations as events and prints to standard output', async () => {
    const out = await analyze([file('rec.edf'), '--recipe', file('recipe.json')]);
    expect(out.stderr).toBe('');
    expect(out.code).toBe(0);
    const result = JSON.parse(out.stdout);
    expect(result.channels).toEqual(['C3', 'C4']);
    expect(result.conditions.stop.trials).toBe(7);
    // 12 Hz rhythm on C4 only: its spectrum peaks there
    const k = result.spectrum.frequencies.indexOf(12);
    expect(result.spectrum.psd[1][k]).toBeGreaterThan(10 * result.spectrum.psd[0][k]);
  });

  it('reads a format-1 recipe with a one-line notice on stderr and gives the same output as format 2', async () => {
    // Analysis contract, "Recipe (input), format 2": format 1 is read and upgraded, never silently.
    const two = await analyze([file('rec.edf'), '--recipe', file('recipe.json')]);
    const one = await analyze([file('rec.edf'), '--recipe', file('format1.json')]);
    expect(one.code).toBe(0);
    const lines = one.stderr.split('\n').filter((l) => l !== '');
    expect(lines).toHaveLength(1);
    expect(lines[0]).toMatch(/^analyze: .*format1\.json: recipe format 1 \(no "format" field\) read and upgraded to format 2: epochs\.tmin\/tmax → epochs\.start\/end/);
    expect(one.stdout).toBe(two.stdout);
  });

  it('honours the recipe reference: the same numbers as the core in process, and not those without it', async () => {
    writeFileSync(file('average.json'), JSON.stringify({ ...recipe, reference: { kind: 'common-average' } }));
    const out = await analyze([file('rec.edf'), '--recipe', file('average.json')]);
    expect(out.code).toBe(0);
    const edf = toRecording(await openEdf(bytesSource(readFileSync(file('rec.edf')))));
    expect(out.stdout).toBe(JSON.stringify(runRecipe(edf, { ...recipe, reference: { kind: 'common-average' } })) + '\n');
    // With two channels the common average leaves C3 = −C4 = (C3 − C4)/2: their powers become equal.
    const r = JSON.parse(out.stdout);
    expect(r.conditions.go.power[0]).toEqual(r.conditions.go.power[1]);
  });

  it('selects events by a column and locks epochs to the response with the recipe eventTable', async () => {
    const out = await analyze([file('rec.csv'), '--recipe', file('locked.json'), '--events', file('events-rt.tsv'), '--rate', '100']);
    expect(out.code).toBe(0);
    const r = JSON.parse(out.stdout);
    // k = 0 … 13 with k mod 3 ≠ 0 are correct: go at k = 2, 4, 8, 10 and stop at k = 1, 5, 7, 11, 13 (by hand)
    expect([r.conditions.go.trials, r.conditions.stop.trials]).toEqual([4, 5]);
    expect(r.warnings).toContain('eventTable.where: 9 of 14 events selected');
    // the same as the core on events moved by hand to onset + response_time
    const recording = parseCsvSamples(readFileSync(file('rec.csv'), 'utf8'), { sampleRateHz: fs });
    recording.events = [];
    for (let k = 0; k < 14; k++) if (k % 3 !== 0) recording.events.push({ onsetSeconds: 2 + 2.5 * k + Number((0.3 + 0.03 * k).toFixed(2)), durationSeconds: 0, label: k % 2 === 0 ? 'go' : 'stop' });
    const local = JSON.parse(JSON.stringify(runRecipe(recording, JSON.parse(readFileSync(file('locked.json'), 'utf8')))));
    expect(r.conditions).toEqual(local.conditions);
  });

  it('honours conditions, rejection rules and manual overrides like the core in process, and checks the fingerprint', async () => {
    const edfBytes = readFileSync(file('rec.edf'));
    const recording = toRecording(await openEdf(bytesSource(new Uint8Array(edfBytes))));
    // Independent count: peak-to-peak (max − min) of C3 over each epoch's 151 samples from round(o·fs) − 50
    // (analysis contract, "Units and grids"), against a 21 µV limit, near the typical range of 151 samples of 4 µV noise.
    const c3 = recording.data[0];
    const limit = 21;
    const overLimit = recording.events.map((e) => {
      const start = Math.round(e.onsetSeconds * fs) - 50;
      let lo = Infinity;
      let hi = -Infinity;
      for (let i = start; i < start + 151; i++) (lo = Math.min(lo, c3[i])), (hi = Math.max(hi, c3[i]));
      return hi - lo > limit;
    });
    const rescued = overLimit.findIndex((x, i) => x && recording.events[i].label === 'go');
    const dropped = overLimit.findIndex((x, i) => !x && recording.events[i].label === 'stop');
    expect(rescued).toBeGreaterThanOrEqual(0);
    expect(dropped).toBeGreaterThanOrEqual(0);
    const key = (i: number) => `${i}@${recording.events[i].onsetSeconds}:${recording.events[i].label}`;
    const extended = {
      ...recipe,
      epochs: { ...recipe.epochs, events: ['reach', 'halt'] },
      conditions: { reach: ['go'], halt: ['stop'] },
      rejection: { peakToPeakMicrovolts: limit, flatMicrovolts: null, scope: 'channel', channels: ['C3'], overrides: { [key(rescued)]: 'keep', [key(dropped)]: 'reject' } },
      recording: { fingerprint: createHash('sha256').update(edfBytes).digest('hex') },
    };
    writeFileSync(file('extended.json'), JSON.stringify(extended));
    const out = await analyze([file('rec.edf'), '--recipe', file('extended.json'), '--out', file('extended-out.json')]);
    expect(out.stderr).toBe('');
    expect(out.code).toBe(0);
    const result = JSON.parse(readFileSync(file('extended-out.json'), 'utf8'));
    const kept = (label: string) => recording.events.filter((e, i) => e.label === label && (i === rescued || (!overLimit[i] && i !== dropped))).length;
    expect(result.conditions.reach.trials).toBe(kept('go'));
    expect(result.conditions.halt.trials).toBe(kept('stop'));
    expect(result.conditions.halt.rejected).toBe(7 - kept('stop'));
    expect(result.warnings.some((w: string) => w.startsWith('recording.fingerprint'))).toBe(false);
    const local = JSON.parse(JSON.stringify(runRecipe(recording, extended)));
    expect(result.conditions).toEqual(local.conditions);
    expect(result.aperiodic).toEqual(local.aperiodic);

    // The same recipe on the CSV copy (same events, another file): the numbers differ in the last bits of the
    // EDF's 16-bit steps, and the result says the file is not the one the recipe was made on.
    const csv = await analyze([file('rec.csv'), '--recipe', file('extended.json'), '--events', file('events.tsv'), '--rate', '100']);
    expect(csv.code).toBe(0);
    expect(JSON.parse(csv.stdout).warnings.some((w: string) => w.startsWith('recording.fingerprint: the recipe was made on a recording with SHA-256'))).toBe(true);
  });

  const bad: [string, string[], RegExp][] = [
    ['an unreadable recording', ['missing.csv', '--recipe', 'recipe.json', '--rate', '100'], /missing\.csv: cannot be read \(ENOENT\)/],
    ['a recipe that is not JSON', ['rec.csv', '--recipe', 'broken.json', '--rate', '100'], /broken\.json: is not valid JSON/],
    ['a CSV without --rate', ['rec.csv', '--recipe', 'recipe.json'], /--rate: is required/],
    ['a ragged CSV row', ['ragged.csv', '--recipe', 'recipe.json', '--rate', '100'], /ragged\.csv: .*\brow 3\b/],
    ['an unknown channel', ['rec.csv', '--recipe', 'channel.json', '--events', 'events.tsv', '--rate', '100'], /channel\.json: channels\[1\] names no signal in the recording \("Cz"/],
    ['no events of a label', ['rec.csv', '--recipe', 'label.json', '--events', 'events.tsv', '--rate', '100'], /label\.json: epochs\.events\[1\] has no events labelled "wait"/],
    ['start ≥ end', ['rec.csv', '--recipe', 'start-after-end.json', '--events', 'events.tsv', '--rate', '100'], /start-after-end\.json: epochs\.start must be less than epochs\.end/],
    ['a baseline outside the epoch', ['rec.csv', '--recipe', 'baseline.json', '--events', 'events.tsv', '--rate', '100'], /baseline\.json: baseline\.start is before the epoch start/],
    ['a max frequency at Nyquist', ['rec.csv', '--recipe', 'nyquist.json', '--events', 'events.tsv', '--rate', '100'], /nyquist\.json: frequencies\.max must be below the Nyquist frequency \(50 Hz/],
    ['too few cycles for the epoch length', ['rec.csv', '--recipe', 'cycles.json', '--events', 'events.tsv', '--rate', '100'], /cycles\.json: cycles is too many for the epoch length/],
    ['an unknown channel type', ['rec.csv', '--recipe', 'type.json', '--events', 'events.tsv', '--rate', '100'], /type\.json: signals\.types\.C4 must be a channel type: "eeg", "eog"/],
    ['a channel marked bad and still named', ['rec.csv', '--recipe', 'bad-channel.json', '--events', 'events.tsv', '--rate', '100'], /bad-channel\.json: channels\[1\] "C4" is marked bad \(signals\.bad\)/],
    ['a reference channel the recording lacks', ['rec.csv', '--recipe', 'reference.json', '--events', 'events.tsv', '--rate', '100'], /reference\.json: reference\.channels\[0\] names no signal in the recording \("A1"/],
    ['a reference channel marked bad', ['rec.csv', '--recipe', 'bad-reference.json', '--events', 'events.tsv', '--rate', '100'], /bad-reference\.json: reference\.channels\[0\] "C4" is marked bad/],
    ['a high-pass at Nyquist', ['rec.csv', '--recipe', 'highpass.json', '--events', 'events.tsv', '--rate', '100'], /highpass\.json: filters\.highPass\.cutoffHz must be above 0 and below the Nyquist frequency \(50 Hz/],
    ['a notch without a line frequency', ['rec.csv', '--recipe', 'notch.json', '--events', 'events.tsv', '--rate', '100'], /notch\.json: filters\.notch\.lineHz is required for a notch/],
    ['an eventTable without an events file', ['rec.csv', '--recipe', 'locked.json', '--rate', '100'], /--events: is required: the recipe's eventTable selects rows of a BIDS events file/],
    ['an eventTable naming a column the events file lacks', ['rec.csv', '--recipe', 'locked.json', '--events', 'events.tsv', '--rate', '100'], /locked\.json: eventTable\.where\[0\] names column "correct", which the events file lacks/],
    ['an unknown option', ['rec.csv', '--recipe', 'recipe.json', '--colour', 'red'], /--colour: is not an option/],
  ];
  it.each(bad)('exits 2 with one line on stderr for %s', async (_what, args, message) => {
    const withPaths = args.map((a) => (/\.(csv|json|tsv|edf)$/.test(a) ? file(a) : a));
    const out = await analyze(withPaths);
    expect(out.code).toBe(2);
    expect(out.stdout).toBe('');
    const lines = out.stderr.split('\n').filter((l) => l !== '');
    expect(lines.length, out.stderr).toBe(1);
    expect(lines[0]).toMatch(message);
    expect(lines[0]).not.toMatch(/\bat .*:\d+:\d+/); // no stack frames
  });
});
