/**
 * Incremental EDF/EDF+ reader (Kemp et al., 1992, Electroencephalogr Clin Neurophysiol 82:391–393; Kemp &
 * Olivan, 2003, Clin Neurophysiol 114:1755–1761). The header is read and every declared size is checked against
 * the real file size before anything is allocated; data records are then streamed in fixed-size chunks (a record
 * that straddles two chunks is carried over in one record-sized buffer) and written straight into one preallocated
 * Float32Array (µV) per analysed channel, so memory is the output plus one chunk whatever the record size.
 */
import { sampleArray } from './sample-arrays';
import type { Recording, RecordingEvent } from '../analysis/recording';
import { readExactly, type ByteSource } from './byte-source';
import { parseTalBlock, type EdfAnnotation } from './edf-annotations';
import {
  EDF_FIXED_FIELDS,
  EDF_FIXED_HEADER_BYTES,
  assembleEdfHeader,
  parseEdfFixedHeader,
  parseEdfSignalHeaders,
  type EdfHeader,
  type EdfIdentifying,
  type EdfSignalHeader,
} from './edf-header';
import { Sha256 } from './fingerprint';
import { FormatError } from './format-error';
import { inferChannelType, type ChannelUnit } from '../analysis/channel-types';
import { signalUnit } from './units';

/** 2^30 samples (4 GiB of Float32) per channel: beyond that a typed array cannot be relied on in every browser. */
const MAX_SAMPLES_PER_CHANNEL = 2 ** 30;

export interface OpenEdfOptions {
  /** Extra physical dimension → µV factors, consulted before the built-in ones (e.g. `{ "": 1 }`). */
  unitFactors?: Readonly<Record<string, number>>;
  /** Signal labels to leave out of the analysis (listed as ignored, never decoded). */
  exclude?: readonly string[];
  /** Bytes per read (any size ≥ 1; records may straddle reads). Default 8 MiB. */
  chunkBytes?: number;
  onProgress?: (fraction: number) => void;
  /** Checked between chunks; reading stops with the signal's reason. */
  abortSignal?: AbortSignal;
  /** Also compute the SHA-256 of the file's bytes during the same pass. */
  fingerprint?: boolean;
}

export interface EdfChannel {
  signalIndex: number;
  label: string;
  sampleRateHz: number;
  physicalDimension: string;
  /** Factor applied after the EDF scaling to reach `unit` (µV, or fT / fT/cm for MEG). */
  microvoltFactor: number;
  /** The unit the samples are kept in. */
  unit: ChannelUnit;
  /** µV, one value per sample, records concatenated (gaps removed, see `gaps`). */
  samples: Float32Array;
}

export interface EdfIgnoredSignal {
  signalIndex: number;
  label: string;
  sampleRateHz: number;
  reason: 'sample-rate' | 'excluded';
}

export interface EdfGap {
  /** Index of the data record that starts after the gap. */
  recordIndex: number;
  /** File time (seconds after the header start) where samples stop and start again. */
  startSeconds: number;
  endSeconds: number;
  /** Sample index (at the analysed rate) where the new continuous block begins. */
  sampleIndex: number;
}

export interface EdfOutsideEvent {
  annotation: EdfAnnotation;
  reason: 'before-start' | 'in-gap' | 'after-end';
}

export interface EdfFile {
  header: EdfHeader;
  identifying: EdfIdentifying;
  recordCount: number;
  /** The analysed rate: the most common rate among data signals; null when the file has none. */
  sampleRateHz: number | null;
  channels: EdfChannel[];
  ignored: EdfIgnoredSignal[];
  /** Start of each data record in seconds after the header start (timekeeping TALs for EDF+). */
  recordStartSeconds: Float64Array;
  gaps: EdfGap[];
  /** Every annotation in file time, in file order. */
  annotations: EdfAnnotation[];
  /** Annotations placed on the sample axis (seconds from the first sample), sorted by onset. */
  events: RecordingEvent[];
  eventsOutside: EdfOutsideEvent[];
  warnings: string[];
  /** SHA-256 hex of the file's bytes when `fingerprint: true` was asked for, else null. */
  fingerprint: string | null;
}

interface CheckedHeader {
  header: EdfHeader;
  identifying: EdfIdentifying;
  warnings: string[];
  recordCount: number;
  headerBytes: Uint8Array;
}

