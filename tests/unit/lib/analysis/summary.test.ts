// The review summary (src/lib/analysis/summary.ts) checked against the schema the server applies (SummaryInput),
// against the Result the same run gives (its own maps and fits, read with our own loops here), and against the
// core's trial-scope normalization (an average of per-trial normalized maps computed by decomposeChannel as trials
// stream, a different code path from the builder's per-trial rows). The command line's `--summary` file is checked
// for the recording's SHA-256 (node:crypto) and for the absence of every identifying string of its EDF.
import { execFile } from 'node:child_process';
import { createHash } from 'node:crypto';
import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { promisify } from 'node:util';
import { beforeAll, describe, expect, it, vi } from 'vitest';
import { analyzeChannel, assembleResult, planRun } from '../../../../src/lib/analysis/run-recipe';
import type { Recording } from '../../../../src/lib/analysis/recording';
import { buildSummary, DEFAULT_SUMMARY_BANDS, resolveSummarySpec, summaryValue } from '../../../../src/lib/analysis/summary';
import { AnalysisInputError } from '../../../../src/lib/analysis/errors';
import { writeEdf } from '../../../../src/lib/formats';
import { SummaryInput } from '../../../../src/lib/schemas/review';
import { seededNormal } from '../../../helpers/seeded-random';

// These tests start the command line in a child process (tsx), several runs per test: on a loaded two-core
// machine one run alone has taken 15 s, so they get more than the suite's 30 s.
vi.setConfig({ testTimeout: 120_000 });

// Scenario of our own: a "kite-string" task, 4 channels at 100 Hz, 80 s, "tug" and "slack" cues every 2 s;
// a 10 Hz rhythm on Pz that grows after each tug.
const FS = 100;
const SECONDS = 80;
const NAMES = ['Fz', 'Cz', 'Pz', 'Oz'];

function samples(): Float32Array[] {
  const normal = seededNormal(31);
  const data = NAMES.map(() => new Float32Array(FS * SECONDS));
  for (let i = 0; i < FS * SECONDS; i++) {
    const t = i / FS;
    const sincePulse = (t - 2) % 4; // tugs at 2, 6, 10, …
    const burst = t >= 2 && sincePulse >= 0.1 && sincePulse < 0.9 ? 3 : 1;
    data.forEach((d, c) => {
      d[i] = Math.round((5 * normal() + (c === 2 ? 6 * burst * Math.sin(2 * Math.PI * 10 * t) : 0)) * 100) / 100;
    });
  }
  return data;
}
const events = Array.from({ length: 38 }, (_, k) => ({ onsetSeconds: 2 + 2 * k, durationSeconds: 0, label: k % 2 === 0 ? 'tug' : 'slack' }));

function recording(): Recording {
  return { sampleRateHz: FS, channelNames: NAMES.slice(), data: samples(), events };
}

const recipe = (patch: Record<string, unknown> = {}) => ({
  format: 2,
  epochs: { events: ['tug', 'slack'], start: -0.6, end: 1.4 },
  frequencies: { min: 4, max: 40, count: 12, spacing: 'log' },
  cycles: { min: 3, max: 6 },
  baseline: { start: -0.5, end: -0.2, method: 'percent-change', scope: 'trial' },
  spectrum: { segment: 1, overlap: 0.5, range: [1, 45], source: 'epochs' },
  aperiodic: { range: [2, 40], model: 'power-law' },
  ...patch,
});

function run(rec: Recording, r: object, trials = true) {
  const { plan, recording: conditioned } = planRun(rec, r);
  const channels = plan.channels.map((_, i) => analyzeChannel(plan, conditioned.data[plan.channelIndices[i]], { singleTrials: trials }));
  return { plan, channels, result: assembleResult(plan, channels) };
}

/** Edge zone test of the analysis contract, written out here: closer than edgeSeconds[f] to either epoch end. */
function inEdge(times: number[], edgeSeconds: number[], f: number, t: number): boolean {
  return times[t] - times[0] < edgeSeconds[f] || times[times.length - 1] - times[t] < edgeSeconds[f];
}

