import { spawnSync } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { DEMO_PATIENT_FIELD, describeCohort, writeSubjectEdf, type SubjectParameters } from '../../../../src/lib/demo/cohort';
import { bytesSource, openEdf, toRecording } from '../../../../src/lib/formats';

// The demo is invented data; these tests check that the files carry what cohort.json says they carry, using
// textbook estimators written out here (a direct DFT, not the generator's FFT path).

/** Hann-windowed power at frequency f of x[i0 … i0+len), by direct DFT (periodogram, common practice). */
function powerAt(x: Float32Array, i0: number, len: number, f: number, fs: number): number {
  let re = 0;
  let im = 0;
  for (let j = 0; j < len; j++) {
    const w = 0.5 * (1 - Math.cos((2 * Math.PI * j) / len));
    const v = x[i0 + j] * w;
    re += v * Math.cos((2 * Math.PI * f * j) / fs);
    im -= v * Math.sin((2 * Math.PI * f * j) / fs);
  }
  return re * re + im * im;
}

/** Least-squares slope of log10 P against log10 f: −χ for a 1/f^χ spectrum. */
function logLogSlope(freqs: number[], power: number[]): number {
  const xs = freqs.map(Math.log10);
  const ys = power.map(Math.log10);
  const mx = xs.reduce((a, b) => a + b) / xs.length;
  const my = ys.reduce((a, b) => a + b) / ys.length;
  let sxy = 0;
  let sxx = 0;
  for (let i = 0; i < xs.length; i++) {
    sxy += (xs[i] - mx) * (ys[i] - my);
    sxx += (xs[i] - mx) ** 2;
  }
  return sxy / sxx;
}

describe('describeCohort', () => {
  it('is deterministic, with exponents in [1, 2] and ~60 events per condition in 5 minutes', () => {
    const a = describeCohort();
    expect(describeCohort()).toEqual(a);
    expect(describeCohort({ seed: 7 }).subjects[0].exponents).not.toEqual(a.subjects[0].exponents);
    expect(a.subjects.map((s) => s.code)).toEqual(Array.from({ length: 12 }, (_, i) => `TM-S${String(i + 1).padStart(2, '0')}`));
    for (const s of a.subjects) {
      expect(s.channels.length).toBe(32);
      expect(s.sampleRateHz).toBe(500);
      expect(s.exponents.every((x) => x >= 1 && x <= 2)).toBe(true);
      expect(s.events.filter((e) => e.label === 'lamp-watch').length).toBe(60);
      expect(s.events.filter((e) => e.label === 'oar-pull').length).toBe(60);
      expect(s.artifacts.length).toBeGreaterThanOrEqual(4);
      expect(s.events.every((e, i) => i === 0 || e.onsetSeconds > s.events[i - 1].onsetSeconds)).toBe(true);
    }
  });
});

