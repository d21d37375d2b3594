// Analysis contract (shared/specs/analysis.md), "Epoch means": each epoch's own mean is removed, per channel, before
// the wavelet transform. Why (common practice, quoted in the contract): a complex Morlet wavelet without a
// correction term passes about 2·exp(−n²/2) of a steady offset, and DC-coupled amplifiers leave hundreds of µV.
import { describe, expect, it } from 'vitest';
import { decomposeChannel } from '../../../../src/lib/analysis/decompose';
import { gaussianSigmas } from '../../../../src/lib/analysis/wavelet';
import { coloredNoise, seededNormal } from '../../../helpers/seeded-random';

const fs = 256;
const L = 3 * fs + 1; // a 3 s epoch
const freqs = Float64Array.of(3, 4, 6, 10, 20, 40);

// A recording of our own: 1/f noise (≈ 10 µV) plus a 6 Hz rhythm of 8 µV after each event, 20 epochs.
function testRecording(seed: number): { samples: Float32Array; starts: Int32Array } {
  const n = 1 << 15;
  const noise = coloredNoise(n, fs, 1.5, seed);
  let rms = 0;
  for (const v of noise) rms += (v * v) / n;
  const scale = 10 / Math.sqrt(rms);
  const starts = Int32Array.from({ length: 20 }, (_, e) => 200 + e * 1500);
  const samples = new Float32Array(n);
  for (let i = 0; i < n; i++) samples[i] = noise[i] * scale;
  for (const s0 of starts) for (let j = fs; j < 2 * fs; j++) samples[s0 + j] += 8 * Math.sin((2 * Math.PI * 6 * j) / fs);
  return { samples, starts };
}

function run(samples: Float32Array, starts: Int32Array, scope: 'average' | 'trial', cycles: number) {
  const sigmas = gaussianSigmas(freqs, { fixed: cycles });
  const out = decomposeChannel({
    samples,
    epochStarts: [starts],
    epochSamples: L,
    sampleRateHz: fs,
    frequencies: freqs,
    sigmas,
    baseline: { first: 40, last: 200, method: 'decibel', scope },
    singleTrials: true,
  });
  return { ...out, sigmas };
}

