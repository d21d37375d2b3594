import { describe, expect, it } from 'vitest';
import { assignConditions, checkConditions, countLabels } from '../../../../src/lib/analysis/conditions';
import type { RecordingEvent } from '../../../../src/lib/analysis/recording';

// A hand-written event list (invented labels): 3 × "bell", 2 × "gull", 1 × "pause".
const events: RecordingEvent[] = [
  { onsetSeconds: 1, durationSeconds: 0, label: 'bell' },
  { onsetSeconds: 2, durationSeconds: 0, label: 'gull' },
  { onsetSeconds: 3, durationSeconds: 0, label: 'bell' },
  { onsetSeconds: 4, durationSeconds: 0, label: 'pause' },
  { onsetSeconds: 5, durationSeconds: 0, label: 'gull' },
  { onsetSeconds: 6, durationSeconds: 0, label: 'bell' },
];

describe('countLabels', () => {
  it('lists distinct labels with counts in order of first appearance', () => {
    // Counted by hand from the list above.
    expect(countLabels(events)).toEqual([
      { label: 'bell', count: 3, firstOnsetSeconds: 1 },
      { label: 'gull', count: 2, firstOnsetSeconds: 2 },
      { label: 'pause', count: 1, firstOnsetSeconds: 4 },
    ]);
    expect(countLabels([])).toEqual([]);
  });
});

describe('assignConditions', () => {
  it('maps one or several labels to a condition and leaves the others out', () => {
    const out = assignConditions(events, [
      { name: 'sound', labels: ['bell', 'gull'] },
      { name: 'rest', labels: ['pause'] },
    ]);
    expect(out.map((a) => [a.eventIndex, a.condition])).toEqual([
      [0, 'sound'], [1, 'sound'], [2, 'sound'], [3, 'rest'], [4, 'sound'], [5, 'sound'],
    ]);
    expect(assignConditions(events, [{ name: 'bells only', labels: ['bell'] }]).map((a) => a.eventIndex)).toEqual([0, 2, 5]);
  });
});

describe('checkConditions', () => {
  it('refuses an empty name, a duplicate name, an empty group and a label in two conditions', () => {
    expect(() => checkConditions([{ name: ' ', labels: ['bell'] }])).toThrow(/conditions\[0\]\.name is empty/);
    expect(() => checkConditions([{ name: 'A', labels: ['bell'] }, { name: 'a', labels: ['gull'] }])).toThrow(/conditions\[1\]\.name "a" is already the name of condition 1/);
    expect(() => checkConditions([{ name: 'A', labels: [] }])).toThrow(/conditions\[0\]\.labels is empty/);
    expect(() => checkConditions([{ name: 'A', labels: ['bell'] }, { name: 'B', labels: ['bell'] }])).toThrow(/label "bell" already belongs to condition "A"/);
    expect(() => checkConditions([{ name: 'x{y}', labels: ['bell'] }])).toThrow(/may hold only letters/);
    expect(() => checkConditions([{ name: 'lamp-watch 2', labels: ['bell'] }])).not.toThrow();
  });
});
