import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { bytesSource, FormatError, openEdf, readEdfHeader, toRecording } from '../../../../src/lib/formats';
import { assertClose } from '../../../helpers/assert-close';

// Files here are assembled byte by byte from the published layout, independently of our writer:
// Kemp et al., 1992, Electroencephalogr Clin Neurophysiol 82:391–393 (EDF header table: 8 ascii version,
// 80 patient, 80 recording, 8 startdate dd.mm.yy, 8 starttime hh.mm.ss, 8 header bytes, 44 reserved,
// 8 number of records, 8 record duration, 4 ns; then per field ns×16 label, ns×80 transducer, ns×8 dimension,
// ns×8 phys min, ns×8 phys max, ns×8 dig min, ns×8 dig max, ns×80 prefiltering, ns×8 samples, ns×32 reserved;
// records of 2-byte two's complement little-endian integers) and Kemp & Olivan, 2003, Clin Neurophysiol
// 114:1755–1761 (EDF+C/EDF+D in reserved, "EDF Annotations" signal, TAL = +onset\x15duration\x14text\x14\0,
// first TAL of each record is the timekeeping annotation "+start\x14\x14").

interface HandSignal {
  label: string;
  dim: string;
  pmin: string;
  pmax: string;
  dmin: string;
  dmax: string;
  spr: number;
}

const pad = (text: string, width: number) => text.padEnd(width, ' ').slice(0, width);

function handHeader(opts: { reserved: string; records: string; duration: string; signals: HandSignal[]; patient?: string }): string {
  const ns = opts.signals.length;
  let h = '';
  h += pad('0', 8);
  h += pad(opts.patient ?? 'MCH-0234567 F 02-MAY-1951 Haagse_Harry', 80); // the EDF+ spec's own example form
  h += pad('Startdate 02-MAR-2002 PSG-1234/2002 NN Telemetry03', 80);
  h += '02.03.02';
  h += '14.15.16';
  h += pad(String(256 * (ns + 1)), 8);
  h += pad(opts.reserved, 44);
  h += pad(opts.records, 8);
  h += pad(opts.duration, 8);
  h += pad(String(ns), 4);
  for (const s of opts.signals) h += pad(s.label, 16);
  for (const _ of opts.signals) h += pad('AgAgCl electrode', 80);
  for (const s of opts.signals) h += pad(s.dim, 8);
  for (const s of opts.signals) h += pad(s.pmin, 8);
  for (const s of opts.signals) h += pad(s.pmax, 8);
  for (const s of opts.signals) h += pad(s.dmin, 8);
  for (const s of opts.signals) h += pad(s.dmax, 8);
  for (const _ of opts.signals) h += pad('HP:0.1Hz LP:75Hz', 80);
  for (const s of opts.signals) h += pad(String(s.spr), 8);
  for (const _ of opts.signals) h += pad('', 32);
  return h;
}

/** Builds header + records: each record is a list (per signal) of int16 values or raw annotation bytes. */
function assemble(header: string, records: (number[] | string)[][], annotationBytes: number[]): Uint8Array {
  const bytes: number[] = [];
  for (let i = 0; i < header.length; i++) bytes.push(header.charCodeAt(i));
  for (const rec of records) {
    rec.forEach((part, k) => {
      if (typeof part === 'string') {
        const raw = Array.from(new TextEncoder().encode(part));
        while (raw.length < annotationBytes[k]) raw.push(0);
        bytes.push(...raw);
      } else {
        for (const v of part) bytes.push(v & 0xff, (v >> 8) & 0xff);
      }
    });
  }
  return Uint8Array.from(bytes);
}

const fz: HandSignal = { label: 'EEG Fz', dim: 'uV', pmin: '-100', pmax: '100', dmin: '-2048', dmax: '2047', spr: 4 };
const cz: HandSignal = { label: 'EEG Cz', dim: 'mV', pmin: '-0.5', pmax: '0.5', dmin: '-1000', dmax: '1000', spr: 4 };
const resp: HandSignal = { label: 'Resp belt', dim: 'arb', pmin: '0', pmax: '1', dmin: '0', dmax: '1000', spr: 2 };
const ann: HandSignal = { label: 'EDF Annotations', dim: '', pmin: '-1', pmax: '1', dmin: '-32768', dmax: '32767', spr: 30 };

