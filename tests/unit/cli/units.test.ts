import { execFile } from 'node:child_process';
import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { promisify } from 'node:util';
import { beforeAll, describe, expect, it, vi } from 'vitest';
import { readerOptionsOf } from '../../../src/cli/analyze';
import { loadRecording } from '../../../src/cli/load-recording';
import { writeEdf } from '../../../src/lib/formats';
import { assertClose } from '../../helpers/assert-close';
import { seededNormal } from '../../helpers/seeded-random';

// These tests start the command line in a child process (tsx), several runs per test: on a loaded two-core
// machine one run alone has taken 15 s, so they get more than the suite's 30 s.
vi.setConfig({ testTimeout: 120_000 });

const run = promisify(execFile);
const root = fileURLToPath(new URL('../../..', import.meta.url));

async function analyze(args: string[]): Promise<{ code: number; stdout: string; stderr: string }> {
  try {
    const { stdout, stderr } = await run(process.execPath, ['--import', 'tsx', 'src/cli/analyze.ts', ...args], { cwd: root, maxBuffer: 64 * 1024 * 1024 });
    return { code: 0, stdout, stderr };
  } catch (e) {
    const err = e as { code: number; stdout: string; stderr: string };
    return { code: err.code, stdout: err.stdout, stderr: err.stderr };
  }
}

// Scenario of our own: a 100 Hz "rowing drill" with two EEG channels and a breathing belt in arbitrary units
// ("arb"), all at the same rate, so the belt is one of the analysed signals unless it is left out or mapped.
const fs = 100;
const seconds = 30;
const dir = mkdtempSync(join(tmpdir(), 'tidemark-units-'));
const file = (name: string) => join(dir, name);
const recipe = {
  format: 2,
  epochs: { events: ['stroke'], start: -0.5, end: 1.0 },
  frequencies: { min: 4, max: 30, count: 4, spacing: 'log' },
  cycles: { min: 3, max: 6 },
  baseline: { start: -0.4, end: -0.1, method: 'decibel', scope: 'average' },
  spectrum: { segment: 2, overlap: 0.5, range: [1, 40], source: 'recording' },
  aperiodic: { range: [2, 40], model: 'power-law' },
};
const put = (name: string, value: object) => writeFileSync(file(name), JSON.stringify(value));

/** The EDF header's own layout (Kemp et al., 1992): 256 fixed bytes, then each per-signal field for all ns signals. */
function headerOf(bytes: Uint8Array) {
  const text = (at: number, width: number) => new TextDecoder('latin1').decode(bytes.subarray(at, at + width)).trim();
  const ns = Number(text(252, 4));
  const perSignal = (fieldStart: number, width: number) => Array.from({ length: ns }, (_, i) => text(256 + fieldStart * ns + i * width, width));
  return {
    ns,
    headerBytes: Number(text(184, 8)),
    labels: perSignal(0, 16),
    dimensionOffset: (i: number) => 256 + 96 * ns + 8 * i,
    physMin: perSignal(104, 8).map(Number),
    physMax: perSignal(112, 8).map(Number),
    digMin: perSignal(120, 8).map(Number),
    digMax: perSignal(128, 8).map(Number),
    samplesPerRecord: perSignal(216, 8).map(Number),
  };
}

let edfBytes: Uint8Array;

beforeAll(() => {
  const normal = seededNormal(21);
  const n = fs * seconds;
  const c3 = Float64Array.from({ length: n }, () => 5 * normal());
  const c4 = Float64Array.from({ length: n }, () => 5 * normal());
  const belt = Float64Array.from({ length: n }, (_, i) => 6 * Math.sin((2 * Math.PI * 0.3 * i) / fs) + 0.5 * normal());
  edfBytes = writeEdf({
    start: { year: 2024, month: 5, day: 2, hour: 10, minute: 0, second: 0 },
    recordDurationSeconds: 1,
    signals: [
      { label: 'EEG C3', physicalDimension: 'uV', physicalMin: -100, physicalMax: 100, samplesPerRecord: fs, samples: c3 },
      { label: 'EEG C4', physicalDimension: 'uV', physicalMin: -100, physicalMax: 100, samplesPerRecord: fs, samples: c4 },
      { label: 'Resp', physicalDimension: 'arb', physicalMin: -10, physicalMax: 10, samplesPerRecord: fs, samples: belt },
    ],
    annotations: Array.from({ length: 12 }, (_, k) => ({ onsetSeconds: 2 + 2 * k, texts: ['stroke'] })),
  });
  writeFileSync(file('drill.edf'), edfBytes);
  put('plain.json', recipe);
  put('exclude.json', { ...recipe, recording: { exclude: ['Resp', 'Belt'] } });
  // "Resp" is typed "other" (an EDF+ signal-type word), so it is decomposed only when named: name all three.
  put('factor1.json', { ...recipe, channels: ['C3', 'C4', 'Resp'], recording: { units: { arb: 1 } } });
  put('factor3.json', { ...recipe, channels: ['C3', 'C4', 'Resp'], recording: { units: { arb: 3 } } });
  put('zero.json', { ...recipe, recording: { units: { arb: 0 } } });
});