async function readCheckedHeader(source: ByteSource): Promise<CheckedHeader> {
  if (!Number.isSafeInteger(source.size) || source.size < 0) {
    throw new FormatError('file', `has an invalid size (${source.size})`, { byteOffset: 0 });
  }
  const first = await readExactly(source, 0, Math.min(EDF_FIXED_HEADER_BYTES, source.size), 'header');
  const fixed = parseEdfFixedHeader(first, source.size);
  // headerBytes was checked against source.size above, so this read is bounded by the file.
  const headerBytes = fixed.headerBytes === first.length ? first : await readExactly(source, 0, fixed.headerBytes, 'header');
  const header = assembleEdfHeader(fixed, parseEdfSignalHeaders(headerBytes, fixed));
  const { recordBytes } = header;
  const warnings = [...fixed.warnings];
  const dataBytes = source.size - fixed.headerBytes;
  const countAt = EDF_FIXED_FIELDS[7].offset;
  let recordCount = fixed.declaredRecordCount;
  if (recordCount === -1) {
    if (dataBytes % recordBytes !== 0) {
      throw new FormatError('data record count', `is -1 (unknown) and the ${dataBytes} bytes after the header are not a whole number of ${recordBytes}-byte records`, {
        byteOffset: countAt,
      });
    }
    recordCount = dataBytes / recordBytes;
    warnings.push(`data record count was -1 (unknown); ${recordCount} records inferred from the file size`);
  } else if (recordCount * recordBytes !== dataBytes) {
    const declared = recordCount * recordBytes;
    const what = declared > dataBytes ? 'the file is truncated or the count is wrong' : 'the file has extra bytes or the count is wrong';
    throw new FormatError('data record count', `declares ${recordCount} records of ${recordBytes} bytes (${declared} bytes after the header), but the file holds ${dataBytes}: ${what}`, {
      byteOffset: countAt,
    });
  }
  return { header, identifying: fixed.identifying, warnings, recordCount, headerBytes };
}

/** Reads and checks only the header (no data records): what a screen shows before the user commits. */
export async function readEdfHeader(source: ByteSource): Promise<Omit<CheckedHeader, 'headerBytes'>> {
  const { headerBytes: _, ...rest } = await readCheckedHeader(source);
  return rest;
}

/** Picks the analysed rate: the most common rate among data signals; a tie goes to the earliest signal's rate. */
function chooseRate(signals: EdfSignalHeader[], exclude: ReadonlySet<string>): number | null {
  const counts = new Map<number, number>();
  for (const s of signals) {
    if (s.isAnnotation || exclude.has(s.label)) continue;
    counts.set(s.sampleRateHz, (counts.get(s.sampleRateHz) ?? 0) + 1);
  }
  let best: number | null = null;
  let bestCount = 0;
  for (const [rate, count] of counts) {
    if (count > bestCount) {
      best = rate;
      bestCount = count;
    }
  }
  return best;
}

/**
 * Opens an EDF/EDF+ file. Per analysed signal, each digital value is scaled as the EDF specification defines,
 * `phys = (dig − digMin)·(physMax − physMin)/(digMax − digMin) + physMin` (Kemp et al., 1992), then multiplied by
 * the µV factor of its physical dimension. Bad input throws a FormatError naming the field and byte offset.
 */
