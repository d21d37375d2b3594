import { directionAtDisc, scalpDirection, scalpPosition } from './scalp-positions';
import { evaluateSphericalSpline, fitSphericalSpline, type Direction } from './spherical-spline';
import { placeLabels, type LabelBox } from './label-placement';

/**
 * Geometry of a scalp topography, in the units of an SVG viewBox centred on the vertex (Cz): the head disc has
 * radius `HEAD_RADIUS`, nose up, left ear at −x. Pure, so the screen, PNG and SVG exports draw the same picture.
 */
export const HEAD_RADIUS = 100;
/** Projected radius (1 = 90° from Cz) that meets the drawn head outline: 1.25 leaves room for the 9/10 positions (108°). */
export const DISC_REACH = 1.25;
export const LABEL_FONT_SIZE = 8;
/** JetBrains Mono (and common monospace faces) advance every glyph 0.6 em. */
const MONO_ADVANCE_EM = 0.6;
const DOT_RADIUS = 4;

export interface ScalpElectrode {
  channel: string;
  value: number | null;
  x: number;
  y: number;
}

export interface ScalpLabel extends LabelBox {
  channel: string;
  /** Where the label's dot is (for a leader line when the label had to move away). */
  anchorX: number;
  anchorY: number;
}

export interface ScalpGeometry {
  electrodes: ScalpElectrode[];
  /** Channels without a 10-20 / 10-10 name (not drawn). */
  unplaced: string[];
  labels: ScalpLabel[];
  /** Interpolated values on a `cells` × `cells` grid over [−R, R]², row 0 at the top; NaN outside the head disc. */
  grid: { cells: number; values: Float64Array } | null;
  /** Smallest and largest finite value at the electrodes (what the interpolation spans between). */
  extent: [number, number] | null;
  outline: { head: { r: number }; nose: string; leftEar: string; rightEar: string };
}

/** Pixel (SVG unit) position of a projected point (x right, y toward the nose). */
const toView = (p: { x: number; y: number }) => ({ x: (p.x * HEAD_RADIUS) / DISC_REACH, y: (-p.y * HEAD_RADIUS) / DISC_REACH });

/**
 * Everything a topography draws: electrode dots, labels pushed apart so no two intersect (`placeLabels`), and the
 * spherical-spline interpolation (Perrin et al., 1989; src/lib/plot/spherical-spline.ts) of the finite values over
 * the head disc. Electrodes without a value are drawn but not interpolated; fewer than one finite value gives no grid.
 */
export function scalpGeometry(values: readonly { channel: string; value: number | null }[], { cells = 64 }: { cells?: number } = {}): ScalpGeometry {
  const electrodes: ScalpElectrode[] = [];
  const unplaced: string[] = [];
  const seen = new Set<string>();
  const fitDirections: Direction[] = [];
  const fitValues: number[] = [];
  for (const v of values) {
    const pos = scalpPosition(v.channel);
    const dir = scalpDirection(v.channel);
    if (pos === null || dir === null) {
      unplaced.push(v.channel);
      continue;
    }
    const p = toView(pos);
    electrodes.push({ channel: v.channel, value: v.value, x: p.x, y: p.y });
    // One electrode per position (T3 and T7 name the same place): the spline needs distinct points.
    const key = dir.map((c) => c.toFixed(9)).join(',');
    if (v.value !== null && Number.isFinite(v.value) && !seen.has(key)) {
      seen.add(key);
      fitDirections.push(dir);
      fitValues.push(v.value);
    }
  }
  const extent: [number, number] | null = fitValues.length > 0 ? [Math.min(...fitValues), Math.max(...fitValues)] : null;
  let grid: ScalpGeometry['grid'] = null;
  if (fitValues.length > 0) {
    const spline = fitSphericalSpline(fitDirections, fitValues);
    const out = new Float64Array(cells * cells).fill(NaN);
    const step = (2 * HEAD_RADIUS) / cells;
    for (let row = 0; row < cells; row++) {
      const vy = -HEAD_RADIUS + (row + 0.5) * step;
      for (let col = 0; col < cells; col++) {
        const vx = -HEAD_RADIUS + (col + 0.5) * step;
        if (vx * vx + vy * vy > HEAD_RADIUS * HEAD_RADIUS) continue;
        out[row * cells + col] = evaluateSphericalSpline(spline, directionAtDisc((vx / HEAD_RADIUS) * DISC_REACH, (-vy / HEAD_RADIUS) * DISC_REACH));
      }
    }
    grid = { cells, values: out };
  }
  const height = LABEL_FONT_SIZE + 1;
  const boxes = electrodes.map((e) => ({ x: e.x, y: e.y + DOT_RADIUS + 1 + height / 2, width: e.channel.length * LABEL_FONT_SIZE * MONO_ADVANCE_EM + 2, height }));
  const dots = electrodes.map((e) => ({ x: e.x, y: e.y, width: 2 * DOT_RADIUS, height: 2 * DOT_RADIUS }));
  const placed = placeLabels(boxes, dots);
  const labels = placed.map((b, i) => ({ ...b, channel: electrodes[i].channel, anchorX: electrodes[i].x, anchorY: electrodes[i].y }));
  const R = HEAD_RADIUS;
  return {
    electrodes,
    unplaced,
    labels,
    grid,
    extent,
    outline: {
      head: { r: R },
      nose: `M -12 ${-R + 1} L 0 ${-R - 14} L 12 ${-R + 1}`,
      leftEar: `M ${-R} -14 q -10 14 0 28`,
      rightEar: `M ${R} -14 q 10 14 0 28`,
    },
  };
}

export { DOT_RADIUS as SCALP_DOT_RADIUS };
