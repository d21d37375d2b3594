/**
 * Time-stamped Annotations Lists (TALs) of the EDF+ "EDF Annotations" signal (Kemp & Olivan, 2003, Clin
 * Neurophysiol 114:1755–1761, §2.2.2–2.2.4). One TAL is
 *   `+onset[\x15duration]\x14annotation\x14annotation…\x14\x00`
 * and the first TAL of every data record starts with an empty annotation whose onset is the record's start time
 * in seconds after the header's start date/time (the timekeeping annotation). Unused bytes are 0.
 */
import { FormatError } from './format-error';

export interface EdfAnnotation {
  /** Seconds after the header's start date/time (file time, not the sample axis). */
  onsetSeconds: number;
  /** Null when the TAL gives no duration. */
  durationSeconds: number | null;
  label: string;
  /** Data record whose annotation signal held the TAL. */
  recordIndex: number;
}

export interface TalBlock {
  /** Onset of the record's timekeeping annotation, or null if the block has none. */
  recordStartSeconds: number | null;
  annotations: EdfAnnotation[];
}

const ONSET = /^[+-]\d+(\.\d*)?$/;
const DURATION = /^\d+(\.\d*)?$/;
const utf8 = new TextDecoder('utf-8');

/**
 * Parses one data record's bytes of an "EDF Annotations" signal. `fileOffset` is the absolute offset of
 * `bytes[0]`, used in error messages. Texts are UTF-8 (EDF+ §2.2.4); invalid sequences become U+FFFD.
 */
export function parseTalBlock(bytes: Uint8Array, fileOffset: number, recordIndex: number, signal = 'EDF Annotations'): TalBlock {
  const annotations: EdfAnnotation[] = [];
  let recordStartSeconds: number | null = null;
  let first = true;
  let p = 0;
  const n = bytes.length;
  while (p < n) {
    if (bytes[p] === 0) {
      p++;
      continue;
    }
    const talStart = p;
    let end = p;
    while (end < n && bytes[end] !== 0) end++;
    if (end === n) {
      throw new FormatError('annotation', `TAL in data record ${recordIndex + 1} is not terminated by a 0 byte inside the record`, {
        byteOffset: fileOffset + talStart,
        signal,
      });
    }
    // The TAL occupies [talStart, end); its last byte must be \x14.
    if (bytes[end - 1] !== 0x14) {
      throw new FormatError('annotation', `TAL in data record ${recordIndex + 1} does not end with byte 20 (\\x14) before its 0 byte`, {
        byteOffset: fileOffset + end - 1,
        signal,
      });
    }
    let q = talStart;
    while (q < end && bytes[q] !== 0x14 && bytes[q] !== 0x15) q++;
    const onsetText = ascii(bytes, talStart, q);
    if (!ONSET.test(onsetText)) {
      throw new FormatError('annotation onset', `${JSON.stringify(onsetText)} in data record ${recordIndex + 1} is not a signed number like "+12.5"`, {
        byteOffset: fileOffset + talStart,
        signal,
      });
    }
    const onsetSeconds = Number(onsetText);
    let durationSeconds: number | null = null;
    if (bytes[q] === 0x15) {
      const d0 = q + 1;
      q = d0;
      while (q < end && bytes[q] !== 0x14 && bytes[q] !== 0x15) q++;
      const durationText = ascii(bytes, d0, q);
      if (bytes[q] !== 0x14 || !DURATION.test(durationText)) {
        throw new FormatError('annotation duration', `${JSON.stringify(durationText)} in data record ${recordIndex + 1} is not an unsigned number`, {
          byteOffset: fileOffset + d0,
          signal,
        });
      }
      durationSeconds = Number(durationText);
    }
    // q is at the \x14 that opens the annotation texts; texts run to the final \x14 at end - 1.
    const texts: string[] = [];
    let t0 = q + 1;
    for (let k = q + 1; k < end; k++) {
      if (bytes[k] === 0x14) {
        texts.push(utf8.decode(bytes.subarray(t0, k)));
        t0 = k + 1;
      } else if (bytes[k] === 0x15) {
        throw new FormatError('annotation', `byte 21 (\\x15) inside an annotation text in data record ${recordIndex + 1}`, {
          byteOffset: fileOffset + k,
          signal,
        });
      }
    }
    let from = 0;
    if (first && texts.length > 0 && texts[0] === '') {
      recordStartSeconds = onsetSeconds;
      from = 1;
    }
    first = false;
    for (let k = from; k < texts.length; k++) {
      if (texts[k] === '') continue;
      annotations.push({ onsetSeconds, durationSeconds, label: texts[k], recordIndex });
    }
    p = end + 1;
  }
  return { recordStartSeconds, annotations };
}

function ascii(bytes: Uint8Array, from: number, to: number): string {
  let s = '';
  for (let i = from; i < to; i++) s += String.fromCharCode(bytes[i]);
  return s;
}
