import { frequencyGrid } from '../../analysis/frequency-grid';
import { cyclesOf, edgeSecondsOf, gaussianSigmas, resolutionOf, type CyclesSpec } from '../../analysis/wavelet';

export interface ResolutionRow {
  /** Frequency, Hz. */
  f: number;
  /** Cycles of the wavelet. */
  n: number;
  /** Temporal FWHM, s. */
  t: number;
  /** Spectral FWHM, Hz. */
  s: number;
  /** Edge zone (3σ), s. */
  e: number;
}

/**
 * Each frequency's time and frequency resolution for a recipe's frequencies and widths: temporal FWHM (s), spectral
 * FWHM (Hz) and edge zone (3σ, s), from the same core functions a run uses (Cohen, 2019, NeuroImage 199:81–86).
 * Empty while the draft's grid or widths are not valid yet.
 */
export function resolutionRows(frequencies: { min: number; max: number; count: number; spacing: 'log' | 'linear' }, cycles: CyclesSpec): ResolutionRow[] {
  try {
    if (!(frequencies.min > 0 && frequencies.max >= frequencies.min && frequencies.count >= 1 && frequencies.count <= 1000)) return [];
    const f = frequencyGrid(frequencies);
    const sigmas = gaussianSigmas(f, cycles);
    if (!sigmas.every((x) => x > 0 && Number.isFinite(x))) return [];
    const n = cyclesOf(f, sigmas);
    const r = resolutionOf(sigmas);
    const e = edgeSecondsOf(sigmas);
    return Array.from(f, (fi, i) => ({ f: fi, n: n[i], t: r.temporalFwhmSeconds[i], s: r.spectralFwhmHz[i], e: e[i] }));
  } catch {
    return [];
  }
}