export async function openEdf(source: ByteSource, options: OpenEdfOptions = {}): Promise<EdfFile> {
  const checked = await readCheckedHeader(source);
  const { header, identifying, recordCount } = checked;
  const warnings = checked.warnings;
  const exclude = new Set(options.exclude ?? []);
  const sampleRateHz = chooseRate(header.signals, exclude);

  for (const s of header.signals) {
    if (!s.isAnnotation && recordCount * s.samplesPerRecord > MAX_SAMPLES_PER_CHANNEL) {
      throw new FormatError('samples per data record', `${recordCount} records × ${s.samplesPerRecord} samples exceed the ${MAX_SAMPLES_PER_CHANNEL} samples one channel may hold in memory`, {
        signal: s.label,
        byteOffset: EDF_FIXED_FIELDS[7].offset,
      });
    }
  }
  const channels: EdfChannel[] = [];
  const ignored: EdfIgnoredSignal[] = [];
  const gains: number[] = [];
  const offsets: number[] = [];
  for (const s of header.signals) {
    if (s.isAnnotation) continue;
    if (exclude.has(s.label)) {
      ignored.push({ signalIndex: s.index, label: s.label, sampleRateHz: s.sampleRateHz, reason: 'excluded' });
      continue;
    }
    if (s.sampleRateHz !== sampleRateHz) {
      ignored.push({ signalIndex: s.index, label: s.label, sampleRateHz: s.sampleRateHz, reason: 'sample-rate' });
      continue;
    }
    const { unit, factor } = signalUnit(s.physicalDimension, s.label, s.dimensionByteOffset, options.unitFactors);
    const gain = (s.physicalMax - s.physicalMin) / (s.digitalMax - s.digitalMin);
    gains.push(gain * factor);
    offsets.push((s.physicalMin - s.digitalMin * gain) * factor);
    channels.push({
      signalIndex: s.index,
      label: s.label,
      sampleRateHz: s.sampleRateHz,
      physicalDimension: s.physicalDimension,
      microvoltFactor: factor,
      unit,
      samples: sampleArray(recordCount * s.samplesPerRecord),
    });
  }
  if (ignored.some((i) => i.reason === 'sample-rate')) {
    warnings.push(`signals at rates other than ${sampleRateHz} Hz are listed as ignored`);
  }

  const annotationSignals = header.signals.filter((s) => s.isAnnotation);
  const hasTimekeeping = annotationSignals.length > 0;
  const recordStarts = new Float64Array(recordCount);
  const found = new Uint8Array(recordCount);
  const annotations: EdfAnnotation[] = [];
  const hash = options.fingerprint ? new Sha256().update(checked.headerBytes) : null;

  const recordBytes = header.recordBytes;
  const dataStart = header.headerBytes;
  const dataEnd = dataStart + recordCount * recordBytes;
  const chunkBytes = Math.max(1, Math.floor(options.chunkBytes ?? 8 * 1024 * 1024));
  const channelSignals = channels.map((c) => header.signals[c.signalIndex]);

  // Decodes records r0 … r0+n−1, which start at `at` in `bytes`.
  const decode = (bytes: Uint8Array, at: number, n: number, r0: number) => {
    const view = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
    for (let c = 0; c < channels.length; c++) {
      const spr = channelSignals[c].samplesPerRecord;
      const within = channelSignals[c].recordByteOffset;
      const out = channels[c].samples;
      const g = gains[c];
      const b = offsets[c];
      for (let r = 0; r < n; r++) {
        const base = at + r * recordBytes + within;
        const o = (r0 + r) * spr;
        for (let j = 0; j < spr; j++) out[o + j] = view.getInt16(base + 2 * j, true) * g + b;
      }
    }
    for (let a = 0; a < annotationSignals.length; a++) {
      const s = annotationSignals[a];
      for (let r = 0; r < n; r++) {
        const base = at + r * recordBytes + s.recordByteOffset;
        const fileOffset = dataStart + (r0 + r) * recordBytes + s.recordByteOffset;
        const block = parseTalBlock(bytes.subarray(base, base + 2 * s.samplesPerRecord), fileOffset, r0 + r, s.label);
        if (a === 0 && block.recordStartSeconds !== null) {
          recordStarts[r0 + r] = block.recordStartSeconds;
          found[r0 + r] = 1;
        }
        for (const ann of block.annotations) annotations.push(ann);
      }
    }
  };

  const carry = new Uint8Array(recordBytes);
  let carried = 0;
  let record = 0;
  for (let offset = dataStart; offset < dataEnd; offset += chunkBytes) {
    options.abortSignal?.throwIfAborted();
    const chunk = await readExactly(source, offset, Math.min(chunkBytes, dataEnd - offset), 'data records');
    hash?.update(chunk);
    let p = 0;
    if (carried > 0) {
      // The rest of a record begun in the previous chunk.
      const take = Math.min(recordBytes - carried, chunk.length);
      carry.set(chunk.subarray(0, take), carried);
      carried += take;
      p = take;
      if (carried === recordBytes) {
        decode(carry, 0, 1, record);
        record++;
        carried = 0;
      }
    }
    const whole = Math.floor((chunk.length - p) / recordBytes);
    decode(chunk, p, whole, record);
    record += whole;
    p += whole * recordBytes;
    if (p < chunk.length) {
      carry.set(chunk.subarray(p), 0);
      carried = chunk.length - p;
    }
    options.onProgress?.((offset + chunk.length) / source.size);
  }
  if (recordCount === 0) options.onProgress?.(1);

  const duration = header.recordDurationSeconds;
  const timing = resolveRecordTimes(header, recordStarts, found, hasTimekeeping, sampleRateHz, warnings);
  const { events, eventsOutside } = placeEvents(annotations, recordStarts, duration, recordCount);
  return {
    header,
    identifying,
    recordCount,
    sampleRateHz,
    channels,
    ignored,
    recordStartSeconds: recordStarts,
    gaps: timing,
    annotations,
    events,
    eventsOutside,
    warnings,
    fingerprint: hash === null ? null : hash.hex(),
  };
}

