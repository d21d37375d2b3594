/**
 * 2-D scalp positions of 10-20 / 10-10 electrode names, derived from the system's definition rather than typed in
 * (common practice; the construction below is from memory): on a spherical head with Cz at the top, the midline
 * (Fpz…Oz) and the ring through Fpz, T7 and Oz are cut in 10 % / 20 % steps, so Fpz, T7, Oz, T8 lie on the
 * "equator" (polar angle 90°), Fz/Pz at 45° and FCz/CPz at 22.5° from Cz, and ring electrodes every 18° of azimuth
 * (Fp1 18°, F7 54°, T7 90°, P7 126°, O1 162°). Row electrodes (F3, FC5, …) divide the great-circle arc from the
 * row's midline point to its ring point into quarters (F1 ¼, F3 ½, F5 ¾); the 9/10 positions (TP9, PO9) sit one
 * 10 % step (18°) below the ring. Projection: azimuthal equidistant, radius = polar angle / 90°, nose up (+y),
 * left ear at −x.
 */

export type Vec = [number, number, number];

const rad = (deg: number) => (deg * Math.PI) / 180;

/** Unit vector for polar angle θ from Cz and azimuth φ from the nose, counter-clockwise toward the left ear. */
function sphere(polarDeg: number, azimuthDeg: number): Vec {
  const t = rad(polarDeg);
  const p = rad(azimuthDeg);
  return [-Math.sin(t) * Math.sin(p), Math.sin(t) * Math.cos(p), Math.cos(t)];
}

/** Point a fraction u along the great circle from a to b (spherical linear interpolation). */
function slerp(a: Vec, b: Vec, u: number): Vec {
  const dot = Math.max(-1, Math.min(1, a[0] * b[0] + a[1] * b[1] + a[2] * b[2]));
  const omega = Math.acos(dot);
  if (omega < 1e-9) return a;
  const s = Math.sin(omega);
  const wa = Math.sin((1 - u) * omega) / s;
  const wb = Math.sin(u * omega) / s;
  return [wa * a[0] + wb * b[0], wa * a[1] + wb * b[1], wa * a[2] + wb * b[2]];
}

function project(v: Vec): { x: number; y: number } {
  const polar = Math.acos(Math.max(-1, Math.min(1, v[2])));
  const r = polar / rad(90);
  const h = Math.hypot(v[0], v[1]);
  return h < 1e-12 ? { x: 0, y: 0 } : { x: (r * v[0]) / h, y: (r * v[1]) / h };
}

// Rows: the midline point (polar angle, azimuth 0 front / 180 back) and the ring azimuth of the row's lateral end.
const ROWS: Record<string, { mid: [number, number]; ring: number }> = {
  Fp: { mid: [90, 0], ring: 18 },
  AF: { mid: [67.5, 0], ring: 36 },
  F: { mid: [45, 0], ring: 54 },
  FC: { mid: [22.5, 0], ring: 72 },
  C: { mid: [0, 0], ring: 90 },
  CP: { mid: [22.5, 180], ring: 108 },
  P: { mid: [45, 180], ring: 126 },
  PO: { mid: [67.5, 180], ring: 144 },
  O: { mid: [90, 180], ring: 162 },
};

const ALIASES: Record<string, string> = { T3: 'T7', T4: 'T8', T5: 'P7', T6: 'P8' };
const RING: Record<string, [string, number]> = { F7: ['F', 1], F8: ['F', -1], FT7: ['FC', 1], FT8: ['FC', -1], T7: ['C', 1], T8: ['C', -1], TP7: ['CP', 1], TP8: ['CP', -1], P7: ['P', 1], P8: ['P', -1] };

/** Position of a 10-20 / 10-10 name (case-insensitive; T3/T4/T5/T6 accepted), or null when it is not one. */
export function scalpPosition(name: string): { x: number; y: number } | null {
  const v = scalpDirection(name);
  return v === null ? null : project(v);
}

/**
 * The unit vector on the model head (x toward the right ear, y toward the nose, z up through Cz) at a point of the
 * drawn disc: the inverse of the azimuthal equidistant projection above (radius 1 = 90° from Cz).
 */
export function directionAtDisc(x: number, y: number): Vec {
  const r = Math.hypot(x, y);
  if (r < 1e-12) return [0, 0, 1];
  const polar = r * rad(90);
  const s = Math.sin(polar);
  return [(s * x) / r, (s * y) / r, Math.cos(polar)];
}

/** The unit vector of a 10-20 / 10-10 name on the model head (as scalpPosition), or null when it is not one. */
export function scalpDirection(name: string): Vec | null {
  const raw = name.trim().replace(/^EEG\s+/i, '');
  const canonical = ALIASES[raw.toUpperCase()] ?? raw;
  const m = /^(Fp|AF|FT|FC|F|TP|T|CP|C|PO|P|O)(z|\d+)$/i.exec(canonical);
  if (m === null) return null;
  const prefix = m[1].length === 2 ? m[1][0].toUpperCase() + m[1][1].toLowerCase() : m[1].toUpperCase();
  const rowName = prefix === 'Fp' ? 'Fp' : prefix.toUpperCase();
  const suffix = m[2].toLowerCase();
  const ring = RING[`${rowName}${suffix}`];
  if (ring !== undefined) return sphere(90, ring[1] * ROWS[ring[0]].ring);
  if (rowName === 'T' || rowName === 'FT' || rowName === 'TP') {
    const n = Number(suffix);
    if (n === 9 || n === 10) {
      const az = { T: 90, FT: 72, TP: 108 }[rowName];
      return sphere(108, (n % 2 === 1 ? 1 : -1) * az);
    }
    return null;
  }
  const row = ROWS[rowName];
  if (row === undefined) return null;
  const mid = sphere(row.mid[0], row.mid[1]);
  if (suffix === 'z') return mid;
  const n = Number(suffix);
  const side = n % 2 === 1 ? 1 : -1;
  if ((rowName === 'PO' || rowName === 'O' || rowName === 'Fp' || rowName === 'AF') && (n === 9 || n === 10)) {
    return sphere(108, side * (rowName === 'PO' ? 144 : rowName === 'O' ? 162 : rowName === 'AF' ? 36 : 18));
  }
  const ringPoint = sphere(90, side * row.ring);
  if (rowName === 'Fp' || rowName === 'O') return ringPoint;
  const step = Math.ceil(n / 2); // 1,2 → 1; 3,4 → 2; 5,6 → 3; 7,8 → 4
  if (step < 1 || step > 4) return null;
  return slerp(mid, ringPoint, step / 4);
}
