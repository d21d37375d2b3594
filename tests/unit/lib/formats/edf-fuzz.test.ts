import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import {
  EDF_FIXED_FIELDS,
  EDF_SIGNAL_FIELDS,
  FormatError,
  bytesSource,
  openEdf,
  writeEdf,
  type ByteSource,
  type EdfFile,
} from '../../../../src/lib/formats';

// Invariant-based fuzzing (fast-check): a damaged file must either parse into a self-consistent result or be
// refused with a FormatError that names a field and a byte offset inside the file. Anything else (RangeError,
// TypeError, a hang, a huge allocation) is a defect.

const valid = writeEdf({
  variant: 'EDF+C',
  start: { year: 2025, month: 6, day: 1, hour: 12, minute: 0, second: 0 },
  recordDurationSeconds: 0.5,
  patientIdentification: 'X X X DEMO-ONLY-NOT-A-PERSON',
  signals: [
    { label: 'EEG Fz', physicalDimension: 'uV', physicalMin: -200, physicalMax: 200, samplesPerRecord: 8, samples: Float32Array.from({ length: 24 }, (_, i) => i * 3 - 30) },
    { label: 'EEG Cz', physicalDimension: 'mV', physicalMin: -1, physicalMax: 1, samplesPerRecord: 8, samples: Float32Array.from({ length: 24 }, (_, i) => Math.sin(i) / 4) },
    { label: 'Resp', physicalDimension: 'arb', physicalMin: 0, physicalMax: 1, samplesPerRecord: 2, samples: new Float32Array(6) },
  ],
  annotations: [
    { onsetSeconds: 0.25, durationSeconds: 0.5, texts: ['lamp-watch', 'extra'] },
    { onsetSeconds: 1.0, texts: ['oar-pull'] },
  ],
});

/** Field spans of the valid file's header, for targeted edits. */
const NS = 4;
const fieldSpans: { name: string; offset: number; width: number }[] = [...EDF_FIXED_FIELDS.map((f) => ({ ...f }))];
{
  let offset = 256;
  for (const f of EDF_SIGNAL_FIELDS) {
    for (let i = 0; i < NS; i++) fieldSpans.push({ name: f.name, offset: offset + i * f.width, width: f.width });
    offset += f.width * NS;
  }
}

function checkConsistent(edf: EdfFile): void {
  expect(Number.isInteger(edf.recordCount) && edf.recordCount >= 0).toBe(true);
  for (const c of edf.channels) {
    expect(c.samples.length).toBe(edf.recordCount * edf.header.signals[c.signalIndex].samplesPerRecord);
    for (let i = 0; i < c.samples.length; i++) expect(Number.isFinite(c.samples[i])).toBe(true);
  }
  for (const a of edf.annotations) expect(Number.isFinite(a.onsetSeconds)).toBe(true);
  for (const e of edf.events) expect(Number.isFinite(e.onsetSeconds)).toBe(true);
}

async function parseOrFormatError(bytes: Uint8Array): Promise<'parsed' | 'refused'> {
  try {
    checkConsistent(await openEdf(bytesSource(bytes), { chunkBytes: 64 }));
    return 'parsed';
  } catch (error) {
    if (!(error instanceof FormatError)) throw error;
    expect(error.field.length).toBeGreaterThan(0);
    expect(error.byteOffset).not.toBeNull();
    expect(error.byteOffset!).toBeGreaterThanOrEqual(0);
    expect(error.byteOffset!).toBeLessThanOrEqual(bytes.length);
    expect(error.message).toContain(`at byte ${error.byteOffset}`);
    return 'refused';
  }
}