/** Fills in missing record starts and finds the gaps; record starts must never go backwards. */
function resolveRecordTimes(
  header: EdfHeader,
  starts: Float64Array,
  found: Uint8Array,
  hasTimekeeping: boolean,
  sampleRateHz: number | null,
  warnings: string[],
): EdfGap[] {
  const duration = header.recordDurationSeconds;
  const n = starts.length;
  let missing = 0;
  for (let r = 0; r < n; r++) {
    if (hasTimekeeping && found[r] === 1) continue;
    if (header.variant === 'EDF+D') {
      throw new FormatError('annotation', `data record ${r + 1} has no timekeeping annotation, which EDF+D needs for its start time`, {
        byteOffset: header.headerBytes + r * header.recordBytes,
      });
    }
    starts[r] = r === 0 ? 0 : starts[r - 1] + duration;
    missing++;
  }
  if (hasTimekeeping && missing > 0) warnings.push(`${missing} data records had no timekeeping annotation; assumed contiguous`);
  const gaps: EdfGap[] = [];
  if (duration === 0) return gaps;
  // Half a sample: timekeeping onsets are decimal text, so allow rounding well below one sample.
  const tolerance = sampleRateHz !== null && sampleRateHz > 0 ? 0.5 / sampleRateHz : 1e-6;
  for (let r = 1; r < n; r++) {
    const expected = starts[r - 1] + duration;
    const delta = starts[r] - expected;
    if (delta < -tolerance) {
      throw new FormatError('annotation onset', `data record ${r + 1} starts at ${starts[r]} s, before data record ${r} ends (${expected} s)`, {
        byteOffset: header.headerBytes + r * header.recordBytes,
      });
    }
    if (delta > tolerance) {
      const spr = sampleRateHz === null ? 0 : Math.round(sampleRateHz * duration);
      gaps.push({ recordIndex: r, startSeconds: expected, endSeconds: starts[r], sampleIndex: r * spr });
    }
  }
  if (header.variant !== 'EDF+D' && gaps.length > 0) {
    warnings.push(`${header.variant} declares continuous data, but the timekeeping annotations show ${gaps.length} gaps; treated as gaps`);
  }
  return gaps;
}

/** Maps annotations from file time to the sample axis (records laid end to end); reports those with no sample. */
function placeEvents(
  annotations: EdfAnnotation[],
  starts: Float64Array,
  duration: number,
  recordCount: number,
): { events: RecordingEvent[]; eventsOutside: EdfOutsideEvent[] } {
  const events: RecordingEvent[] = [];
  const eventsOutside: EdfOutsideEvent[] = [];
  for (const a of annotations) {
    const t = a.onsetSeconds;
    if (duration === 0) {
      events.push({ onsetSeconds: t, durationSeconds: a.durationSeconds ?? 0, label: a.label });
      continue;
    }
    // Largest record whose start is <= t.
    let lo = 0;
    let hi = recordCount - 1;
    let r = -1;
    while (lo <= hi) {
      const mid = (lo + hi) >> 1;
      if (starts[mid] <= t) {
        r = mid;
        lo = mid + 1;
      } else hi = mid - 1;
    }
    if (r < 0) {
      eventsOutside.push({ annotation: a, reason: 'before-start' });
      continue;
    }
    if (t >= starts[r] + duration) {
      eventsOutside.push({ annotation: a, reason: r === recordCount - 1 ? 'after-end' : 'in-gap' });
      continue;
    }
    const shift = r * duration - starts[r];
    const onsetSeconds = Math.abs(shift) < 1e-12 ? t : t + shift;
    events.push({ onsetSeconds, durationSeconds: a.durationSeconds ?? 0, label: a.label });
  }
  events.sort((x, y) => x.onsetSeconds - y.onsetSeconds);
  return { events, eventsOutside };
}

const TYPE_PREFIX = /^(EEG|MEG|ECOG|SEEG|IEEG|EOG|ECG|EMG)\s+/i;

/**
 * Channel names for the analysis: the EDF+ label without its signal-type word ("EEG Fz" → "Fz", EDF+ §2.1.3.1),
 * unless that would make two names equal, in which case the full labels are kept.
 */
export function channelNamesFromLabels(labels: readonly string[]): string[] {
  const stripped = labels.map((l) => l.replace(TYPE_PREFIX, ''));
  return new Set(stripped).size === stripped.length ? stripped : [...labels];
}

/** The analysis core's Recording: µV (or MEG fT, fT/cm) channels at the analysed rate, types, events, gaps. */
export function toRecording(edf: EdfFile): Recording {
  if (edf.channels.length === 0 || edf.sampleRateHz === null) {
    throw new FormatError('signals', 'the file holds no data signals to analyse (only annotations or excluded signals)', {
      byteOffset: EDF_FIXED_FIELDS[9].offset,
    });
  }
  const recording: Recording = {
    sampleRateHz: edf.sampleRateHz,
    channelNames: channelNamesFromLabels(edf.channels.map((c) => c.label)),
    data: edf.channels.map((c) => c.samples),
    events: edf.events.map((e) => ({ ...e })),
    // The type word is dropped from the names, so types are inferred here from the full label and the unit.
    channelTypes: edf.channels.map((c) => inferChannelType(c.label, c.unit)),
  };
  if (edf.channels.some((c) => c.unit !== 'µV')) recording.channelUnits = edf.channels.map((c) => c.unit);
  if (edf.gaps.length > 0) recording.gapSampleIndices = edf.gaps.map((g) => g.sampleIndex);
  return recording;
}
