import { describe, expect, it } from 'vitest';
import { parseBidsEvents } from '../../../../src/lib/formats';

// Column names, the n/a marker and tab separation follow the BIDS specification's "Task events" section
// (onset and duration REQUIRED, in seconds; trial_type OPTIONAL; n/a for missing values; extra columns allowed).

describe('parseBidsEvents', () => {
  const tsv = [
    'onset\tduration\ttrial_type\tresponse_time\tstim_file',
    '1.5\t0.5\tlamp-watch\t0.43\tlamp.png',
    '4.0\tn/a\toar-pull\tn/a\tn/a',
    '7.25\t0\tn/a\t1.2\toar.png',
  ].join('\n');

  it('reads onset, duration and trial_type, keeps the other columns as written, and honours n/a', () => {
    const { header, events, outside, warnings } = parseBidsEvents(tsv);
    expect(header).toEqual(['onset', 'duration', 'trial_type', 'response_time', 'stim_file']);
    const cells = (o: string, d: string, t: string, rt: string, f: string) => ({ onset: o, duration: d, trial_type: t, response_time: rt, stim_file: f });
    expect(events).toEqual([
      { onsetSeconds: 1.5, durationSeconds: 0.5, label: 'lamp-watch', row: 2, durationKnown: true, columns: cells('1.5', '0.5', 'lamp-watch', '0.43', 'lamp.png') },
      { onsetSeconds: 4, durationSeconds: 0, label: 'oar-pull', row: 3, durationKnown: false, columns: cells('4.0', 'n/a', 'oar-pull', 'n/a', 'n/a') },
      { onsetSeconds: 7.25, durationSeconds: 0, label: 'n/a', row: 4, durationKnown: true, columns: cells('7.25', '0', 'n/a', '1.2', 'oar.png') },
    ]);
    expect(outside).toEqual([]);
    expect(warnings).toEqual([]);
  });

  it('reports events outside the recording instead of returning them', () => {
    const { events, outside, warnings } = parseBidsEvents(tsv, { recordingSeconds: 5 });
    expect(events.map((e) => e.row)).toEqual([2, 3]);
    expect(outside.map((e) => e.row)).toEqual([4]);
    expect(warnings[0]).toMatch(/1 events lie outside the recording \(0–5 s\), first at row 4/);
  });

  it('names the row of a non-numeric onset', () => {
    expect(() => parseBidsEvents('onset\tduration\n1\t0\nsoon\t0\n')).toThrow('onset at row 3 column "onset": "soon" is not a number of seconds');
    expect(() => parseBidsEvents('onset\tduration\nn/a\t0\n')).toThrow(/row 2/);
    expect(() => parseBidsEvents('onset\tduration\n1\t-2\n')).toThrow(/duration at row 2/);
  });

  it('requires tabs and the required columns, and names ragged rows', () => {
    expect(() => parseBidsEvents('onset,duration\n1,0\n')).toThrow(/not tab-separated/);
    expect(() => parseBidsEvents('duration\ttrial_type\n1\ta\n')).toThrow(/no "onset" column/);
    expect(() => parseBidsEvents('onset\tduration\n1\n')).toThrow(/row length at row 2: 1 cells, but the header names 2 columns/);
  });

  it('labels every event n/a, with a warning, when trial_type is absent', () => {
    const { events, warnings } = parseBidsEvents('onset\tduration\tvalue\n2\t1\t7\n');
    expect(events[0].label).toBe('n/a');
    expect(warnings[0]).toMatch(/no "trial_type" column/);
  });

  it('returns events in onset order, keeping file order among equal onsets', () => {
    // BIDS does not require rows in time order; every reader must number events alike (recipe event keys).
    const text = 'onset\tduration\ttrial_type\n5.0\t0\tb\n1.5\t0\ta\n5.0\t0\tc\n0.25\tn/a\td\n';
    const { events } = parseBidsEvents(text, { recordingSeconds: 10 });
    expect(events.map((e) => e.label)).toEqual(['d', 'a', 'b', 'c']);
  });
});
