import type { ChannelUnit } from '../analysis/channel-types';
import { FormatError } from './format-error';

/** Physical dimensions we convert without asking; factor to microvolts. "µ" arrives as Latin-1 0xB5 or UTF-8. */
const MICROVOLT_FACTORS: Record<string, number> = {
  uV: 1,
  'µV': 1, // U+00B5 micro sign (Latin-1 byte 0xB5)
  'μV': 1, // U+03BC Greek mu
  '\u00c2\u00b5V': 1, // UTF-8 bytes of U+00B5 read as Latin-1
  '\u00ce\u00bcV': 1, // UTF-8 bytes of U+03BC read as Latin-1
  mV: 1e3,
  V: 1e6,
  nV: 1e-3,
};

/**
 * Factor that converts a signal's physical dimension to µV: `uV`/`µV` ×1, `mV` ×1e3, `V` ×1e6, `nV` ×1e-3
 * (SI prefixes; EDF+ spec, Kemp & Olivan, 2003, Clin Neurophysiol 114:1755–1761, §2.1.3 "physical dimension").
 * A caller-supplied `mapping` (dimension → factor) is consulted first, so a user can map "arb" or "" explicitly.
 * Throws a FormatError naming the signal for any other dimension.
 */
export function microvoltFactor(
  dimension: string,
  signal: string,
  byteOffset: number | null,
  mapping: Readonly<Record<string, number>> = {},
): number {
  const key = dimension.trim();
  const mapped = mapping[key];
  if (mapped !== undefined) {
    if (!Number.isFinite(mapped) || mapped === 0) {
      throw new FormatError('unit mapping', `maps "${key}" to ${mapped}, which is not a finite non-zero factor`, { signal });
    }
    return mapped;
  }
  const known = MICROVOLT_FACTORS[key];
  if (known !== undefined) return known;
  throw new FormatError('physical dimension', `unit "${key}" cannot be converted to µV (known: uV, µV, mV, V, nV); map it explicitly`, {
    signal,
    byteOffset,
  });
}

// MEG keeps its own units (an extension of the contract's µV wording, DEVELOPERS.md "Channel types"): magnetic
// field in femtotesla, field gradient in femtotesla per centimetre (SI prefixes: 1 T = 1e15 fT; 1 T/m = 1e13 fT/cm).
const FIELD_FACTORS: Record<string, number> = { T: 1e15, mT: 1e12, uT: 1e9, 'µT': 1e9, nT: 1e6, pT: 1e3, fT: 1 };
const GRADIENT_FACTORS: Record<string, number> = { 'T/m': 1e13, 'T/cm': 1e15, 'pT/m': 10, 'pT/cm': 1e3, 'fT/m': 0.01, 'fT/cm': 1, 'fT/mm': 10 };

/**
 * The unit a signal is kept in and the factor from its physical dimension: electrode units to µV
 * (`microvoltFactor`), magnetic field to fT, field gradient to fT/cm. A `mapping` entry reads the signal as µV × factor.
 */
export function signalUnit(
  dimension: string,
  signal: string,
  byteOffset: number | null,
  mapping: Readonly<Record<string, number>> = {},
): { unit: ChannelUnit; factor: number } {
  const key = dimension.trim();
  if (mapping[key] === undefined) {
    if (FIELD_FACTORS[key] !== undefined) return { unit: 'fT', factor: FIELD_FACTORS[key] };
    if (GRADIENT_FACTORS[key] !== undefined) return { unit: 'fT/cm', factor: GRADIENT_FACTORS[key] };
  }
  return { unit: 'µV', factor: microvoltFactor(dimension, signal, byteOffset, mapping) };
}