describe('a small generated subject read back through our EDF reader', async () => {
  const params: SubjectParameters = describeCohort({ subjects: 1, seconds: 60, seed: 99 }).subjects[0];
  const edf = await openEdf(bytesSource(writeSubjectEdf(params)));
  const rec = toRecording(edf);
  const fs = rec.sampleRateHz;

  it('carries the invented patient field, the channels and the events of its parameters', () => {
    expect(edf.identifying.patientIdentification).toBe(DEMO_PATIENT_FIELD);
    expect(edf.header.variant).toBe('EDF+C');
    expect(rec.channelNames).toEqual(params.channels);
    expect(rec.data[0].length).toBe(60 * 500);
    expect(rec.events.filter((e) => e.label === 'lamp-watch').length).toBe(12);
    expect(rec.events.filter((e) => e.label === 'oar-pull').length).toBe(12);
    expect(rec.events.map((e) => e.onsetSeconds)).toEqual(params.events.map((e) => e.onsetSeconds));
  });

  it('has each clean channel’s declared aperiodic exponent in its spectrum', () => {
    // Welch-style average of 2-s Hann periodograms at 0.5-Hz bins from 2 to 40 Hz, skipping the bands of the
    // 6 Hz and 20 Hz components; the log-log slope of a 1/f^χ spectrum is −χ.
    const freqs: number[] = [];
    for (let f = 2; f <= 40; f += 0.5) if (!(f >= 4 && f <= 9) && !(f >= 16 && f <= 25)) freqs.push(f);
    const seg = 2 * fs;
    const dirty = new Set(params.artifacts.flatMap((a) => a.channels));
    const estimated: number[] = [];
    const declared: number[] = [];
    for (let c = 0; c < rec.channelNames.length; c += 3) {
      if (dirty.has(rec.channelNames[c])) continue;
      const power = freqs.map((f) => {
        let sum = 0;
        for (let s = 0; s + seg <= rec.data[c].length; s += seg) sum += powerAt(rec.data[c], s, seg, f, fs);
        return sum;
      });
      const chi = -logLogSlope(freqs, power);
      expect(Math.abs(chi - params.exponents[c]), `${rec.channelNames[c]}: estimated ${chi}, declared ${params.exponents[c]}`).toBeLessThan(0.2);
      estimated.push(chi);
      declared.push(params.exponents[c]);
    }
    expect(estimated.length).toBeGreaterThanOrEqual(6);
  });

  it('shows more ~6 Hz power after lamp-watch at Fz and less ~20 Hz power after oar-pull at Cz', () => {
    const ratio = (channel: string, label: string, f: number, from: number, to: number) => {
      const x = rec.data[rec.channelNames.indexOf(channel)];
      const len = Math.round((to - from) * fs);
      let post = 0;
      let pre = 0;
      for (const e of rec.events.filter((ev) => ev.label === label)) {
        const i = Math.round(e.onsetSeconds * fs);
        post += powerAt(x, i + Math.round(from * fs), len, f, fs);
        pre += powerAt(x, i - Math.round(0.1 * fs) - len, len, f, fs);
      }
      return post / pre;
    };
    const { theta, beta } = params;
    expect(ratio('Fz', 'lamp-watch', theta.frequencyHz, theta.latencySeconds, theta.latencySeconds + theta.durationSeconds)).toBeGreaterThan(1.5);
    expect(ratio('Cz', 'oar-pull', beta.frequencyHz, beta.latencySeconds, beta.latencySeconds + beta.durationSeconds)).toBeLessThan(0.8);
  });

  it('puts findable artifacts where cohort.json says, and keeps clean epochs under 150 µV peak to peak', () => {
    const p2p = (x: Float32Array, a: number, b: number) => {
      let lo = Infinity;
      let hi = -Infinity;
      for (let i = a; i < b; i++) {
        lo = Math.min(lo, x[i]);
        hi = Math.max(hi, x[i]);
      }
      return hi - lo;
    };
    for (const art of params.artifacts) {
      for (const name of art.channels) {
        const x = rec.data[rec.channelNames.indexOf(name)];
        const i0 = Math.round(art.startSeconds * fs);
        const i1 = Math.round(art.endSeconds * fs);
        if (art.kind === 'flat') expect(p2p(x, i0, i1)).toBe(0);
        else expect(p2p(x, Math.max(0, i0 - 50), Math.min(x.length, i1 + 50))).toBeGreaterThan(200);
      }
    }
    // 150 µV peak to peak is a common rule-of-thumb rejection threshold; the clean background stays below it.
    const bad = new Set(params.artifacts.map((a) => a.eventIndex));
    let clean = 0;
    let over = 0;
    rec.events.forEach((e, k) => {
      if (bad.has(k)) return;
      const i = Math.round(e.onsetSeconds * fs);
      for (const x of rec.data) {
        clean++;
        if (p2p(x, Math.max(0, i - fs), Math.min(x.length, i + 2 * fs)) > 150) over++;
      }
    });
    expect(over / clean).toBeLessThan(0.01);
  });
});

describe('npm run demo:data', () => {
  it('writes EDF+ files and cohort.json, then skips unchanged files', () => {
    const out = fs.mkdtempSync(path.join(os.tmpdir(), 'tidemark-demo-'));
    const run = () =>
      spawnSync(process.execPath, ['--import', 'tsx', 'scripts/demo-data.ts', '--out', out, '--subjects', '2', '--seconds', '12'], {
        encoding: 'utf8',
      });
    try {
      const first = run();
      expect(first.status, first.stderr).toBe(0);
      expect(first.stdout).toMatch(/2 written, 0 unchanged/);
      const cohort = JSON.parse(fs.readFileSync(path.join(out, 'cohort.json'), 'utf8'));
      expect(cohort.subjects.map((s: { fileName: string }) => s.fileName)).toEqual(['harbour-lights-01.edf', 'harbour-lights-02.edf']);
      expect(fs.statSync(path.join(out, 'harbour-lights-01.edf')).size).toBe(cohort.subjects[0].bytes);
      const second = run();
      expect(second.stdout).toMatch(/0 written, 2 unchanged/);
      const bad = spawnSync(process.execPath, ['--import', 'tsx', 'scripts/demo-data.ts', '--subjects', 'many'], { encoding: 'utf8' });
      expect(bad.status).toBe(2);
      expect(bad.stderr).toMatch(/--subjects needs a positive whole number/);
    } finally {
      fs.rmSync(out, { recursive: true, force: true });
    }
  });
});
