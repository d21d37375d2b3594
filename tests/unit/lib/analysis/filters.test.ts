import { describe, expect, it } from 'vitest';
import { conditionRecording, filterDesign } from '../../../../src/lib/analysis/condition-recording';
import { butterworthHighPass, filtfilt, notch, type Biquad } from '../../../../src/lib/analysis/filters';
import { planRecipe } from '../../../../src/lib/analysis/run-recipe';
import { seededNormal } from '../../../helpers/seeded-random';

// |H(e^{jω})| of a cascade, evaluated here from the coefficients with complex arithmetic (no code shared with the core).
function cascadeMagnitude(sections: readonly Biquad[], f: number, fs: number): number {
  const w = (2 * Math.PI * f) / fs;
  let mag = 1;
  for (const s of sections) {
    const nr = s.b0 + s.b1 * Math.cos(w) + s.b2 * Math.cos(2 * w);
    const ni = -(s.b1 * Math.sin(w) + s.b2 * Math.sin(2 * w));
    const dr = 1 + s.a1 * Math.cos(w) + s.a2 * Math.cos(2 * w);
    const di = -(s.a1 * Math.sin(w) + s.a2 * Math.sin(2 * w));
    mag *= Math.hypot(nr, ni) / Math.hypot(dr, di);
  }
  return mag;
}

// Amplitude of the f Hz component of y[i0 … i1) by least squares on cos and sin (an ordinary regression).
function amplitudeAt(y: ArrayLike<number>, f: number, fs: number, i0: number, i1: number): number {
  let cc = 0, ss = 0, cs = 0, yc = 0, ys = 0;
  for (let i = i0; i < i1; i++) {
    const c = Math.cos((2 * Math.PI * f * i) / fs);
    const s = Math.sin((2 * Math.PI * f * i) / fs);
    cc += c * c;
    ss += s * s;
    cs += c * s;
    yc += y[i] * c;
    ys += y[i] * s;
  }
  const det = cc * ss - cs * cs;
  const a = (yc * ss - ys * cs) / det;
  const b = (ys * cc - yc * cs) / det;
  return Math.hypot(a, b);
}

const sine = (f: number, fs: number, n: number) => Float64Array.from({ length: n }, (_, i) => Math.sin((2 * Math.PI * f * i) / fs + 0.4));

describe('Butterworth high-pass design', () => {
  it('matches the bilinear Butterworth magnitude 1/(1 + (tan(π fc/fs)/tan(π f/fs))^(2N)) at chosen frequencies', () => {
    // Oppenheim & Schafer, Discrete-Time Signal Processing, 3rd ed., §7.2.4; at f = fc every order gives
    // |H|² = 1/2 (−3.01 dB), the value scipy.signal.freqz shows for scipy.signal.butter designs (from memory).
    for (const [fs, fc, order] of [[250, 0.5, 2], [250, 1, 4], [1000, 0.1, 4], [512, 2, 8]]) {
      const sections = butterworthHighPass(fc, order, fs);
      expect(sections).toHaveLength(order / 2);
      for (const f of [fc / 4, fc / 2, fc, 2 * fc, 10 * fc, fs / 4]) {
        const expected = 1 / Math.sqrt(1 + (Math.tan((Math.PI * fc) / fs) / Math.tan((Math.PI * f) / fs)) ** (2 * order));
        const got = cascadeMagnitude(sections, f, fs);
        // relative 1e-9 in the pass band; deep in the stop band (−88 dB at fc/4) the poles' nearness to z = 1 costs digits
        expect(Math.abs(got - expected), `fs=${fs} fc=${fc} N=${order} f=${f}`).toBeLessThan(1e-9 * expected + 1e-10);
      }
      expect(20 * Math.log10(cascadeMagnitude(sections, fc, fs))).toBeCloseTo(-3.0103, 3);
    }
  });

  it('filters forwards and backwards: a steady sinusoid comes out scaled by |H(f)|², the design magnitude squared', () => {
    const fs = 250;
    const n = fs * 200;
    const sections = butterworthHighPass(1, 4, fs);
    for (const f of [0.5, 1, 1.5, 3, 10]) {
      const y = filtfilt(sine(f, fs, n), sections, 3 * fs);
      const expected = 1 / (1 + (Math.tan(Math.PI / fs) / Math.tan((Math.PI * f) / fs)) ** 8); // |H|² (both passes)
      const got = amplitudeAt(y, f, fs, n / 4, (3 * n) / 4);
      expect(Math.abs(got - expected), `f=${f}`).toBeLessThan(1e-4);
    }
  });
});

