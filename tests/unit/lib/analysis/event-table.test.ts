import { describe, expect, it } from 'vitest';
import { selectEventRows } from '../../../../src/lib/analysis/event-table';
import { parseBidsEvents } from '../../../../src/lib/formats';

// A BIDS events file of our own (BIDS specification, "Task events": onset, duration, then any columns; n/a missing).
const TSV = [
  'onset\tduration\ttrial_type\tvalue\tresponse_time',
  '2.0\t0.1\tgo\t3\t0.45',
  '5.0\t0.1\tgo\t1\t1.30',
  '8.0\t0.1\tstop\t3\tn/a',
  '11.0\t0.1\tgo\t3\t0.80',
  '14.0\t0.1\tstop\t2\t0.60',
].join('\n');

describe('event tables (recipe eventTable)', () => {
  const parsed = parseBidsEvents(TSV, { recordingSeconds: 20 });

  it('keeps every row as it was without a selection', () => {
    const r = selectEventRows(parsed.events, parsed.header, {}, 20);
    expect(r.events.map((e) => [e.onsetSeconds, e.label])).toEqual([[2, 'go'], [5, 'go'], [8, 'stop'], [11, 'go'], [14, 'stop']]);
    expect(r.warnings).toEqual([]);
  });

  it('selects rows by any column, and a missing value meets no condition', () => {
    const r = selectEventRows(parsed.events, parsed.header, { where: ['response_time < 1.2', 'value == 3'] }, 20);
    expect(r.events.map((e) => e.onsetSeconds)).toEqual([2, 11]); // by hand: rows 2 and 5 of the file
    expect(r.warnings).toEqual(['eventTable.where: 2 of 5 events selected']);
    expect(selectEventRows(parsed.events, parsed.header, { where: ['trial_type != go'] }, 20).events.map((e) => e.onsetSeconds)).toEqual([8, 14]);
  });

  it('locks epochs to the response: onsets move by the shift column, labels from another column', () => {
    const r = selectEventRows(parsed.events, parsed.header, { shiftBy: 'response_time', labelColumn: 'value' }, 20);
    // 2 + 0.45, 5 + 1.30, (8: n/a, left out), 11 + 0.80, 14 + 0.60 — by hand
    expect(r.events.map((e) => [e.onsetSeconds, e.label])).toEqual([[2.45, '3'], [6.3, '1'], [11.8, '3'], [14.6, '2']]);
    expect(r.warnings).toEqual(['eventTable.shiftBy: 1 selected events have no number in "response_time" and are left out']);
    expect(selectEventRows(parsed.events, parsed.header, { shiftBy: 'response_time' }, 14.5).warnings).toContain('eventTable.shiftBy: 1 shifted events fall outside the recording and are left out');
  });

  it('names the field for a column the file lacks or a condition it cannot read', () => {
    const bad = (spec: object) => () => selectEventRows(parsed.events, parsed.header, spec, 20);
    expect(bad({ where: ['reaction < 1'] })).toThrow(/^eventTable\.where\[0\] names column "reaction", which the events file lacks/);
    expect(bad({ where: ['value = 3'] })).toThrow(/^eventTable\.where\[0\] "value = 3" is not "<column> <op> <value>"/);
    expect(bad({ where: ['value < high'] })).toThrow(/^eventTable\.where\[0\] compares "value" with < to "high", which is not a number/);
    expect(bad({ shiftBy: 'rt' })).toThrow(/^eventTable\.shiftBy names column "rt"/);
    expect(bad({ labelColumn: 'kind' })).toThrow(/^eventTable\.labelColumn names column "kind"/);
  });
});
