// The slope check (issue "Slope check"): the bench's generator and the checks it runs, against facts outside the
// project: the synthesis's expected spectrum, the known exponent it was built with, the nominal coverage of a
// bootstrap interval, and the sign pattern a pure exponent change must give after normalization.
import { describe, expect, it } from 'vitest';
import { fitAperiodic } from '../../../../src/lib/analysis/aperiodic';
import { runRecipe } from '../../../../src/lib/analysis/run-recipe';
import {
  bootstrapExponent,
  broadbandShift,
  compareAperiodicModels,
  explainedShare,
  exponentOverRanges,
  runSlopeBench,
  simulateAperiodic,
  simulatedDensity,
  windowFit,
} from '../../../../src/lib/analysis/slope-check';
import { welchPsd } from '../../../../src/lib/analysis/welch';

const fs = 250;

describe('simulateAperiodic', () => {
  it('has the density it was built with (Welch over 120 s within 10 % on average over 2–40 Hz)', () => {
    const truth = { offset: 2, exponent: 1.5, durationSeconds: 120, sampleRateHz: fs, seed: 4 };
    const x = simulateAperiodic(truth);
    expect(x.length).toBe(120 * fs);
    const w = welchPsd(x, fs, 2 * fs, fs);
    let ratio = 0;
    let n = 0;
    for (let k = 0; k < w.frequencies.length; k++) {
      const f = w.frequencies[k];
      if (f < 2 || f > 40) continue;
      ratio += w.psd[k] / simulatedDensity(truth, f);
      n++;
    }
    expect(Math.abs(ratio / n - 1)).toBeLessThan(0.1);
    // the same seed gives the same series
    expect(simulateAperiodic(truth)).toEqual(x);
  });

  it('refuses impossible settings, naming the field', () => {
    expect(() => simulateAperiodic({ offset: 1, exponent: 1, durationSeconds: 0.01, sampleRateHz: fs, seed: 1 })).toThrow(/durationSeconds/);
    expect(() => simulateAperiodic({ offset: 1, exponent: 9, durationSeconds: 10, sampleRateHz: fs, seed: 1 })).toThrow(/exponent/);
  });
});

describe('runSlopeBench', () => {
  it('recovers known exponents within ±0.05 at 120 s without peaks', () => {
    for (const exponent of [1, 2]) {
      const [res] = runSlopeBench({ offset: 1, exponent, durationSeconds: 120, sampleRateHz: fs, seed: 10 }, [{ name: 'default', range: [2, 40], model: 'power-law', robust: true, segmentSeconds: 2, overlap: 0.5 }], 8);
      expect(res.failed).toBe(0);
      expect(Math.abs(res.bias), `exponent ${exponent}`).toBeLessThan(0.05);
      expect(res.spread).toBeGreaterThan(0);
    }
  });

  it('with a strong alpha peak, the plain fit is biased more than the robust one (Donoghue et al., 2020)', () => {
    // A peak above the line pulls a plain least-squares line up at 10 Hz; leaving peak bins out removes that pull.
    const truth = { offset: 1, exponent: 1.5, peaks: [{ centreHz: 10, widthHz: 1.5, heightLog10: 1 }], durationSeconds: 60, sampleRateHz: fs, seed: 20 };
    const [plain, robust] = runSlopeBench(
      truth,
      [
        { name: 'plain', range: [2, 40], model: 'power-law', robust: false, segmentSeconds: 2, overlap: 0.5 },
        { name: 'robust', range: [2, 40], model: 'power-law', robust: true, segmentSeconds: 2, overlap: 0.5 },
      ],
      6,
    );
    expect(Math.abs(plain.bias)).toBeGreaterThan(Math.abs(robust.bias));
    expect(Math.abs(robust.bias)).toBeLessThan(0.1);
  });

  it('reports progress and stops when cancelled', () => {
    const seen: number[] = [];
    let calls = 0;
    expect(() =>
      runSlopeBench({ offset: 1, exponent: 1, durationSeconds: 10, sampleRateHz: fs, seed: 1 }, [{ name: 'a', range: [2, 40], model: 'power-law', robust: true, segmentSeconds: 1, overlap: 0.5 }], 10, {
        onProgress: (f) => seen.push(f),
        shouldCancel: () => ++calls > 3,
      }),
    ).toThrow(/cancel/i);
    expect(seen).toEqual([0.1, 0.2, 0.3]);
  });
});

