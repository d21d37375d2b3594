import type { Colormap } from './colormap';
import { colourPosition, type ColourScale } from './colour-scale';
import type { EdgeZones } from './edge-zone';

/** Anything with ImageData's fields, so tests rasterize into a plain object under Node. */
export interface ImageBuffer {
  width: number;
  height: number;
  data: Uint8ClampedArray;
}

/** A map in rows of frequency: `values[f·nTimes + t]`, f = 0 the lowest frequency (drawn at the bottom). */
export interface MapGrid {
  values: ArrayLike<number>;
  nFreqs: number;
  nTimes: number;
}

export interface HatchStyle {
  /** Pixels between diagonal lines. */
  spacing: number;
  /** Line thickness in pixels. */
  width: number;
  rgb: [number, number, number];
  /** Opacity of the line over the map colour, 0 … 1. */
  alpha: number;
}

export interface RasterOptions {
  colormap: Colormap;
  scale: ColourScale;
  /** Reverse the colormap (t → 1 − t). */
  reverse?: boolean;
  /** Colour of cells with no value (NaN, ±Infinity, ≤ 0 on a log scale). */
  missing?: [number, number, number];
  edges?: EdgeZones | null;
  hatch?: HatchStyle;
}

/** Ink (#10283a) at low opacity, the look's hatch for edge zones. */
export const EDGE_HATCH: HatchStyle = { spacing: 6, width: 2, rgb: [0x10, 0x28, 0x3a], alpha: 0.45 };
const SHELL: [number, number, number] = [0xc9, 0xb8, 0x96];

/**
 * Colours every cell of `grid` once through the colormap (index round(t·(size − 1))), then fills `image`
 * pixel by pixel with the colour of the nearest cell: pixel column x shows time ⌊x·nTimes/width⌋, pixel row y
 * frequency nFreqs − 1 − ⌊y·nFreqs/height⌋ (equal rows: the grid's own spacing, log or linear, sets the axis).
 * Cells in an edge zone get diagonal hatch lines ((x + y) mod spacing < width) blended over their colour.
 */
export function rasterizeMap(image: ImageBuffer, grid: MapGrid, options: RasterOptions): void {
  const { width, height, data } = image;
  const { values, nFreqs: nf, nTimes: nt } = grid;
  const { colormap, scale, reverse = false, missing = SHELL, edges = null, hatch = EDGE_HATCH } = options;
  if (width <= 0 || height <= 0 || nf <= 0 || nt <= 0) return;
  const lut = colormap.words;
  const top = colormap.size - 1;
  const missingBytes = new Uint8ClampedArray([missing[0], missing[1], missing[2], 255]);
  const missingWord = new Uint32Array(missingBytes.buffer)[0];

  // Cell colours first (nf·nt reads), so the per-pixel loop below is a copy.
  const cells = new Uint32Array(nf * nt);
  const linear = scale.kind === 'linear';
  const lo = scale.domain[0];
  const span = scale.domain[1] - scale.domain[0];
  for (let i = 0; i < cells.length; i++) {
    const v = values[i];
    let t: number;
    if (linear) {
      if (!Number.isFinite(v)) {
        cells[i] = missingWord;
        continue;
      }
      t = span > 0 ? (v - lo) / span : 0.5;
      t = t < 0 ? 0 : t > 1 ? 1 : t;
    } else {
      t = colourPosition(scale, v);
      if (t !== t) {
        cells[i] = missingWord;
        continue;
      }
    }
    const k = Math.round((reverse ? 1 - t : t) * top);
    cells[i] = lut[k];
  }

  const colCell = new Int32Array(width);
  for (let x = 0; x < width; x++) colCell[x] = Math.min(nt - 1, Math.floor((x * nt) / width));
  const out = new Uint32Array(data.buffer, data.byteOffset, width * height);
  for (let y = 0; y < height; y++) {
    const f = nf - 1 - Math.min(nf - 1, Math.floor((y * nf) / height));
    const rowOff = f * nt;
    const pixOff = y * width;
    for (let x = 0; x < width; x++) out[pixOff + x] = cells[rowOff + colCell[x]];
    if (edges === null) continue;
    const l = edges.left[f];
    const r = nt - edges.right[f];
    if (l <= 0 && r >= nt) continue;
    const a = hatch.alpha;
    const [hr, hg, hb] = hatch.rgb;
    // colCell rises with x, so the edge zones are the columns before xl and from xr on: visit only those.
    let xl = 0;
    while (xl < width && colCell[xl] < l) xl++;
    let xr = width;
    while (xr > xl && colCell[xr - 1] >= r) xr--;
    for (let zone = 0; zone < 2; zone++) {
      const x1 = zone === 0 ? xl : width;
      for (let x = zone === 0 ? 0 : xr; x < x1; x++) {
        if ((x + y) % hatch.spacing >= hatch.width) continue;
        const p = 4 * (pixOff + x);
        data[p] = data[p] + (hr - data[p]) * a;
        data[p + 1] = data[p + 1] + (hg - data[p + 1]) * a;
        data[p + 2] = data[p + 2] + (hb - data[p + 2]) * a;
      }
    }
  }
}
