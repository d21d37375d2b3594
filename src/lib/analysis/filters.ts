import { cos, sin } from './portable-math';

/**
 * Zero-phase IIR filters for the continuous recording (recipe `filters`, DEVELOPERS.md "Filters"). Designs use the
 * portable sin/cos, and filtering only + and ×, so a filtered channel has the same bits in every engine.
 */

/** One second-order section, normalized so a0 = 1: `y = b0·x + b1·x[−1] + b2·x[−2] − a1·y[−1] − a2·y[−2]`. */
export interface Biquad {
  b0: number;
  b1: number;
  b2: number;
  a1: number;
  a2: number;
}

/**
 * Butterworth high-pass of even `order` at `cutoffHz`, as order/2 second-order sections: the RBJ high-pass biquad
 * (R. Bristow-Johnson, "Cookbook formulae for audio EQ biquad filter coefficients", the Audio EQ Cookbook)
 * `b = [(1 + cos w0)/2, −(1 + cos w0), (1 + cos w0)/2]`, `a = [1 + α, −2 cos w0, 1 − α]`, `w0 = 2π fc/fs`,
 * `α = sin w0 / (2Q)`, with the Butterworth pole Qs `Q_k = 1 / (2 cos((2k + 1)π / (2N)))`, k = 0 … N/2 − 1. The
 * cookbook biquads are the bilinear transform with the cutoff prewarped, so the cascade's magnitude is
 * `|H(f)|² = 1 / (1 + (tan(π fc/fs) / tan(π f/fs))^(2N))` (Oppenheim & Schafer, "Discrete-Time Signal Processing",
 * 3rd ed., §7.2.4: bilinear transformation of the Butterworth filter).
 */
export function butterworthHighPass(cutoffHz: number, order: number, sampleRateHz: number): Biquad[] {
  const w0 = (2 * Math.PI * cutoffHz) / sampleRateHz;
  const cw = cos(w0);
  const sw = sin(w0);
  const sections: Biquad[] = [];
  for (let k = 0; k < order / 2; k++) {
    const q = 1 / (2 * cos(((2 * k + 1) * Math.PI) / (2 * order)));
    const alpha = sw / (2 * q);
    const a0 = 1 + alpha;
    sections.push({ b0: (1 + cw) / 2 / a0, b1: -(1 + cw) / a0, b2: (1 + cw) / 2 / a0, a1: (-2 * cw) / a0, a2: (1 - alpha) / a0 });
  }
  return sections;
}

/**
 * Notch at `centreHz` with quality `q` (bandwidth ≈ centre/q): the RBJ notch biquad (Audio EQ Cookbook)
 * `b = [1, −2 cos w0, 1]`, `a = [1 + α, −2 cos w0, 1 − α]`, `α = sin w0 / (2Q)`; its magnitude is
 * `|H|² = (Ω² − 1)² / ((Ω² − 1)² + (Ω/Q)²)`, `Ω = tan(π f/fs) / tan(π f0/fs)` (bilinear transform of
 * `(s² + 1)/(s² + s/Q + 1)`, prewarped at f0).
 */
export function notch(centreHz: number, q: number, sampleRateHz: number): Biquad {
  const w0 = (2 * Math.PI * centreHz) / sampleRateHz;
  const cw = cos(w0);
  const alpha = sin(w0) / (2 * q);
  const a0 = 1 + alpha;
  return { b0: 1 / a0, b1: (-2 * cw) / a0, b2: 1 / a0, a1: (-2 * cw) / a0, a2: (1 - alpha) / a0 };
}

// One pass of a cascade over x[0 … n) in place (transposed direct form II), each section started in its steady
// state for a constant input equal to x[0] (as if the signal had been x[0] forever; cf. scipy's lfilter_zi).
function pass(x: Float64Array, sections: readonly Biquad[]): void {
  const n = x.length;
  let u = x[0];
  for (const s of sections) {
    const { b0, b1, b2, a1, a2 } = s;
    // Steady state: y = G·u with G = (b0 + b1 + b2)/(1 + a1 + a2); z1 = (G − b0)·u, z2 = (b2 − a2·G)·u.
    const gain = (b0 + b1 + b2) / (1 + a1 + a2);
    let z1 = (gain - b0) * u;
    let z2 = (b2 - a2 * gain) * u;
    for (let i = 0; i < n; i++) {
      const xi = x[i];
      const yi = b0 * xi + z1;
      z1 = b1 * xi - a1 * yi + z2;
      z2 = b2 * xi - a2 * yi;
      x[i] = yi;
    }
    u = gain * u;
  }
}

/**
 * Zero-phase filtering of one continuous stretch: the cascade run forwards, then backwards over the result
 * (Oppenheim & Schafer, 3rd ed., §5.1: the forward-backward response is |H(e^jω)|², with zero phase), after
 * extending both ends by `padSamples` (capped at n − 1) with the odd reflection `2·x[0] − x[i]`, so the stretch's
 * ends start near the filter's steady state. Returns a new Float64Array of the same length.
 */
export function filtfilt(x: ArrayLike<number>, sections: readonly Biquad[], padSamples: number): Float64Array {
  const n = x.length;
  if (n < 2 || sections.length === 0) return Float64Array.from(x);
  const pad = Math.max(0, Math.min(n - 1, Math.floor(padSamples)));
  const ext = new Float64Array(n + 2 * pad);
  const first = x[0];
  const last = x[n - 1];
  for (let i = 1; i <= pad; i++) {
    ext[pad - i] = 2 * first - x[i];
    ext[pad + n - 1 + i] = 2 * last - x[n - 1 - i];
  }
  for (let i = 0; i < n; i++) ext[pad + i] = x[i];
  pass(ext, sections);
  ext.reverse();
  pass(ext, sections);
  ext.reverse();
  return ext.slice(pad, pad + n);
}