describe('openEdf under damaged input', () => {
  it('parses the undamaged file (control)', async () => {
    expect(await parseOrFormatError(valid)).toBe('parsed');
  });

  it('refuses a physical limit so large that samples would overflow to Infinity (found by fuzzing)', async () => {
    // Field 22 is the first signal's physical minimum; fast-check found "4e50", "1E70" and "9E90" there.
    const span = fieldSpans[22];
    expect(span.name).toBe('physical minimum');
    const damaged = valid.slice();
    damaged.set(new TextEncoder().encode('4e50'.padEnd(span.width, ' ')), span.offset);
    await expect(openEdf(bytesSource(damaged))).rejects.toThrow(/physical minimum of signal "EEG Fz" at byte \d+: 4e\+50 is too large/);
    expect(await parseOrFormatError(damaged)).toBe('refused');
  });

  it('refuses every truncation with a FormatError', async () => {
    await fc.assert(
      fc.asyncProperty(fc.integer({ min: 0, max: valid.length - 1 }), async (length) => {
        expect(await parseOrFormatError(valid.slice(0, length))).toBe('refused');
      }),
      { numRuns: 300 },
    );
  });

  it('parses or refuses files with random bit flips', async () => {
    const outcomes = new Set<string>();
    await fc.assert(
      fc.asyncProperty(fc.array(fc.tuple(fc.nat(valid.length - 1), fc.nat(7)), { minLength: 1, maxLength: 6 }), async (flips) => {
        const bytes = valid.slice();
        for (const [at, bit] of flips) bytes[at] ^= 1 << bit;
        outcomes.add(await parseOrFormatError(bytes));
      }),
      { numRuns: 1000 },
    );
    expect(outcomes).toEqual(new Set(['parsed', 'refused']));
  });

  it('parses or refuses files whose header fields are overwritten with random text', async () => {
    const text = fc.string({ unit: fc.constantFrom(...'0123456789 -+.eE'.split(''), 'x', '\u00b5', '\u0000'), maxLength: 12 });
    await fc.assert(
      fc.asyncProperty(fc.nat(fieldSpans.length - 1), text, async (which, value) => {
        const span = fieldSpans[which];
        const bytes = valid.slice();
        const filled = value.padEnd(span.width, ' ').slice(0, span.width);
        for (let i = 0; i < span.width; i++) bytes[span.offset + i] = filled.charCodeAt(i) & 0xff;
        await parseOrFormatError(bytes);
      }),
      { numRuns: 1000 },
    );
  });
});

/** A source that records what was asked of it, to prove nothing past the header was requested. */
function spySource(bytes: Uint8Array): ByteSource & { largestRead: number } {
  const inner = bytesSource(bytes);
  const spy = {
    size: bytes.length,
    largestRead: 0,
    read: (offset: number, length: number) => {
      spy.largestRead = Math.max(spy.largestRead, length);
      return inner.read(offset, length);
    },
  };
  return spy;
}

function edit(bytes: Uint8Array, offset: number, width: number, value: string): Uint8Array {
  const out = bytes.slice();
  const v = value.padEnd(width, ' ');
  for (let i = 0; i < width; i++) out[offset + i] = v.charCodeAt(i);
  return out;
}

describe('huge declared sizes', () => {
  const headerBytes = 256 * (NS + 1);

  it('refuses a record count of 99999999 before reading any data record', async () => {
    const source = spySource(edit(valid, 236, 8, '99999999'));
    await expect(openEdf(source)).rejects.toMatchObject({ field: 'data record count', byteOffset: 236 });
    expect(source.largestRead).toBeLessThanOrEqual(headerBytes);
  });

  it('refuses 99999999 samples per record before reading any data record', async () => {
    const sprOffset = 256 + NS * 216; // samples-per-record fields follow 216 bytes of per-signal fields
    const source = spySource(edit(valid, sprOffset, 8, '99999999'));
    const error = (await openEdf(source).catch((e: unknown) => e)) as FormatError;
    expect(error).toBeInstanceOf(FormatError);
    expect(error.message).toMatch(/declares \d+ records of \d+ bytes/);
    expect(source.largestRead).toBeLessThanOrEqual(headerBytes);
  });

  it('refuses 9999 signals (a 2.5 MB header) without reading past the fixed header', async () => {
    const bytes = edit(edit(valid, 252, 4, '9999'), 184, 8, String(256 * 10000));
    const source = spySource(bytes);
    await expect(openEdf(source)).rejects.toMatchObject({ field: 'header bytes', byteOffset: 184 });
    expect(source.largestRead).toBeLessThanOrEqual(256);
  });
});

describe('targeted edits', () => {
  it('a data signal relabelled "EDF Annotations" is parsed as TALs or refused, never crashes', async () => {
    const relabelled = edit(valid, 256, 16, 'EDF Annotations');
    expect(['parsed', 'refused']).toContain(await parseOrFormatError(relabelled));
  });

  it('EDF+D without a timekeeping TAL in a record names the record', async () => {
    const bytes = edit(valid, 192, 44, 'EDF+D');
    // Blank the first record's annotation bytes: the record then has no timekeeping annotation.
    const annotationAt = 256 * (NS + 1) + 2 * (8 + 8 + 2);
    const annotationBytes = (valid.length - 256 * (NS + 1)) / 3 - 2 * 18;
    bytes.fill(0, annotationAt, annotationAt + annotationBytes);
    await expect(openEdf(bytesSource(bytes))).rejects.toThrow(/data record 1 has no timekeeping annotation/);
  });

  it('stops between chunks when aborted', async () => {
    const controller = new AbortController();
    controller.abort(new Error('user closed the file'));
    await expect(openEdf(bytesSource(valid), { abortSignal: controller.signal })).rejects.toThrow('user closed the file');
  });
});