describe('line-noise notch', () => {
  it('matches the notch magnitude (Ω² − 1)²/((Ω² − 1)² + (Ω/Q)²) of the bilinear design', () => {
    const fs = 500;
    const q = 30;
    const section = notch(50, q, fs);
    for (const f of [10, 45, 49, 49.9, 50.5, 55, 120]) {
      const om = Math.tan((Math.PI * f) / fs) / Math.tan((Math.PI * 50) / fs);
      const expected = Math.sqrt((om * om - 1) ** 2 / ((om * om - 1) ** 2 + (om / q) ** 2));
      expect(Math.abs(cascadeMagnitude([section], f, fs) - expected), `f=${f}`).toBeLessThan(1e-9);
    }
    expect(cascadeMagnitude([section], 50, fs)).toBeLessThan(1e-12);
  });

  it('takes a 50 Hz sinusoid down by at least 40 dB while 45 and 55 Hz change by less than 0.5 dB (and its harmonic too)', () => {
    // The check, on the filters as a recipe asks for them (50 Hz and its first harmonic, Q 30) at 500 Hz.
    const fs = 500;
    const n = fs * 20;
    const { sections, padSamples } = filterDesign({ notch: { lineHz: 50, harmonics: 2, q: 30 } }, fs);
    const db = (f: number) => 20 * Math.log10(amplitudeAt(filtfilt(sine(f, fs, n), sections, padSamples), f, fs, fs, n - fs) / amplitudeAt(sine(f, fs, n), f, fs, fs, n - fs));
    expect(db(50)).toBeLessThan(-40);
    expect(db(100)).toBeLessThan(-40);
    for (const f of [45, 55, 95, 105]) expect(Math.abs(db(f)), `${f} Hz`).toBeLessThan(0.5);
    // Sample by sample too, from one second after the start to one second before the end: the notch's transient
    // at a recording's ends decays with the time constant Q/(π·f0) ≈ 0.19 s (a resonator's ring-down, common practice).
    const y = filtfilt(sine(50, fs, n), sections, padSamples);
    expect(Math.max(...Array.from(y.subarray(fs, n - fs)).map(Math.abs))).toBeLessThan(0.01);
  });
});

describe('zero phase', () => {
  it('keeps a symmetric pulse symmetric and in place', () => {
    const fs = 500;
    const n = 20001;
    const mid = (n - 1) / 2;
    const x = Float64Array.from({ length: n }, (_, i) => Math.exp(-(((i - mid) / 12) ** 2)) * 50);
    const { sections, padSamples } = filterDesign({ highPass: { cutoffHz: 0.5, order: 4 }, notch: { lineHz: 50, harmonics: 2, q: 30 } }, fs);
    const y = filtfilt(x, sections, padSamples);
    let peak = 0;
    let worst = 0;
    for (let k = 0; k <= mid; k++) worst = Math.max(worst, Math.abs(y[mid + k] - y[mid - k]));
    for (let i = 0; i < n; i++) if (Math.abs(y[i]) > Math.abs(y[peak])) peak = i;
    expect(worst).toBeLessThan(1e-9 * 50);
    expect(peak).toBe(mid);
  });
});

describe('filters on a recording', () => {
  const fs = 200;
  // Scenario of our own: two stretches of a drifting recording with a gap between them (EDF+D), plus a trigger line.
  function withGap() {
    const n = fs * 30;
    const normal = seededNormal(9);
    const drift = (i: number) => (i < n / 2 ? 500 : -800) + 30 * Math.sin((2 * Math.PI * 0.02 * i) / fs);
    return {
      sampleRateHz: fs,
      channelNames: ['Cz', 'TRIG'],
      data: [Float32Array.from({ length: n }, (_, i) => drift(i) + 5 * normal()), Float32Array.from({ length: n }, (_, i) => (i % fs === 0 ? 5 : 0))],
      events: [],
      gapSampleIndices: [n / 2],
    };
  }

  it('filters each stretch between gaps on its own and leaves trigger lines alone', () => {
    const rec = withGap();
    const spec = { filters: { highPass: { cutoffHz: 0.5, order: 4 } } };
    const out = conditionRecording(rec, spec).recording;
    expect(out.channelTypes).toEqual(['eeg', 'stimulus']);
    expect(out.data[1]).toBe(rec.data[1]);
    const half = rec.data[0].length / 2;
    const { sections, padSamples } = filterDesign(spec.filters, fs);
    const alone = (s0: number, s1: number) => Float32Array.from(filtfilt(rec.data[0].subarray(s0, s1), sections, padSamples));
    expect(out.data[0].subarray(0, half)).toEqual(alone(0, half));
    expect(out.data[0].subarray(half)).toEqual(alone(half, 2 * half));
    // the 1300 µV step at the gap does not ring into either side: both stretches are near zero mean at their ends
    expect(Math.abs(out.data[0][half - 1])).toBeLessThan(30);
    expect(Math.abs(out.data[0][half])).toBeLessThan(30);
  });

  it('names the field for a cutoff at or above Nyquist, a notch without a line frequency, harmonics past Nyquist', () => {
    const rec = withGap();
    const base = { format: 2, epochs: { events: ['x'], start: 0, end: 1 }, frequencies: { min: 4, max: 30, count: 3 }, cycles: { fixed: 3 }, baseline: { start: 0, end: 0.2, method: 'decibel' }, spectrum: { segment: 1, overlap: 0.5, range: [1, 40] }, aperiodic: { range: [2, 40], model: 'power-law' } };
    const bad = (filters: object) => () => planRecipe(rec, { ...base, filters });
    expect(bad({ highPass: { cutoffHz: 100 } })).toThrow(/^filters\.highPass\.cutoffHz must be above 0 and below the Nyquist frequency \(100 Hz at 200 Hz sampling; got 100 Hz\)/);
    expect(bad({ notch: { harmonics: 2 } })).toThrow(/^filters\.notch\.lineHz is required for a notch: the line frequency, 50 or 60 Hz/);
    expect(bad({ notch: { lineHz: 60, harmonics: 2 } })).toThrow(/^filters\.notch\.harmonics asks for 2 × 60 Hz = 120 Hz, at or above the Nyquist frequency \(100 Hz\); at most 1 fit/);
    expect(bad({ notch: { lineHz: 50, harmonics: 2 } })).toThrow(/^filters\.notch\.harmonics asks for 2 × 50 Hz = 100 Hz, at or above the Nyquist/);
    expect(bad({ highPass: { cutoffHz: 1, order: 3 } })).toThrow(/^filters\.highPass\.order must be 2, 4, 6 or 8/);
  });
});
