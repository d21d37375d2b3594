import { AnalysisInputError } from '../errors';
import { aperiodicLine, fitAperiodic, type AperiodicFit, type AperiodicModel } from '../aperiodic';
import type { BaselineMethod } from '../baseline';
import { pow } from '../portable-math';
import { welchPsd } from '../welch';

/**
 * The aperiodic fit of one window of every epoch: Welch with one segment per epoch (the window itself, Hann, mean
 * removed), averaged over epochs, then the product's fit. `first`/`last` are sample offsets inside the epoch, inclusive.
 */
export function windowFit(
  samples: ArrayLike<number>,
  sampleRateHz: number,
  epochStarts: ArrayLike<number>,
  first: number,
  last: number,
  range: [number, number],
  model: AperiodicModel,
): AperiodicFit {
  const n = last - first + 1;
  if (!(n >= 8)) throw new AnalysisInputError('window', `holds ${n} samples; the window must hold at least 8 for a spectrum`);
  const spans: number[] = [];
  for (let e = 0; e < epochStarts.length; e++) spans.push(epochStarts[e] + first, epochStarts[e] + first + n);
  const w = welchPsd(samples, sampleRateHz, n, 0, spans);
  return fitAperiodic(w.frequencies, w.psd, range, model);
}

/** log10 power of a fit at f (the contract's two models). */
export function aperiodicLog10(fit: Pick<AperiodicFit, 'offset' | 'exponent' | 'knee'>, f: number): number {
  return aperiodicLine(fit, f);
}

/**
 * What a pure change of the aperiodic part alone would show after normalization: per frequency, the baseline
 * window's fitted power B(f) and the post-event window's P(f) put through the recipe's method (analysis contract,
 * "Baseline normalization"). With no change in oscillations, this is the whole measured map in the post window —
 * the broadband-shift confound of Gyurkovics et al. (2021, NeuroImage 237:118192) and Donoghue et al. (2020).
 * z-score has no counterpart (a fitted line has no spread over time) and is refused.
 */
export function broadbandShift(frequencies: ArrayLike<number>, baseline: AperiodicFit, post: AperiodicFit, method: BaselineMethod): Float64Array {
  if (method === 'z-score') {
    throw new AnalysisInputError('baseline.method', 'is "z-score": a fitted aperiodic line has no spread over baseline time, so there is no z-score to predict; check in decibel, percent change or power ratio');
  }
  const out = new Float64Array(frequencies.length);
  for (let i = 0; i < frequencies.length; i++) {
    const f = frequencies[i];
    const lb = aperiodicLog10(baseline, f);
    const lp = aperiodicLog10(post, f);
    switch (method) {
      case 'decibel':
        out[i] = 10 * (lp - lb);
        break;
      case 'percent-change':
        out[i] = 100 * (pow(10, lp - lb) - 1);
        break;
      case 'power-ratio':
        out[i] = pow(10, lp - lb);
        break;
    }
  }
  return out;
}

export interface BandShare {
  band: string;
  /** Mean measured normalized value over the band's frequencies and the window's times. */
  measured: number;
  /** Mean predicted by the aperiodic change alone over the band's frequencies. */
  predicted: number;
  /** predicted / measured when both have the same sign, clamped to 0 … 1; null when the measured change is ~0 or the signs differ. */
  share: number | null;
}

/**
 * Per band, how much of the measured post-window change the aperiodic shift alone accounts for. `measured` is a
 * normalized map `[f·L + t]`; `neutral` is the method's no-change value (0 for dB and percent change, 1 for power
 * ratio). Frequencies are taken inclusive of the band's edges.
 */
export function explainedShare(
  frequencies: ArrayLike<number>,
  measured: ArrayLike<number>,
  timePoints: number,
  firstTime: number,
  lastTime: number,
  predicted: ArrayLike<number>,
  bands: { name: string; low: number; high: number }[],
  neutral: number,
): BandShare[] {
  return bands.map(({ name, low, high }) => {
    let m = 0;
    let mc = 0;
    let p = 0;
    let pc = 0;
    for (let f = 0; f < frequencies.length; f++) {
      if (frequencies[f] < low || frequencies[f] > high) continue;
      p += predicted[f] - neutral;
      pc++;
      for (let t = firstTime; t <= lastTime; t++) {
        const v = measured[f * timePoints + t];
        if (Number.isFinite(v)) {
          m += v - neutral;
          mc++;
        }
      }
    }
    const mm = mc > 0 ? m / mc : NaN;
    const pp = pc > 0 ? p / pc : NaN;
    const share = Number.isFinite(mm) && Number.isFinite(pp) && Math.abs(mm) > 1e-9 && Math.sign(mm) === Math.sign(pp) ? Math.min(1, pp / mm) : null;
    return { band: name, measured: mm + neutral, predicted: pp + neutral, share };
  });
}