function handEdfPlusC(): Uint8Array {
  const header = handHeader({ reserved: 'EDF+C', records: '2', duration: '1', signals: [fz, cz, resp, ann] });
  return assemble(
    header,
    [
      [[-2048, 0, 1000, 2047], [500, -1000, 0, 1000], [0, 1000], '+0\x14\x14\0+0.5\x150.25\x14lamp\x14second text\x14\0'],
      [[-1, 1, 2, 3], [1, 2, 3, 4], [5, 6], '+1\x14\x14\0+1.75\x14oar\x14\0'],
    ],
    [0, 0, 0, 60],
  );
}

/** The EDF scaling formula of Kemp et al., 1992, written out independently of the reader. */
const specScale = (dig: number, s: HandSignal) =>
  ((dig - Number(s.dmin)) * (Number(s.pmax) - Number(s.pmin))) / (Number(s.dmax) - Number(s.dmin)) + Number(s.pmin);

describe('openEdf on hand-assembled EDF+ bytes', () => {
  it('reads header fields, keeping patient and recording identification apart', async () => {
    const edf = await openEdf(bytesSource(handEdfPlusC()));
    expect(edf.header.variant).toBe('EDF+C');
    expect(edf.header.signalCount).toBe(4);
    expect(edf.header.headerBytes).toBe(1280);
    expect(edf.recordCount).toBe(2);
    expect(edf.header.recordDurationSeconds).toBe(1);
    expect(edf.header.signals.map((s) => s.label)).toEqual(['EEG Fz', 'EEG Cz', 'Resp belt', 'EDF Annotations']);
    expect(edf.header.signals[0].prefiltering).toBe('HP:0.1Hz LP:75Hz');
    expect(edf.header.signals[0].transducer).toBe('AgAgCl electrode');
    expect(JSON.stringify(edf.header)).not.toContain('Haagse');
    expect(edf.identifying.patientIdentification).toBe('MCH-0234567 F 02-MAY-1951 Haagse_Harry');
    expect(edf.identifying.patient).toEqual({ code: 'MCH-0234567', sex: 'F', birthdate: '02-MAY-1951', name: 'Haagse_Harry' });
    expect(edf.identifying.recording?.admincode).toBe('PSG-1234/2002');
    // EDF+ §2.1.3.2: "02.03.02" with recording field "Startdate 02-MAR-2002" is 2 March 2002.
    expect(edf.identifying.start).toEqual({ year: 2002, month: 3, day: 2, hour: 14, minute: 15, second: 16 });
  });

  it('scales samples with the specification formula and converts mV to µV', async () => {
    const edf = await openEdf(bytesSource(handEdfPlusC()));
    expect(edf.sampleRateHz).toBe(4);
    expect(edf.channels.map((c) => c.label)).toEqual(['EEG Fz', 'EEG Cz']);
    const fzExpected = [-2048, 0, 1000, 2047, -1, 1, 2, 3].map((d) => specScale(d, fz));
    assertClose(edf.channels[0].samples, fzExpected, 1e-4, 'Fz');
    // Endpoints by definition of the formula: digMin ↦ physMin, digMax ↦ physMax.
    assertClose(edf.channels[0].samples[0], -100, 1e-5);
    assertClose(edf.channels[0].samples[3], 100, 1e-5);
    // Cz: dig 500 → (500 + 1000)·1/2000 − 0.5 = 0.25 mV = 250 µV (worked by hand).
    assertClose(edf.channels[1].samples[0], 250, 1e-4);
    const czExpected = [500, -1000, 0, 1000, 1, 2, 3, 4].map((d) => specScale(d, cz) * 1e3);
    assertClose(edf.channels[1].samples, czExpected, 1e-3, 'Cz');
  });

  it('lists the signal at another rate as ignored instead of failing on its unit', async () => {
    const edf = await openEdf(bytesSource(handEdfPlusC()));
    expect(edf.ignored).toEqual([{ signalIndex: 2, label: 'Resp belt', sampleRateHz: 2, reason: 'sample-rate' }]);
  });

  it('parses TALs with several annotations and takes record starts from the timekeeping TAL', async () => {
    const edf = await openEdf(bytesSource(handEdfPlusC()));
    expect(Array.from(edf.recordStartSeconds)).toEqual([0, 1]);
    expect(edf.annotations).toEqual([
      { onsetSeconds: 0.5, durationSeconds: 0.25, label: 'lamp', recordIndex: 0 },
      { onsetSeconds: 0.5, durationSeconds: 0.25, label: 'second text', recordIndex: 0 },
      { onsetSeconds: 1.75, durationSeconds: null, label: 'oar', recordIndex: 1 },
    ]);
    const rec = toRecording(edf);
    expect(rec.channelNames).toEqual(['Fz', 'Cz']);
    expect(rec.events).toEqual([
      { onsetSeconds: 0.5, durationSeconds: 0.25, label: 'lamp' },
      { onsetSeconds: 0.5, durationSeconds: 0.25, label: 'second text' },
      { onsetSeconds: 1.75, durationSeconds: 0, label: 'oar' },
    ]);
    expect(rec.gapSampleIndices).toBeUndefined();
  });

  it('reads EDF+D record starts, reports the gap and places events on the sample axis', async () => {
    const sig: HandSignal = { label: 'EEG Oz', dim: 'uV', pmin: '-3276.8', pmax: '3276.7', dmin: '-32768', dmax: '32767', spr: 2 };
    const a: HandSignal = { ...ann, spr: 16 };
    const header = handHeader({ reserved: 'EDF+D', records: '3', duration: '0.5', signals: [sig, a] });
    const bytes = assemble(
      header,
      [
        [[10, 20], '+0\x14\x14\0'],
        [[30, 40], '+0.5\x14\x14\0+1.5\x14lost\x14\0'],
        [[50, 60], '+2\x14\x14\0+2.25\x14found\x14\0'],
      ],
      [0, 32],
    );
    const edf = await openEdf(bytesSource(bytes));
    expect(Array.from(edf.recordStartSeconds)).toEqual([0, 0.5, 2]);
    expect(edf.gaps).toEqual([{ recordIndex: 2, startSeconds: 1, endSeconds: 2, sampleIndex: 4 }]);
    // Gain 6553.5/65535 = 0.1 µV per step, offset 0 (physMin −3276.8 at digMin −32768).
    assertClose(edf.channels[0].samples, [1, 2, 3, 4, 5, 6], 1e-5);
    const rec = toRecording(edf);
    expect(rec.gapSampleIndices).toEqual([4]);
    // 2.25 s file time lies 0.25 s into record 3, which starts at sample-axis time 2 × 0.5 s = 1.0 s.
    expect(rec.events).toEqual([{ onsetSeconds: 1.25, durationSeconds: 0, label: 'found' }]);
    expect(edf.eventsOutside.map((e) => [e.annotation.label, e.reason])).toEqual([['lost', 'in-gap']]);
  });

  it('infers the record count of a plain EDF file declaring -1 from the file size', async () => {
    const header = handHeader({ reserved: '', records: '-1', duration: '2', signals: [fz] });
    const bytes = assemble(header, [[[1, 2, 3, 4]], [[5, 6, 7, 8]], [[9, 10, 11, 12]]], [0]);
    const edf = await openEdf(bytesSource(bytes));
    expect(edf.header.variant).toBe('EDF');
    expect(edf.recordCount).toBe(3);
    expect(edf.sampleRateHz).toBe(2);
    expect(edf.identifying.patient).toBeNull();
    expect(edf.warnings.join(' ')).toMatch(/inferred from the file size/);
    expect(edf.channels[0].samples.length).toBe(12);
  });

  it('refuses an unknown unit, naming the signal and the byte offset of its dimension field', async () => {
    const odd: HandSignal = { ...fz, label: 'EEG Pz', dim: 'furlong' };
    const bytes = assemble(handHeader({ reserved: 'EDF+C', records: '1', duration: '1', signals: [fz, odd, ann] }), [[[0, 0, 0, 0], [0, 0, 0, 0], '+0\x14\x14\0']], [0, 0, 60]);
    const error = await openEdf(bytesSource(bytes)).catch((e: unknown) => e);
    expect(error).toBeInstanceOf(FormatError);
    const fe = error as FormatError;
    expect(fe.field).toBe('physical dimension');
    expect(fe.signal).toBe('EEG Pz');
    // Dimension fields start after 256 + ns×16 + ns×80 bytes; signal 2 of 3 is 8 bytes further.
    expect(fe.byteOffset).toBe(256 + 3 * 96 + 8);
    expect(fe.message).toMatch(/furlong/);
    // …unless the caller maps the unit.
    const mapped = await openEdf(bytesSource(bytes), { unitFactors: { furlong: 2 } });
    expect(mapped.channels[1].microvoltFactor).toBe(2);
  });

  it('names non-numeric fields and digMin ≥ digMax with their byte offsets', async () => {
    const bad: HandSignal = { ...fz, pmax: '1O0' };
    const b1 = assemble(handHeader({ reserved: '', records: '1', duration: '1', signals: [bad] }), [[[0, 0, 0, 0]]], [0]);
    await expect(openEdf(bytesSource(b1))).rejects.toMatchObject({ field: 'physical maximum', byteOffset: 256 + 112, signal: 'EEG Fz' });
    const flipped: HandSignal = { ...fz, dmin: '2047', dmax: '-2048' };
    const b2 = assemble(handHeader({ reserved: '', records: '1', duration: '1', signals: [flipped] }), [[[0, 0, 0, 0]]], [0]);
    await expect(openEdf(bytesSource(b2))).rejects.toMatchObject({ field: 'digital minimum', byteOffset: 256 + 120 });
    const header = handHeader({ reserved: '', records: '1', duration: '1', signals: [fz] });
    await expect(readEdfHeader(bytesSource(assemble(header, [[[0, 0, 0, 0]]], [0]).subarray(0, 300)))).rejects.toMatchObject({
      field: 'header bytes',
      byteOffset: 184,
    });
  });

  it('reports a record count that disagrees with the file size', async () => {
    const header = handHeader({ reserved: '', records: '3', duration: '1', signals: [fz] });
    const bytes = assemble(header, [[[0, 0, 0, 0]], [[0, 0, 0, 0]]], [0]);
    await expect(openEdf(bytesSource(bytes))).rejects.toThrow(/data record count at byte 236: declares 3 records of 8 bytes/);
  });
});

