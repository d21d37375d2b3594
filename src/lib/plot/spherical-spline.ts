// Scalp topographies are interpolated with spherical splines (Perrin, Pernier, Bertrand & Echallier, 1989,
// "Spherical splines for scalp potential and current density mapping", Electroenceph clin Neurophysiol 72:184–187).
// Electrodes are unit vectors on a sphere; the value at any point r is
//   V(r) = c0 + Σ_i c_i · g_m(cos(r, r_i)),  g_m(x) = 1/(4π) Σ_{n=1}^{N} (2n + 1) / (n^m (n + 1)^m) · P_n(x),
// with the weights solving  Σ_j c_j g_m(cos(r_i, r_j)) + c0 = V_i  for every electrode i and  Σ_j c_j = 0
// (Perrin et al. 1989, eqs. 1–3), so the surface passes exactly through every electrode's value and a constant field
// stays constant (c = 0, c0 = the constant). m = 4 and N = 50 terms: the order Perrin et al. recommend and the
// truncation commonly used (common practice; the term count is from memory).

export type Direction = readonly [number, number, number];

export interface SphericalSplineOptions {
  /** Spline order m (Perrin et al. use 4). */
  order?: number;
  /** Legendre terms N of the series. */
  terms?: number;
}

/**
 * P_0(x) … P_N(x), Legendre polynomials by Bonnet's recurrence (n + 1) P_{n+1} = (2n + 1) x P_n − n P_{n−1}
 * (Abramowitz & Stegun 1964, 22.7.10), into `out` (length N + 1).
 */
export function legendreSeries(x: number, out: Float64Array): Float64Array {
  const n = out.length;
  if (n > 0) out[0] = 1;
  if (n > 1) out[1] = x;
  for (let k = 1; k + 1 < n; k++) out[k + 1] = ((2 * k + 1) * x * out[k] - k * out[k - 1]) / (k + 1);
  return out;
}

/** Perrin's g_m(x) for the cosine x of the angle between two points on the unit sphere (header formula). */
export function splineKernel(x: number, order = 4, terms = 50): number {
  const c = Math.max(-1, Math.min(1, x));
  // The same recurrence as legendreSeries, without a buffer: this runs once per pixel and electrode.
  let prev = 1;
  let p = c;
  let sum = 0;
  for (let n = 1; n <= terms; n++) {
    sum += ((2 * n + 1) / Math.pow(n * (n + 1), order)) * p;
    const next = ((2 * n + 1) * c * p - n * prev) / (n + 1);
    prev = p;
    p = next;
  }
  return sum / (4 * Math.PI);
}

export interface SphericalSpline {
  directions: Direction[];
  weights: Float64Array;
  constant: number;
  order: number;
  terms: number;
}

const cosine = (a: Direction, b: Direction) => (a[0] * b[0] + a[1] * b[1] + a[2] * b[2]) / (Math.hypot(a[0], a[1], a[2]) * Math.hypot(b[0], b[1], b[2]));

/**
 * The spline through `values` at `directions` (same length, at least one; finite values). One electrode gives its
 * value everywhere. Throws when two electrodes coincide (the system is then singular).
 */
export function fitSphericalSpline(directions: readonly Direction[], values: ArrayLike<number>, options: SphericalSplineOptions = {}): SphericalSpline {
  const order = options.order ?? 4;
  const terms = options.terms ?? 50;
  const n = directions.length;
  if (n === 0 || values.length !== n) throw new RangeError(`spherical spline: ${n} electrodes but ${values.length} values`);
  const size = n + 1;
  // Augmented matrix [G 1 | V; 1ᵀ 0 | 0], row-major, solved by Gaussian elimination with partial pivoting.
  const a = new Float64Array(size * (size + 1));
  const w = size + 1;
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < n; j++) a[i * w + j] = splineKernel(cosine(directions[i], directions[j]), order, terms);
    a[i * w + n] = 1;
    a[i * w + size] = values[i];
    a[n * w + i] = 1;
  }
  const x = solve(a, size);
  if (x === null) throw new RangeError('spherical spline: two electrodes share one position');
  return { directions: directions.slice(), weights: x.subarray(0, n), constant: x[n], order, terms };
}

/** V(r) of a fitted spline at direction `r` (any length; only its direction counts). */
export function evaluateSphericalSpline(spline: SphericalSpline, r: Direction): number {
  let v = spline.constant;
  for (let i = 0; i < spline.directions.length; i++) v += spline.weights[i] * splineKernel(cosine(r, spline.directions[i]), spline.order, spline.terms);
  return v;
}

/** Solves the augmented system in place; null when it is singular. */
function solve(a: Float64Array, n: number): Float64Array | null {
  const w = n + 1;
  for (let col = 0; col < n; col++) {
    let pivot = col;
    for (let r = col + 1; r < n; r++) if (Math.abs(a[r * w + col]) > Math.abs(a[pivot * w + col])) pivot = r;
    if (!(Math.abs(a[pivot * w + col]) > 1e-14)) return null;
    if (pivot !== col) {
      for (let k = col; k < w; k++) {
        const t = a[col * w + k];
        a[col * w + k] = a[pivot * w + k];
        a[pivot * w + k] = t;
      }
    }
    const d = a[col * w + col];
    for (let r = 0; r < n; r++) {
      if (r === col) continue;
      const f = a[r * w + col] / d;
      if (f === 0) continue;
      for (let k = col; k < w; k++) a[r * w + k] -= f * a[col * w + k];
    }
  }
  const x = new Float64Array(n);
  for (let i = 0; i < n; i++) x[i] = a[i * w + n] / a[i * w + i];
  // A singular system (coinciding electrodes) shows as a vanishing pivot or a non-finite solution.
  for (let i = 0; i < n; i++) if (!Number.isFinite(x[i])) return null;
  return x;
}
