import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { blobSource, bytesSource, FormatError, formatEdfNumber, openEdf, toRecording, writeEdf, type EdfWriteInput } from '../../../../src/lib/formats';

const start = { year: 2024, month: 3, day: 14, hour: 9, minute: 30, second: 0 };

/** One digital step in physical units: (physMax − physMin)/(digMax − digMin) (Kemp et al., 1992 scaling). */
const step = (pmin: number, pmax: number, dmin = -32768, dmax = 32767) => (pmax - pmin) / (dmax - dmin);

describe('writeEdf → openEdf round trip', () => {
  it('reproduces random samples within one digital step and annotations exactly', async () => {
    await fc.assert(
      fc.asyncProperty(
        fc.record({
          records: fc.integer({ min: 1, max: 6 }),
          spr: fc.integer({ min: 1, max: 40 }),
          pmax: fc.double({ min: 1, max: 5000, noNaN: true }),
          dim: fc.constantFrom('uV', 'mV', 'nV', 'V'),
          seed: fc.array(fc.double({ min: -1, max: 1, noNaN: true }), { minLength: 1, maxLength: 50 }),
          annotations: fc.array(
            fc.record({
              onset: fc.integer({ min: 0, max: 5999 }).map((ms) => ms / 1000),
              duration: fc.option(fc.integer({ min: 0, max: 2000 }).map((ms) => ms / 1000), { nil: null }),
              texts: fc.array(fc.string({ unit: 'grapheme', minLength: 1, maxLength: 8 }).filter((t) => !/[\x00\x14\x15]/.test(t)), { minLength: 1, maxLength: 3 }),
            }),
            { maxLength: 8 },
          ),
        }),
        async ({ records, spr, pmax, dim, seed, annotations }) => {
          const n = records * spr;
          const physMax = Number(formatEdfNumber(pmax));
          const samples = Float64Array.from({ length: n }, (_, i) => seed[i % seed.length] * physMax);
          const inside = annotations.filter((a) => a.onset < records);
          const input: EdfWriteInput = {
            start,
            recordDurationSeconds: 1,
            signals: [{ label: 'EEG Fz', physicalDimension: dim, physicalMin: -physMax, physicalMax: physMax, samplesPerRecord: spr, samples }],
            annotations: inside.map((a) => ({ onsetSeconds: a.onset, durationSeconds: a.duration, texts: a.texts })),
          };
          const edf = await openEdf(bytesSource(writeEdf(input)));
          const factor = { uV: 1, mV: 1e3, nV: 1e-3, V: 1e6 }[dim];
          const tol = step(-physMax, physMax) * factor * 1.0001 + Math.abs(physMax * factor) * 1e-6; // + float32 rounding
          const got = edf.channels[0].samples;
          expect(got.length).toBe(n);
          for (let i = 0; i < n; i++) {
            expect(Math.abs(got[i] - samples[i] * factor)).toBeLessThanOrEqual(tol);
          }
          // Our writer stores each TAL in the record holding its onset, so file order is record order (stable).
          const byRecord = [...inside].sort((a, b) => Math.floor(a.onset) - Math.floor(b.onset));
          const expected = byRecord.flatMap((a) => a.texts.map((t) => ({ onsetSeconds: a.onset, durationSeconds: a.duration, label: t })));
          const actual = edf.annotations.map(({ onsetSeconds, durationSeconds, label }) => ({ onsetSeconds, durationSeconds, label }));
          expect(actual).toEqual(expected);
        },
      ),
      { numRuns: 60 },
    );
  });

  it('keeps per-signal rates apart and analyses the most common one', async () => {
    const bytes = writeEdf({
      start,
      recordDurationSeconds: 0.5,
      signals: [
        { label: 'EEG C3', physicalDimension: 'uV', physicalMin: -500, physicalMax: 500, samplesPerRecord: 128, samples: new Float32Array(256) },
        { label: 'EEG C4', physicalDimension: 'uV', physicalMin: -500, physicalMax: 500, samplesPerRecord: 128, samples: new Float32Array(256) },
        { label: 'ECG', physicalDimension: 'mV', physicalMin: -5, physicalMax: 5, samplesPerRecord: 64, samples: new Float32Array(128) },
      ],
    });
    const edf = await openEdf(bytesSource(bytes));
    expect(edf.sampleRateHz).toBe(256);
    expect(edf.channels.map((c) => c.label)).toEqual(['EEG C3', 'EEG C4']);
    expect(edf.ignored).toEqual([{ signalIndex: 2, label: 'ECG', sampleRateHz: 128, reason: 'sample-rate' }]);
    const excluded = await openEdf(bytesSource(bytes), { exclude: ['EEG C4'] });
    expect(excluded.ignored.map((i) => [i.label, i.reason])).toEqual([['EEG C4', 'excluded'], ['ECG', 'sample-rate']]);
  });

  it('writes EDF+D record starts that the reader turns into gaps', async () => {
    const bytes = writeEdf({
      variant: 'EDF+D',
      start,
      recordDurationSeconds: 1,
      recordStartSeconds: [0, 1, 5, 6],
      signals: [{ label: 'EEG Pz', physicalDimension: 'uV', physicalMin: -100, physicalMax: 100, samplesPerRecord: 10, samples: new Float32Array(40) }],
      annotations: [{ onsetSeconds: 5.5, texts: ['oar-pull'] }],
    });
    const rec = toRecording(await openEdf(bytesSource(bytes)));
    expect(rec.gapSampleIndices).toEqual([20]);
    expect(rec.events).toEqual([{ onsetSeconds: 2.5, durationSeconds: 0, label: 'oar-pull' }]);
  });

  it('reads through a Blob in small chunks with monotone progress and the same SHA-256 as Web Crypto', async () => {
    const samples = Float32Array.from({ length: 3000 }, (_, i) => Math.sin(i / 7) * 50);
    const bytes = writeEdf({
      start,
      recordDurationSeconds: 1,
      signals: [{ label: 'EEG Cz', physicalDimension: 'uV', physicalMin: -100, physicalMax: 100, samplesPerRecord: 100, samples }],
    });
    const progress: number[] = [];
    const fromBlob = await openEdf(blobSource(new Blob([bytes])), { chunkBytes: 1000, onProgress: (f) => progress.push(f), fingerprint: true });
    const whole = await openEdf(bytesSource(bytes));
    expect(fromBlob.channels[0].samples).toEqual(whole.channels[0].samples);
    expect(progress.length).toBeGreaterThan(5);
    expect(progress.every((f, i) => i === 0 || f >= progress[i - 1])).toBe(true);
    expect(progress[progress.length - 1]).toBe(1);
    const digest = Buffer.from(await crypto.subtle.digest('SHA-256', bytes)).toString('hex');
    expect(fromBlob.fingerprint).toBe(digest);
  });

  it('streams a multi-chunk EDF+ through a Blob with records straddling every chunk boundary: same samples, events and SHA-256 as one read', async () => {
    // Three signals with different record widths (two at 64 Hz, one at 32 Hz) plus the annotation signal, 60 one-second
    // records; chunk sizes that are not whole records (a few bytes, just under and over a record, 2.5 records) put record
    // boundaries inside chunks and chunk boundaries inside records, inside samples and inside annotation TALs.
    const records = 60;
    const wave = (n: number, k: number) => Float64Array.from({ length: n }, (_, i) => 40 * Math.sin((i * k) / 5) + ((i * 7919) % 23) - 11);
    const annotations = Array.from({ length: 25 }, (_, i) => ({ onsetSeconds: 1 + i * 2.25, durationSeconds: i % 3 === 0 ? 0.5 : null, texts: [i % 2 === 0 ? 'lamp-watch' : 'oar-pull'] }));
    const bytes = writeEdf({
      start,
      recordDurationSeconds: 1,
      signals: [
        { label: 'EEG Fz', physicalDimension: 'uV', physicalMin: -200, physicalMax: 200, samplesPerRecord: 64, samples: wave(records * 64, 1) },
        { label: 'EEG Cz', physicalDimension: 'mV', physicalMin: -0.2, physicalMax: 0.2, samplesPerRecord: 64, samples: wave(records * 64, 3).map((v) => v / 1000) },
        { label: 'Resp', physicalDimension: 'uV', physicalMin: -100, physicalMax: 100, samplesPerRecord: 32, samples: wave(records * 32, 2) },
      ],
      annotations,
    });
    const whole = await openEdf(bytesSource(bytes), { chunkBytes: bytes.length, fingerprint: true });
    const recordBytes = whole.header.recordBytes;
    expect(whole.recordCount).toBe(records);
    expect(whole.events.length).toBe(25);
    const digest = Buffer.from(await crypto.subtle.digest('SHA-256', bytes)).toString('hex');
    expect(whole.fingerprint).toBe(digest);
    for (const chunkBytes of [13, 509, recordBytes - 1, recordBytes + 1, Math.floor(2.5 * recordBytes), 4093]) {
      expect(chunkBytes % recordBytes, `chunk ${chunkBytes} is not a whole number of records`).not.toBe(0);
      const progress: number[] = [];
      const streamed = await openEdf(blobSource(new Blob([bytes])), { chunkBytes, fingerprint: true, onProgress: (f) => progress.push(f) });
      expect(streamed.channels.map((c) => c.label)).toEqual(whole.channels.map((c) => c.label));
      for (let c = 0; c < whole.channels.length; c++) {
        // Byte-for-byte equality of the Float32 samples (toEqual would also pass for −0 against +0).
        expect(Buffer.from(streamed.channels[c].samples.buffer).equals(Buffer.from(whole.channels[c].samples.buffer)), `${whole.channels[c].label} with ${chunkBytes}-byte chunks`).toBe(true);
      }
      expect(streamed.annotations).toEqual(whole.annotations);
      expect(streamed.events).toEqual(whole.events);
      expect(Array.from(streamed.recordStartSeconds)).toEqual(Array.from(whole.recordStartSeconds));
      expect(streamed.fingerprint).toBe(digest);
      expect(progress.every((f, i) => i === 0 || f >= progress[i - 1])).toBe(true);
      expect(progress[progress.length - 1]).toBe(1);
    }
  });

  it('names the record a truncated stream ends in, wherever the chunk boundary falls', async () => {
    const samples = Float32Array.from({ length: 1000 }, (_, i) => Math.sin(i / 9) * 30);
    const bytes = writeEdf({
      start,
      recordDurationSeconds: 1,
      signals: [{ label: 'EEG Pz', physicalDimension: 'uV', physicalMin: -100, physicalMax: 100, samplesPerRecord: 100, samples }],
    });
    // A source that claims the full size but whose bytes stop in the middle of record 7 (of 10).
    const cut = bytes.length - 3 * 200 - 77;
    const source = { size: bytes.length, read: async (offset: number, length: number) => bytes.subarray(offset, Math.min(cut, offset + length)) };
    for (const chunkBytes of [333, 200, 4096]) {
      await expect(openEdf(source, { chunkBytes })).rejects.toMatchObject({ field: 'data records', byteOffset: cut });
    }
  });

  it('refuses annotation text with reserved bytes and numbers that do not fit 8 characters', () => {
    expect(() => formatEdfNumber(123456789)).toThrow(FormatError);
    expect(formatEdfNumber(-3276.8)).toBe('-3276.8');
    expect(formatEdfNumber(0.123456789)).toBe('0.123457');
    expect(() =>
      writeEdf({
        start,
        recordDurationSeconds: 1,
        signals: [{ label: 'EEG Cz', physicalDimension: 'uV', physicalMin: -1, physicalMax: 1, samplesPerRecord: 1, samples: [0] }],
        annotations: [{ onsetSeconds: 0, texts: ['bad\x14text'] }],
      }),
    ).toThrow(/reserved byte/);
  });
});
