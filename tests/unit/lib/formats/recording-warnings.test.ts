// The file-to-recording warnings, one function for the browser's intake and the command line
// (src/lib/formats/recording-warnings.ts). Files are made with our EDF+ writer and read by our reader; the facts
// checked are the EDF+ placement of annotations (Kemp & Olivan 2003: an annotation belongs to the samples of the
// record its onset falls in) and the BIDS events rule that onsets are in seconds from the first sample.
import { describe, expect, it } from 'vitest';
import { blobSource, bytesSource, openEdf, openCsvBlob, openEdfBlob, parseBidsEvents, recordingWarnings, writeEdf } from '../../../../src/lib/formats';

const start = { year: 2024, month: 3, day: 14, hour: 9, minute: 30, second: 0 };

/** 4 s at 8 Hz (1-s records), one event inside and one after the last sample. */
function fourSeconds(): Uint8Array {
  return writeEdf({
    variant: 'EDF+C',
    start,
    recordDurationSeconds: 1,
    signals: ['EEG Cz', 'EEG Pz'].map((label, k) => ({
      label,
      physicalDimension: 'uV',
      physicalMin: -100,
      physicalMax: 100,
      samplesPerRecord: 8,
      samples: Float64Array.from({ length: 32 }, (_, i) => Math.sin(i + k) * 10),
    })),
    annotations: [
      { onsetSeconds: 1, durationSeconds: 0, texts: ['tide-in'] },
      { onsetSeconds: 6.5, durationSeconds: 0, texts: ['tide-out'] },
    ],
  });
}

describe('recordingWarnings', () => {
  it('names an annotation after the last sample, and a recording.exclude label the file lacks', async () => {
    const edf = await openEdf(bytesSource(fourSeconds()), { exclude: ['EEG Pz', 'Belt'] });
    expect(recordingWarnings({ edf, reading: { exclude: ['EEG Pz', 'Belt'] }, events: null })).toEqual([
      '1 annotations fall outside the recorded samples and are left out (first: "tide-out" at 6.5 s, after end)',
      'recording.exclude: the file has no signal labelled "Belt"',
    ]);
  });

  it('says a table ignores EDF reading choices, and prefixes the events file’s own lines without its name', () => {
    const events = parseBidsEvents('onset\tduration\ttrial_type\n0.5\t0\tcue\n9\t0\tcue\n', { recordingSeconds: 4 });
    expect(recordingWarnings({ edf: null, reading: { unitFactors: { arb: 2 } }, events })).toEqual([
      'recording.units and recording.exclude apply to EDF files only; a table is read as it is',
      'events file: 1 events lie outside the recording (0–4 s), first at row 3',
    ]);
    expect(recordingWarnings({ edf: null, reading: null, events: null })).toEqual([]);
  });

  it('is what the browser’s intake reports for the same file (the intake worker runs openEdfBlob / openCsvBlob)', async () => {
    const bytes = fourSeconds();
    const opened = await openEdfBlob(new Blob([bytes as BlobPart]), { exclude: ['Belt'] }, () => {});
    if (!opened.ok) throw new Error(opened.error.message);
    const edf = await openEdf(blobSource(new Blob([bytes as BlobPart])), { exclude: ['Belt'] });
    expect(opened.local.warnings).toEqual(recordingWarnings({ edf, reading: { exclude: ['Belt'] }, events: null }));
    expect(opened.local.warnings).toHaveLength(2);

    const csv = await openCsvBlob(new Blob(['Cz,Pz\n1,2\n3,4\n5,6\n7,8\n']), { sampleRateHz: 2, delimiter: ',', events: new Blob(['onset\tduration\ttrial_type\n0.5\t0\tcue\n3\t0\tcue\n']) }, () => {});
    if (!csv.ok) throw new Error(csv.error.message);
    expect(csv.local.warnings).toEqual(['events file: 1 events lie outside the recording (0–2 s), first at row 3']);
  });
});
