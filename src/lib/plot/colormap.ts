import { interpolateBlues, interpolateCividis, interpolatePuOr } from 'd3-scale-chromatic';

/**
 * A colormap sampled once into a lookup table of packed RGBA words, so a map of 40 × 1536 cells is coloured with
 * one array read per cell. Entry i holds the interpolator's colour at t = i / (size − 1).
 */
export interface Colormap {
  name: string;
  size: number;
  /** RGBA bytes, 4 per entry. */
  bytes: Uint8ClampedArray;
  /** The same memory as one 32-bit word per entry (byte order of the platform, as ImageData expects). */
  words: Uint32Array;
}

/** Parses the two colour forms d3-scale-chromatic returns: `rgb(r, g, b)` and `#rrggbb`. */
export function parseColour(css: string): [number, number, number] {
  const rgb = /^rgb\(\s*(\d+(?:\.\d+)?)\s*,\s*(\d+(?:\.\d+)?)\s*,\s*(\d+(?:\.\d+)?)\s*\)$/.exec(css);
  if (rgb) return [Math.round(Number(rgb[1])), Math.round(Number(rgb[2])), Math.round(Number(rgb[3]))];
  const hex = /^#([0-9a-f]{2})([0-9a-f]{2})([0-9a-f]{2})$/i.exec(css);
  if (hex) return [parseInt(hex[1], 16), parseInt(hex[2], 16), parseInt(hex[3], 16)];
  throw new Error(`colour "${css}" is neither rgb(r, g, b) nor #rrggbb`);
}

/** Samples `interpolate(t)` at t = i/(size − 1), i = 0 … size − 1, into a lookup table. */
export function sampleColormap(name: string, interpolate: (t: number) => string, size = 1024): Colormap {
  const buffer = new ArrayBuffer(4 * size);
  const bytes = new Uint8ClampedArray(buffer);
  for (let i = 0; i < size; i++) {
    const [r, g, b] = parseColour(interpolate(size === 1 ? 0.5 : i / (size - 1)));
    bytes[4 * i] = r;
    bytes[4 * i + 1] = g;
    bytes[4 * i + 2] = b;
    bytes[4 * i + 3] = 255;
  }
  return { name, size, bytes, words: new Uint32Array(buffer) };
}

let sequential: Colormap | null = null;
let diverging: Colormap | null = null;
let consistency: Colormap | null = null;

/** Raw power: cividis, perceptually uniform and readable with red-green colour blindness (Nuñez et al., 2018, PLoS ONE 13:e0199239). */
export function sequentialColormap(): Colormap {
  return (sequential ??= sampleColormap('cividis', interpolateCividis));
}

/** Normalized power: purple (below the neutral value) through near-white to orange (above), a colour-blind-safe diverging scheme (ColorBrewer PuOr). */
export function divergingColormap(): Colormap {
  return (diverging ??= sampleColormap('PuOr', interpolatePuOr));
}

/** Phase consistency (0 … 1): a single-hue sequential scale from near-white to deep blue (ColorBrewer Blues), unlike raw power's. */
export function consistencyColormap(): Colormap {
  return (consistency ??= sampleColormap('Blues', interpolateBlues));
}