describe('analyze with a same-rate signal in an unknown unit', () => {
  it('exits 2 with one line naming the signal and the byte offset of its physical dimension', async () => {
    const h = headerOf(edfBytes);
    const resp = h.labels.indexOf('Resp');
    expect(resp).toBe(2);
    const out = await analyze([file('drill.edf'), '--recipe', file('plain.json')]);
    expect(out.code).toBe(2);
    expect(out.stdout).toBe('');
    const lines = out.stderr.split('\n').filter((l) => l !== '');
    expect(lines.length, out.stderr).toBe(1);
    expect(lines[0]).toContain(`physical dimension of signal "Resp" at byte ${h.dimensionOffset(resp)}: unit "arb"`);
  });

  it('leaves the signal out with recording.exclude, and warns about a label the file does not have', async () => {
    const out = await analyze([file('drill.edf'), '--recipe', file('exclude.json')]);
    expect(out.stderr).toBe('');
    expect(out.code).toBe(0);
    const result = JSON.parse(out.stdout);
    expect(result.channels).toEqual(['C3', 'C4']);
    expect(result.conditions.stroke.trials).toBe(12);
    expect(result.warnings).toContain('recording.exclude: the file has no signal labelled "Belt"');
  });

  it('reads the signal as µV × factor with recording.units, sample by the EDF scaling formula', async () => {
    // EDF scaling (Kemp et al., 1992): phys = (dig − digMin)(physMax − physMin)/(digMax − digMin) + physMin,
    // read here straight from the bytes: record r, signal i starts after the earlier signals' int16 samples.
    const h = headerOf(edfBytes);
    const i = 2;
    const r = 7;
    const k = 41;
    const recordBytes = 2 * h.samplesPerRecord.reduce((a, b) => a + b, 0);
    const at = h.headerBytes + r * recordBytes + 2 * (h.samplesPerRecord.slice(0, i).reduce((a, b) => a + b, 0) + k);
    const dig = new DataView(edfBytes.buffer, edfBytes.byteOffset).getInt16(at, true);
    const phys = ((dig - h.digMin[i]) * (h.physMax[i] - h.physMin[i])) / (h.digMax[i] - h.digMin[i]) + h.physMin[i];
    const recipe3 = JSON.parse(readFileSync(file('factor3.json'), 'utf8'));
    const { recording } = await loadRecording(file('drill.edf'), readerOptionsOf(recipe3));
    expect(recording.channelNames).toEqual(['C3', 'C4', 'Resp']);
    const expected = 3 * phys;
    assertClose(recording.data[2][r * fs + k], expected, 1e-6 * Math.abs(expected) + 1e-6, 'Resp sample × 3');
    expect(Math.abs(phys)).toBeGreaterThan(0.5); // a sample off the zero line, so the factor shows

    const one = await analyze([file('drill.edf'), '--recipe', file('factor1.json')]);
    const three = await analyze([file('drill.edf'), '--recipe', file('factor3.json')]);
    expect(one.stderr + three.stderr).toBe('');
    expect([one.code, three.code]).toEqual([0, 0]);
    const psd1 = JSON.parse(one.stdout).spectrum.psd;
    const psd3 = JSON.parse(three.stdout).spectrum.psd;
    expect(JSON.parse(three.stdout).channels).toEqual(['C3', 'C4', 'Resp']);
    // Welch power is quadratic in amplitude (common practice): ×3 in µV is ×9 in µV²/Hz; the EEG is untouched.
    // Samples are kept as Float32 (relative step 6e-8), hence the 1e-6 relative tolerance.
    for (let b = 0; b < psd1[2].length; b++) assertClose(psd3[2][b], 9 * psd1[2][b], 1e-6 * 9 * psd1[2][b] + 1e-12, `Resp psd bin ${b}`);
    expect(psd3[0]).toEqual(psd1[0]);
  });

  it('refuses a factor that is not greater than 0, naming the recipe field', async () => {
    const out = await analyze([file('drill.edf'), '--recipe', file('zero.json')]);
    expect(out.code).toBe(2);
    expect(out.stderr.trim()).toMatch(/zero\.json: recording\.units\.arb must be greater than 0$/);
  });
});