describe('epoch means are removed before the wavelet transform', () => {
  it('a steady 1 mV offset changes power by less than 0.1 % wherever the wavelet lies inside the epoch', () => {
    // The check: offsets as a DC-coupled amplifier leaves them, added to every sample. Float32 keeps about
    // seven significant digits of 1000 µV + signal, so the power of the demeaned epochs may differ only by that.
    const { samples, starts } = testRecording(7);
    for (const offset of [1000, -1000]) {
      const shifted = samples.map((v) => v + offset);
      for (const scope of ['average', 'trial'] as const) {
        for (const cycles of [3, 7]) {
          const a = run(samples, starts, scope, cycles);
          const b = run(shifted, starts, scope, cycles);
          let worst = 0;
          for (let f = 0; f < freqs.length; f++) {
            const support = Math.ceil(5 * a.sigmas[f] * fs); // the contract samples the wavelet over |t| ≤ 5σ at least
            for (let j = support; j < L - support; j++) {
              const p = a.power[0][f * L + j];
              worst = Math.max(worst, Math.abs(b.power[0][f * L + j] - p) / p);
            }
            // Each single trial too, against that trial's mean power at the frequency: one trial's instantaneous
            // power passes near zero now and then, where a relative change says nothing about the offset.
            for (let e = 0; e < starts.length; e++) {
              const row = (e * freqs.length + f) * L;
              let mean = 0;
              for (let j = support; j < L - support; j++) mean += a.singleTrials![0][row + j] / (L - 2 * support);
              for (let j = support; j < L - support; j++) {
                worst = Math.max(worst, Math.abs(b.singleTrials![0][row + j] - a.singleTrials![0][row + j]) / mean);
              }
            }
          }
          expect(worst, `offset ${offset} scope ${scope} cycles ${cycles}`).toBeLessThan(1e-3);
          // the normalized maps follow (10·log10(1.001) ≈ 0.0043 dB)
          for (let i = 0; i < a.normalized[0].length; i++) {
            const f = Math.floor(i / L);
            const j = i % L;
            const support = Math.ceil(5 * a.sigmas[f] * fs);
            if (j < support || j >= L - support) continue;
            expect(Math.abs(b.normalized[0][i] - a.normalized[0][i])).toBeLessThan(0.005);
          }
        }
      }
    }
  });

  it('removes exactly what a steady offset would leak through an uncorrected wavelet, 2·exp(−n²/2) of it', () => {
    // Direct check of the leak the contract quotes, with the contract's wavelet written out here (not the core's):
    // w(t) = exp(2πift)·exp(−t²/2σ²), σ = n/(2πf), scaled so amplitude A at f gives power A², i.e. |Σ w·A cos| = A,
    // which makes the scale 2/Σ exp(−t²/2σ²). The sum of w over t is the Gaussian's transform at f: exp(−n²/2)
    // times Σ exp(−t²/2σ²), so a constant c gives |y| = 2·c·exp(−n²/2).
    for (const [f, n] of [[4, 3], [6, 4], [10, 5]]) {
      const sigma = n / (2 * Math.PI * f);
      const h = Math.ceil(8 * sigma * fs);
      let g = 0;
      let re = 0;
      let im = 0;
      for (let k = -h; k <= h; k++) {
        const t = k / fs;
        const gauss = Math.exp(-(t * t) / (2 * sigma * sigma));
        g += gauss;
        re += gauss * Math.cos(2 * Math.PI * f * t);
        im += gauss * Math.sin(2 * Math.PI * f * t);
      }
      const leak = (2 * Math.hypot(re, im)) / g;
      expect(Math.abs(leak - 2 * Math.exp((-n * n) / 2)) / leak).toBeLessThan(1e-6);
      // 1000 µV through a 3-cycle wavelet at 4 Hz: |y| ≈ 22 µV, i.e. ≈ 490 µV² of spurious power, which the core must not show
      const c = 1000;
      const x = new Float32Array(4 * L).fill(c);
      const sigmas = Float64Array.of(sigma);
      const out = decomposeChannel({
        samples: x,
        epochStarts: [Int32Array.of(0, L)],
        epochSamples: L,
        sampleRateHz: fs,
        frequencies: Float64Array.of(f),
        sigmas,
        baseline: { first: 0, last: 10, method: 'power-ratio', scope: 'average' },
      });
      const spurious = (c * leak) ** 2;
      expect(spurious).toBeGreaterThan(5e-5); // the leak is real for these widths …
      for (const p of out.power[0]) expect(p).toBeLessThan(1e-9 * spurious); // … and the demeaned epochs have none
    }
  });

  it('demeans each epoch on its own, not the recording as a whole', () => {
    // Two epochs on different plateaus (a step between them): convolving the whole recording after removing one
    // overall mean would leave each epoch an offset; per-epoch demeaning leaves none. Power of a constant epoch is 0.
    const x = new Float32Array(2 * L);
    x.fill(300, 0, L);
    x.fill(-450, L);
    const normal = seededNormal(5);
    const noise = Float32Array.from({ length: 2 * L }, () => normal());
    const withNoise = x.map((v, i) => v + noise[i]);
    const a = run(noise, Int32Array.of(0, L), 'trial', 5);
    const b = run(withNoise, Int32Array.of(0, L), 'trial', 5);
    for (let f = 0; f < freqs.length; f++) {
      const support = Math.ceil(5 * a.sigmas[f] * fs);
      for (let j = support; j < L - support; j++) {
        const p = a.power[0][f * L + j];
        expect(Math.abs(b.power[0][f * L + j] - p) / p).toBeLessThan(1e-3);
      }
    }
  });
});