describe('EDF scaling on random hand-made headers', () => {
  it('equals the specification formula for any digital range, physical range and sample', async () => {
    await fc.assert(
      fc.asyncProperty(
        fc.integer({ min: -32768, max: 32766 }),
        fc.integer({ min: 1, max: 65535 }),
        fc.integer({ min: -99999, max: 99999 }),
        fc.integer({ min: -99999, max: 99999 }).filter((x) => x !== 0),
        fc.array(fc.double({ min: 0, max: 1, noNaN: true }), { minLength: 4, maxLength: 4 }),
        async (dmin, span, pminTenths, rangeTenths, where) => {
          const dmax = Math.min(32767, dmin + span);
          const pmin = pminTenths / 10;
          const pmax = Number(((pminTenths + rangeTenths) / 10).toFixed(1));
          const sig: HandSignal = { label: 'EEG T7', dim: 'uV', pmin: String(pmin), pmax: String(pmax), dmin: String(dmin), dmax: String(dmax), spr: 4 };
          const digits = where.map((u) => Math.round(dmin + u * (dmax - dmin)));
          const bytes = assemble(handHeader({ reserved: '', records: '1', duration: '1', signals: [sig] }), [[digits]], [0]);
          const edf = await openEdf(bytesSource(bytes));
          const expected = digits.map((d) => specScale(d, sig));
          // Float32 output: relative error ≤ 2^-24 of the largest magnitude involved.
          const tol = Math.max(Math.abs(pmin), Math.abs(pmax)) * 1.2e-7 + 1e-9;
          assertClose(edf.channels[0].samples, expected, tol);
        },
      ),
      { numRuns: 200 },
    );
  });

  it('converts µV written as Latin-1 0xB5 or UTF-8, nV and V', async () => {
    const micro: HandSignal = { ...fz, label: 'EEG O1', dim: '\u00b5V' }; // one byte 0xB5 in the header
    const microUtf8: HandSignal = { ...fz, label: 'EEG O2', dim: '\u00c2\u00b5V' }; // bytes C2 B5 'V'
    const nano: HandSignal = { ...fz, label: 'EEG Oz', dim: 'nV' };
    const volt: HandSignal = { ...fz, label: 'EEG Pz', dim: 'V', pmin: '-0.0001', pmax: '0.0001' };
    const bytes = assemble(handHeader({ reserved: '', records: '1', duration: '1', signals: [micro, microUtf8, nano, volt] }), [[[2047, 0, 0, 0], [2047, 0, 0, 0], [2047, 0, 0, 0], [2047, 0, 0, 0]]], [0, 0, 0, 0]);
    const edf = await openEdf(bytesSource(bytes));
    expect(edf.channels.map((c) => c.microvoltFactor)).toEqual([1, 1, 1e-3, 1e6]);
    assertClose(edf.channels[0].samples[0], 100, 1e-4);
    assertClose(edf.channels[2].samples[0], 0.1, 1e-6); // 100 nV
    assertClose(edf.channels[3].samples[0], 100, 1e-3); // 1e-4 V = 100 µV
  });

  it('reports annotations before the first record and after the last one', async () => {
    const a: HandSignal = { ...ann, spr: 20 };
    const sig: HandSignal = { ...fz, spr: 2 };
    const bytes = assemble(
      handHeader({ reserved: 'EDF+C', records: '2', duration: '1', signals: [sig, a] }),
      [
        [[0, 0], '+0.5\x14\x14\0+0.25\x14early\x14\0'],
        [[0, 0], '+1.5\x14\x14\0+2.5\x14late\x14\0+1.75\x14kept\x14\0'],
      ],
      [0, 40],
    );
    const edf = await openEdf(bytesSource(bytes));
    // First record starts 0.5 s after the header time, so "kept" at 1.75 s lies 1.25 s from the first sample.
    expect(edf.events).toEqual([{ onsetSeconds: 1.25, durationSeconds: 0, label: 'kept' }]);
    expect(edf.eventsOutside.map((e) => [e.annotation.label, e.reason])).toEqual([['early', 'before-start'], ['late', 'after-end']]);
  });

  it('refuses malformed TALs with the byte offset of the bad part', async () => {
    const a: HandSignal = { ...ann, spr: 8 };
    const sig: HandSignal = { ...fz, spr: 1 };
    const header = handHeader({ reserved: 'EDF+C', records: '1', duration: '1', signals: [sig, a] });
    const dataStart = 256 * 3 + 2; // header, then one 2-byte sample of EEG Fz
    const noTerminator = assemble(header, [[[0], '+0\x14\x14\0+1x\x14a\x14\0']], [0, 16]);
    await expect(openEdf(bytesSource(noTerminator))).rejects.toMatchObject({ field: 'annotation onset', byteOffset: dataStart + 5 });
    const noZero = assemble(header, [[[0], '+0\x14\x14\0+0.1\x14abcdef']], [0, 16]);
    await expect(openEdf(bytesSource(noZero))).rejects.toMatchObject({ field: 'annotation', byteOffset: dataStart + 5 });
  });
});
