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
 * Fills `image` pixel by pixel with the colour of the nearest cell of `grid` through the colormap (index
 * round(t·(size − 1))): pixel column x shows time ⌊x·nTimes/width⌋, pixel row y frequency
 * nFreqs − 1 − ⌊y·nFreqs/height⌋ (equal rows: the grid's own spacing, log or linear, sets the axis). Only the cells
 * a pixel shows are coloured (a 1536-point epoch on 580 pixels colours 580 per row), each pixel row of a frequency
 * is a copy of the first. Cells in an edge zone get diagonal hatch lines ((x + y) mod spacing < width) blended over
 * their colour.
 */
export function rasterizeMap(image: ImageBuffer, grid: MapGrid, options: RasterOptions): void {
  const { width, height, data } = image;
  const { values, nFreqs: nf, nTimes: nt } = grid;
  const { colormap, scale, reverse = false, missing = SHELL, edges = null, hatch = EDGE_HATCH } = options;
  if (width <= 0 || height <= 0 || nf <= 0 || nt <= 0) return;
  // Signed words: a lookup stays an integer in the loop (an unsigned word above 2³¹ would become a double).
  const lut = new Int32Array(colormap.words.buffer, colormap.words.byteOffset, colormap.words.length);
  const top = colormap.size - 1;
  const missingBytes = new Uint8ClampedArray([missing[0], missing[1], missing[2], 255]);
  const missingWord = new Int32Array(missingBytes.buffer)[0];
  const linear = scale.kind === 'linear';
  const lo = scale.domain[0];
  const span = scale.domain[1] - scale.domain[0];

  const colCell = new Int32Array(width);
  for (let x = 0; x < width; x++) colCell[x] = Math.min(nt - 1, Math.floor((x * nt) / width));
  const out = new Int32Array(data.buffer, data.byteOffset, width * height);
  let rowF = -1;
  let rowStart = 0;
  for (let y = 0; y < height; y++) {
    const f = nf - 1 - Math.min(nf - 1, Math.floor((y * nf) / height));
    const pixOff = y * width;
    if (f === rowF) out.copyWithin(pixOff, rowStart, rowStart + width);
    else {
      // The first pixel row of frequency f: colour the cells its columns show.
      rowF = f;
      rowStart = pixOff;
      const rowOff = f * nt;
      for (let x = 0; x < width; x++) {
        const v = values[rowOff + colCell[x]];
        let t: number;
        if (linear) {
          if (v - v !== 0) {
            // NaN or ±Infinity
            out[pixOff + x] = missingWord;
            continue;
          }
          t = span > 0 ? (v - lo) / span : 0.5;
          t = t < 0 ? 0 : t > 1 ? 1 : t;
        } else {
          t = colourPosition(scale, v);
          if (t !== t) {
            out[pixOff + x] = missingWord;
            continue;
          }
        }
        out[pixOff + x] = lut[Math.round((reverse ? 1 - t : t) * top)];
      }
    }
  }
  if (edges === null) return;
  const a = hatch.alpha;
  const [hr, hg, hb] = hatch.rgb;
  const { spacing, width: lineWidth } = hatch;
  // Per frequency, the hatched colour of each edge column is blended once from its plain colour (every pixel row of
  // a frequency shows the same plain colours) and then written where the diagonal lines fall: the same bytes as
  // blending pixel by pixel, at one store per hatched pixel.
  const hatched = new Int32Array(width);
  const blend = new Uint8ClampedArray(4);
  const blendWord = new Int32Array(blend.buffer);
  let hatchF = -1;
  let xl = 0;
  let xr = width;
  let skip = true;
  for (let y = 0; y < height; y++) {
    const f = nf - 1 - Math.min(nf - 1, Math.floor((y * nf) / height));
    const pixOff = y * width;
    if (f !== hatchF) {
      hatchF = f;
      const l = edges.left[f];
      const r = nt - edges.right[f];
      skip = l <= 0 && r >= nt;
      if (skip) continue;
      // colCell rises with x, so the edge zones are the columns before xl and from xr on: visit only those.
      xl = 0;
      while (xl < width && colCell[xl] < l) xl++;
      xr = width;
      while (xr > xl && colCell[xr - 1] >= r) xr--;
      for (let zone = 0; zone < 2; zone++) {
        const x1 = zone === 0 ? xl : width;
        for (let x = zone === 0 ? 0 : xr; x < x1; x++) {
          blendWord[0] = out[pixOff + x];
          blend[0] = blend[0] + (hr - blend[0]) * a;
          blend[1] = blend[1] + (hg - blend[1]) * a;
          blend[2] = blend[2] + (hb - blend[2]) * a;
          hatched[x] = blendWord[0];
        }
      }
    }
    if (skip) continue;
    for (let zone = 0; zone < 2; zone++) {
      const x0 = zone === 0 ? 0 : xr;
      const x1 = zone === 0 ? xl : width;
      for (let x = x0, m = (x0 + y) % spacing; x < x1; x++, m = m + 1 === spacing ? 0 : m + 1) {
        if (m < lineWidth) out[pixOff + x] = hatched[x];
      }
    }
  }
}