describe('summary builder', () => {
  const rec = recording();
  const { plan, channels, result } = run(rec, recipe());
  const { summary, notices } = buildSummary(plan, channels, { channelGroups: [{ label: 'parietal', channels: ['Cz', 'Pz'] }, { label: 'all', channels: NAMES }] });

  it('gives what the server accepts: SummaryInput parses it unchanged', () => {
    const parsed = SummaryInput.safeParse(summary);
    expect(parsed.success, parsed.success ? '' : JSON.stringify(parsed.error.issues.slice(0, 3))).toBe(true);
    expect(parsed.data).toEqual(JSON.parse(JSON.stringify(summary)));
    expect(summary.normalizedUnit).toBe('percent-change');
    expect(summary.conditions).toEqual(['tug', 'slack']);
    expect(summary.channels).toEqual(NAMES);
    // the grid ends at 40 Hz: gamma 30–45 still holds grid frequencies, so all four default bands are kept
    expect(summary.bands.map((b) => b.label)).toEqual(DEFAULT_SUMMARY_BANDS.map((b) => b.label));
    expect(summary.bandValues.length).toBe(4 * 2 * 4 * 2);
    expect(summary.trialValues.length).toBe(4 * 2 * 4 * 2);
    expect(notices).toEqual([]);
  });

  it('band values are the means of the Result maps over the band and window cells, edge zones left out', () => {
    const { frequencies: F, times: T, edgeSeconds: E } = result;
    for (const row of summary.bandValues.filter((_, i) => i % 7 === 0)) {
      const band = summary.bands.find((b) => b.label === row.band)!;
      const win = summary.windows.find((w) => w.label === row.window)!;
      const ch = result.channels.indexOf(row.channel);
      const cond = result.conditions[row.condition];
      let raw = 0;
      let norm = 0;
      let n = 0;
      F.forEach((hz, f) => {
        if (hz < band.lowHz || hz > band.highHz) return;
        T.forEach((s, t) => {
          if (s < win.startS - 1e-9 || s > win.endS + 1e-9 || inEdge(T, E, f, t)) return;
          raw += cond.power[ch][f][t];
          norm += cond.normalized[ch][f][t];
          n++;
        });
      });
      expect(n).toBeGreaterThan(0);
      expect(row.raw).toBe(summaryValue(raw / n));
      expect(row.normalized).toBe(summaryValue(norm / n));
    }
  });

  it('per-trial values average to the trial-scope band value the core computes as trials stream', () => {
    for (const row of summary.trialValues) {
      const band = summary.bandValues.find((b) => b.band === row.band && b.window === row.window && b.channel === row.channel && b.condition === row.condition)!;
      expect(row.values.length).toBe(result.conditions[row.condition].trials);
      const mean = row.values.reduce<number>((s, v) => s + v!, 0) / row.values.length;
      // percent change is linear in power, so the mean over trials of each trial's band mean is the band mean of
      // the trial-averaged percent change (7 significant digits each)
      expect(Math.abs(mean - band.normalized!)).toBeLessThan(1e-5 * Math.max(1, Math.abs(band.normalized!)));
    }
    // and the planted rhythm shows: Pz alpha rises after tugs, not after slacks
    const pz = (cond: string) => summary.bandValues.find((b) => b.band === 'alpha' && b.window === 'early' && b.channel === 'Pz' && b.condition === cond)!.normalized!;
    expect(pz('tug')).toBeGreaterThan(200);
    expect(Math.abs(pz('slack'))).toBeLessThan(100);
  });

  it('aperiodic fits are the per-condition fits of the Result', () => {
    for (const fit of summary.aperiodic) {
      const r = result.aperiodicByCondition![fit.condition].find((a) => a.channel === fit.channel)!;
      expect(fit.exponent).toBe(summaryValue(r.exponent));
      expect(fit.offset).toBe(summaryValue(r.offset));
      expect(fit.knee).toBeNull();
      expect(fit.r2).toBe(summaryValue(r.r2));
    }
    expect(summary.aperiodic.length).toBe(NAMES.length * 2);
  });

  it('maps average the named group over channels, with edge-zone cells left out', () => {
    expect(summary.maps.map((m) => [m.condition, m.channelGroup])).toEqual([['tug', 'parietal'], ['slack', 'parietal']]);
    const m = summary.maps[0];
    // 12 frequencies stay; 201 times become blocks of 2 (101 ≤ 128)
    expect(m.frequenciesHz.length).toBe(12);
    expect(m.timesS.length).toBe(101);
    expect(m.timesS[0]).toBe(summaryValue((result.times[0] + result.times[1]) / 2));
    const cz = result.channels.indexOf('Cz');
    const pz = result.channels.indexOf('Pz');
    const f = 6;
    const t = 50; // times 100 and 101, the middle of the epoch
    const cells = [cz, pz].flatMap((c) => [100, 101].map((ti) => result.conditions.tug.normalized[c][f][ti]));
    expect(m.values[f][t]).toBe(summaryValue(cells.reduce((a, b) => a + b) / 4));
    // the first block at the lowest frequency lies wholly in the edge zone
    expect(inEdge(result.times, result.edgeSeconds, 0, 0) && inEdge(result.times, result.edgeSeconds, 0, 1)).toBe(true);
    expect(m.values[0][0]).toBeNull();
  });

  it('reduces a large grid to at most 64 × 128 cells', () => {
    const big = run(rec, recipe({ frequencies: { min: 4, max: 40, count: 70, spacing: 'linear' }, epochs: { events: ['tug', 'slack'], start: -0.6, end: 1.99 }, baseline: { start: -0.5, end: -0.2, method: 'decibel', scope: 'average' } }), false);
    const { summary: s } = buildSummary(big.plan, big.channels, { trialChannels: [] });
    expect(big.result.times.length).toBe(260);
    expect(s.maps[0].frequenciesHz.length).toBe(35);
    expect(s.maps[0].timesS.length).toBe(87);
    expect(s.trialValues).toEqual([]);
    expect(SummaryInput.safeParse(s).success).toBe(true);
  });

  it('with spectrum source "recording" every condition carries the one fit, and says so', () => {
    const r = run(rec, recipe({ spectrum: { segment: 2, overlap: 0.5, range: [1, 45], source: 'recording' } }));
    const { summary: s, notices: n } = buildSummary(r.plan, r.channels);
    expect(n.join(' ')).toMatch(/whole recording's aperiodic fit/);
    const fz = s.aperiodic.filter((a) => a.channel === 'Fz');
    expect(fz.map((a) => a.condition)).toEqual(['tug', 'slack']);
    expect(fz[0].exponent).toBe(summaryValue(r.result.aperiodic[0].exponent));
    expect(fz[1].exponent).toBe(fz[0].exponent);
    expect(s.channelGroups).toEqual([{ label: 'all', channels: NAMES }]);
  });

  it('refuses what it cannot use, naming the field', () => {
    const expectField = (fn: () => unknown, field: string, words: RegExp) => {
      try {
        fn();
        throw new Error('no error');
      } catch (e) {
        expect(e).toBeInstanceOf(AnalysisInputError);
        expect((e as AnalysisInputError).field).toBe(field);
        expect((e as Error).message).toMatch(words);
      }
    };
    expectField(() => buildSummary(plan, channels, { channelGroups: [{ label: 'g', channels: ['Fz', 'T7'] }] }), 'summary.channelGroups[0].channels[1]', /"T7" is not an analysed channel/);
    expectField(() => buildSummary(plan, channels, { bands: [{ label: 'slow', lowHz: 0.5, highHz: 2 }] }), 'summary.bands[0]', /holds none of the recipe's frequencies/);
    expectField(() => buildSummary(plan, channels, { mapGroup: 'nope' }), 'summary.mapGroup', /not one of the channel groups/);
    const noTrials = run(rec, recipe(), false);
    expectField(() => buildSummary(noTrials.plan, noTrials.channels), 'summary.trialValues', /single trials/);
    // 64 channels × 2 conditions × 100 trials × 4 bands × 2 windows = 102 400 per-trial values: over the cap
    const wide = { ...plan, channels: Array.from({ length: 64 }, (_, i) => `E${i + 1}`), epochStarts: [new Int32Array(100), new Int32Array(100)] };
    expectField(() => resolveSummarySpec(wide), 'summary.trialValues', /would hold 102400 per-trial values .* name fewer channels in summary.trialChannels/);
    expect(resolveSummarySpec(wide, { trialChannels: ['E1', 'E2'] }).trialChannels.size).toBe(2);
  });
});

// ---------------------------------------------------------------- the command line's --summary

const exec = promisify(execFile);
const root = fileURLToPath(new URL('../../../..', import.meta.url));
const dir = mkdtempSync(join(tmpdir(), 'tidemark-summary-'));
// Distinctive strings in every identifying place: the patient field, the recording field and the file name.
const PATIENT = 'MCS-4471 F 02-FEB-1961 Philomena_Quarrington';
const RECORDING = 'Startdate 03-MAR-2024 Brackwater-Infirmary Dr_Osgood_Feltham Lumenbox-7';
const FILE = join(dir, 'ward9-quarrington-overnight.edf');

async function analyze(args: string[]): Promise<{ code: number; stdout: string; stderr: string }> {
  try {
    const { stdout, stderr } = await exec(process.execPath, ['--import', 'tsx', 'src/cli/analyze.ts', ...args], { cwd: root, maxBuffer: 64 * 1024 * 1024 });
    return { code: 0, stdout, stderr };
  } catch (e) {
    const err = e as { code: number; stdout: string; stderr: string };
    return { code: err.code, stdout: err.stdout, stderr: err.stderr };
  }
}

describe('analyze --summary', () => {
  beforeAll(() => {
    const data = samples();
    writeFileSync(
      FILE,
      writeEdf({
        patientIdentification: PATIENT,
        recordingIdentification: RECORDING,
        start: { year: 2024, month: 3, day: 3, hour: 22, minute: 5, second: 0 },
        recordDurationSeconds: 1,
        signals: NAMES.map((n, c) => ({ label: `EEG ${n}`, physicalDimension: 'uV', physicalMin: -200, physicalMax: 200, samplesPerRecord: FS, samples: data[c] })),
        annotations: events.map((e) => ({ onsetSeconds: e.onsetSeconds, texts: [e.label] })),
      }),
    );
    writeFileSync(join(dir, 'recipe.json'), JSON.stringify(recipe()));
    writeFileSync(join(dir, 'spec.json'), JSON.stringify({ channelGroups: [{ label: 'back', channels: ['Pz', 'Oz'] }], trialChannels: ['Pz'] }));
    writeFileSync(join(dir, 'bad-spec.json'), JSON.stringify({ channelGroups: [{ label: 'back', channels: ['Pz', 'P9'] }] }));
  });

  it('writes the summary with recipe, fingerprint and subject, and no identifying string of the recording', async () => {
    const out = await analyze([FILE, '--recipe', join(dir, 'recipe.json'), '--out', join(dir, 'result.json'), '--summary', join(dir, 'summary.json'), '--subject', 'KS-07', '--summary-spec', join(dir, 'spec.json')]);
    expect(out.stderr).toBe('');
    expect(out.code).toBe(0);
    const text = readFileSync(join(dir, 'summary.json'), 'utf8');
    const file = JSON.parse(text);
    expect(Object.keys(file)).toEqual(['format', 'subjectCode', 'fingerprint', 'recipe', 'summary']);
    expect(file.format).toBe('tidemark-cli-summary-1');
    expect(file.subjectCode).toBe('KS-07');
    const sha = createHash('sha256').update(readFileSync(FILE)).digest('hex');
    expect(file.fingerprint).toBe(sha);
    expect(file.recipe.recording.fingerprint).toBe(sha);
    expect(SummaryInput.safeParse(file.summary).success).toBe(true);
    expect(file.summary.maps[0].channelGroup).toBe('back');
    expect(file.summary.trialValues.every((r: { channel: string }) => r.channel === 'Pz')).toBe(true);
    // the same numbers as the builder in this process on the same samples (EDF int16 round trip aside: compare
    // with the command line's own Result)
    const result = JSON.parse(readFileSync(join(dir, 'result.json'), 'utf8'));
    const fz = result.channels.indexOf('Fz');
    expect(file.summary.aperiodic.find((a: { channel: string; condition: string }) => a.channel === 'Fz' && a.condition === 'slack').exponent).toBe(
      summaryValue(result.aperiodicByCondition.slack[fz].exponent),
    );
    // nothing identifying, in any spelling
    const folded = text.toLowerCase();
    for (const s of ['MCS-4471', 'Philomena', 'Quarrington', 'Brackwater', 'Infirmary', 'Osgood', 'Feltham', 'Lumenbox', 'ward9', 'overnight', '02-FEB-1961', '03-MAR-2024', '03.03.24', '22.05.00', '.edf', dir]) {
      expect(folded.includes(s.toLowerCase()), s).toBe(false);
    }
  });

  it('gives the same Result with and without --summary', async () => {
    const a = await analyze([FILE, '--recipe', join(dir, 'recipe.json')]);
    const b = await analyze([FILE, '--recipe', join(dir, 'recipe.json'), '--summary', join(dir, 's2.json'), '--subject', 'KS-07']);
    expect(a.code).toBe(0);
    expect(b.code).toBe(0);
    expect(b.stdout).toBe(a.stdout);
  });

  it('refuses bad summary options with one line naming the option or field', async () => {
    const base = [FILE, '--recipe', join(dir, 'recipe.json')];
    let out = await analyze([...base, '--summary', join(dir, 's3.json')]);
    expect(out.code).toBe(2);
    expect(out.stderr).toMatch(/^analyze: --subject: is required with --summary/);
    out = await analyze([...base, '--summary', join(dir, 's3.json'), '--subject', 'Philomena Quarrington']);
    expect(out.code).toBe(2);
    expect(out.stderr).toMatch(/--subject: .*a code, never a name/);
    out = await analyze([...base, '--subject', 'KS-07']);
    expect(out.code).toBe(2);
    expect(out.stderr).toMatch(/--subject: is used only with --summary/);
    out = await analyze([...base, '--summary', join(dir, 's3.json'), '--subject', 'KS-07', '--summary-spec', join(dir, 'bad-spec.json')]);
    expect(out.code).toBe(2);
    expect(out.stderr).toBe(`analyze: ${join(dir, 'bad-spec.json')}: summary.channelGroups[0].channels[1] "P9" is not an analysed channel (Fz, Cz, Pz, Oz)\n`);
    expect(out.stderr.split('\n').length).toBe(2);
  }, 120_000); // four command-line runs: each starts tsx, slow on a loaded machine
});
