import { describe, expect, it } from 'vitest';
import { bandTableRows, type BandRow } from '../../../../../src/lib/client/workspace/band-summary';

const theta = { name: 'theta', lowHz: 4, highHz: 8 };
const early = { name: 'early', startSeconds: 0.1, endSeconds: 0.5 };
const row = (channel: string, condition: string, value: number): BandRow => ({ band: theta, window: early, channel, condition, value, cells: 10 });

describe('bandTableRows', () => {
  const rows = [row('C3', 'a', 1), row('C3', 'b', 2), row('FC1', 'a', 4), row('FC1', 'b', NaN), row('Pz', 'a', 10), row('Pz', 'b', 20)];
  const itpc = rows.map((r, i) => ({ ...r, value: i / 10 }));
  const out = bandTableRows(rows, itpc, [{ name: 'left', channels: ['C3', 'FC1'] }]);

  it('keeps every channel row, with the ITPC of the same cell beside it', () => {
    expect(out.filter((r) => r.kind === 'channel').map((r) => [r.site, r.condition, r.value, r.itpc])).toEqual(rows.map((r, i) => [r.channel, r.condition, r.value, i / 10]));
  });
  it("gives a group the arithmetic mean of its channels' finite values, and counts them", () => {
    const groups = out.filter((r) => r.kind === 'group');
    expect(groups.map((r) => [r.site, r.condition, r.value, r.count])).toEqual([
      ['left', 'a', (1 + 4) / 2, 2],
      ['left', 'b', 2, 1],
    ]);
    expect(groups[0].itpc).toBeCloseTo((0 + 0.2) / 2, 12);
  });
  it('has no ITPC without a phase-consistency run', () => {
    expect(bandTableRows(rows, null, []).every((r) => r.itpc === null)).toBe(true);
  });
});
