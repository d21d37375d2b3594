/**
 * |y|² of one demeaned epoch by direct (slow, obvious) convolution, the reference the trial-scope tests compare with:
 * y(t) = Σ_i x(i)·w(t − i) with the analysis contract's wavelet w(t) = c·exp(2πi·f·t/fs)·exp(−t²/(2σ²fs²)),
 * c = 2/Σ_t exp(−t²/(2σ²fs²)), over |t| ≤ h (the bank's support); the epoch is x[start … start + L − 1] less its mean.
 * Morlet wavelet convolution as in Tallon-Baudry et al. (1997) and Cohen (2014), "Analyzing Neural Time Series Data".
 */
export function directPower(x: Float32Array, start: number, f: number, sigma: number, h: number, L: number, fs: number): Float64Array {
  let mean = 0;
  for (let j = 0; j < L; j++) mean += x[start + j];
  mean /= L;
  const g = Array.from({ length: 2 * h + 1 }, (_, k) => Math.exp(-((k - h) ** 2) / (2 * (sigma * fs) ** 2)));
  const c = 2 / g.reduce((a, b) => a + b, 0);
  const re = g.map((gk, k) => c * gk * Math.cos((2 * Math.PI * f * (k - h)) / fs));
  const im = g.map((gk, k) => c * gk * Math.sin((2 * Math.PI * f * (k - h)) / fs));
  const p = new Float64Array(L);
  for (let t = 0; t < L; t++) {
    let yr = 0;
    let yi = 0;
    for (let i = Math.max(0, t - h); i <= Math.min(L - 1, t + h); i++) {
      const v = x[start + i] - mean;
      yr += v * re[t - i + h];
      yi += v * im[t - i + h];
    }
    p[t] = yr * yr + yi * yi;
  }
  return p;
}