describe('sensitivity on one spectrum', () => {
  const x = simulateAperiodic({ offset: 1, exponent: 1.2, knee: 0, durationSeconds: 60, sampleRateHz: fs, seed: 33 });
  const w = welchPsd(x, fs, 2 * fs, fs);

  it('exponent over fit-range start × end, NaN where the range is empty', () => {
    const starts = [1, 2, 5];
    const ends = [4, 20, 40];
    const grid = exponentOverRanges(w.frequencies, w.psd, starts, ends, 'power-law');
    expect(grid.length).toBe(9);
    expect(Number.isNaN(grid[2 * 3 + 0])).toBe(true); // 5 … 4 Hz
    expect(grid[1 * 3 + 2]).toBeCloseTo(fitAperiodic(w.frequencies, w.psd, [2, 40], 'power-law').exponent, 12);
    for (const v of grid) if (Number.isFinite(v)) expect(Math.abs(v - 1.2)).toBeLessThan(0.3);
  });

  it('90 % bootstrap intervals over segments cover the true exponent near their nominal rate', () => {
    // 200 simulated recordings of 60 s, segments of 2 s without overlap (independent segments): the issue asks
    // for coverage within 80–97 %; the figure is printed for the closing note.
    let covered = 0;
    const reps = 200;
    for (let r = 0; r < reps; r++) {
      const y = simulateAperiodic({ offset: 1, exponent: 1.5, durationSeconds: 60, sampleRateHz: 100, seed: 1000 + r });
      const ci = bootstrapExponent(y, 100, 200, 0, [0, y.length], [2, 30], 'power-law', { repetitions: 200, level: 0.9, seed: r + 1 });
      if (ci.lower <= 1.5 && 1.5 <= ci.upper) covered++;
    }
    console.log(`slope check: 90 % bootstrap intervals covered the true exponent in ${covered} of ${reps} repetitions`);
    expect(covered / reps).toBeGreaterThanOrEqual(0.8);
    expect(covered / reps).toBeLessThanOrEqual(0.97);
  }, 120_000);

  it('prefers the knee model only where the spectrum bends', () => {
    const bent = simulateAperiodic({ offset: 3, exponent: 2, knee: 100, durationSeconds: 120, sampleRateHz: fs, seed: 5 });
    const wb = welchPsd(bent, fs, 2 * fs, fs);
    const withKnee = compareAperiodicModels(wb.frequencies, wb.psd, [1, 60]);
    expect(withKnee.preferred).toBe('power-law-knee');
    expect(withKnee.knee!.kneeHz!).toBeGreaterThan(5); // 100^(1/2) = 10 Hz
    expect(withKnee.knee!.kneeHz!).toBeLessThan(20);
    const plain = compareAperiodicModels(w.frequencies, w.psd, [2, 40]);
    expect(plain.preferred).toBe('power-law');
    expect(plain.reason).toMatch(/^Power law/);
  });
});

describe('broadband shift', () => {
  const freqs = Float64Array.of(2, 4, 8, 16, 32);
  const fit = (offset: number, exponent: number) => ({ offset, exponent, knee: null, kneeHz: null, r2: 1, rmse: 0, r2Kept: 1, rmseKept: 0, points: 10, excluded: 0, peaks: [] });

  it('is zero when both windows share the same fit, and 1 in power ratio', () => {
    for (const v of broadbandShift(freqs, fit(1, 1.5), fit(1, 1.5), 'decibel')) expect(v).toBe(0);
    for (const v of broadbandShift(freqs, fit(1, 1.5), fit(1, 1.5), 'power-ratio')) expect(v).toBe(1);
    expect(() => broadbandShift(freqs, fit(1, 1), fit(1, 1), 'z-score')).toThrow(/z-score/);
  });

  it('a steeper line pivoting at 8 Hz raises low and lowers high frequencies (10·Δχ·log10(8/f) dB)', () => {
    // log10 P = o − χ·log10 f; pivot at 8 Hz: o' = o + Δχ·log10 8
    const d = broadbandShift(freqs, fit(1, 1), fit(1 + 0.5 * Math.log10(8), 1.5), 'decibel');
    freqs.forEach((f, i) => expect(d[i]).toBeCloseTo(10 * 0.5 * Math.log10(8 / f), 9));
  });

  it('on a simulated pure exponent change, the measured map has the predicted sign pattern and is mostly explained', () => {
    // A scenario of our own: 40 trials of 2 s; in each, the first second has exponent 1 and the second 1.6 (pivot 10 Hz).
    const trialSamples = 2 * fs;
    const trials = 40;
    const x = new Float32Array(trials * trialSamples + 2 * fs);
    const starts: number[] = [];
    for (let e = 0; e < trials; e++) {
      const s0 = fs + e * trialSamples;
      starts.push(s0);
      const pre = simulateAperiodic({ offset: 1, exponent: 1, durationSeconds: 1, sampleRateHz: fs, seed: 500 + e });
      const post = simulateAperiodic({ offset: 1 + 0.6, exponent: 1.6, durationSeconds: 1, sampleRateHz: fs, seed: 900 + e });
      x.set(pre, s0);
      x.set(post, s0 + fs);
    }
    const rec = { sampleRateHz: fs, channelNames: ['Oz'], data: [x], events: starts.map((s) => ({ onsetSeconds: (s + fs) / fs, durationSeconds: 0, label: 'flash' })) };
    const result = runRecipe(rec as never, {
      format: 2,
      epochs: { events: ['flash'], start: -1, end: 0.996 },
      frequencies: { min: 4, max: 40, count: 12 },
      cycles: { fixed: 4 },
      baseline: { start: -0.7, end: -0.3, method: 'decibel' },
      spectrum: { segment: 1, overlap: 0.5, range: [1, 60] },
      aperiodic: { range: [2, 40], model: 'power-law' },
    });
    const L = result.times.length;
    const base = windowFit(x, fs, starts, 0, fs - 1, [2, 40], 'power-law');
    const post = windowFit(x, fs, starts, fs, 2 * fs - 1, [2, 40], 'power-law');
    expect(post.exponent - base.exponent).toBeGreaterThan(0.4);
    const predicted = broadbandShift(result.frequencies, base, post, 'decibel');
    const measured = Float64Array.from(result.conditions.flash.normalized[0].flat());
    const tPost = [Math.round(1.3 * fs), Math.round(1.7 * fs)];
    const shares = explainedShare(result.frequencies, measured, L, tPost[0], tPost[1], predicted, [
      { name: 'low', low: 4, high: 6 },
      { name: 'high', low: 25, high: 40 },
    ], 0);
    expect(shares[0].predicted).toBeGreaterThan(0);
    expect(shares[0].measured).toBeGreaterThan(0);
    expect(shares[1].predicted).toBeLessThan(0);
    expect(shares[1].measured).toBeLessThan(0);
    for (const s of shares) expect(s.share!).toBeGreaterThan(0.5);
  });
});
