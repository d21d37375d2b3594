// Channel groups and contrasts (issue "Beyond one channel's power", items 3 and 4): a group map is the mean of its
// channels' maps; the shared-baseline contrast of two identical conditions is 0; and the shared baseline is the mean
// of the two conditions' baselines, checked against values computed by hand from the contract's formulas.
import { describe, expect, it } from 'vitest';
import { defaultChannelGroups, groupIndices, groupMap } from '../../../../src/lib/analysis/channel-groups';
import { contrastMap, symmetricLimit } from '../../../../src/lib/analysis/contrast';
import { runRecipe } from '../../../../src/lib/analysis/run-recipe';
import { seededNormal } from '../../../helpers/seeded-random';

describe('channel groups', () => {
  it('defaults come from 10-20 names present in the recording', () => {
    const groups = defaultChannelGroups(['FZ', 'Cz', 'C3', 'c4', 'O1', 'O2', 'EOG']);
    expect(groups.map((g) => g.name)).toEqual(['frontal midline', 'left central', 'right central', 'occipital']);
    expect(groups[0].channels).toEqual(['FZ']);
    expect(groups[2].channels).toEqual(['c4']);
    expect(groups[3].channels).toEqual(['O1', 'O2']);
  });

  it('a group map equals the mean of its channels\' maps, averaged independently here', () => {
    const fs = 200;
    const normal = seededNormal(4);
    const names = ['O1', 'Oz', 'O2', 'Fz'];
    const data = names.map(() => Float32Array.from({ length: 30 * fs }, () => 8 * normal()));
    const events = Array.from({ length: 10 }, (_, k) => ({ onsetSeconds: 2 + 2.5 * k, durationSeconds: 0, label: 'tone' }));
    const result = runRecipe({ sampleRateHz: fs, channelNames: names, data, events } as never, {
      format: 2,
      epochs: { events: ['tone'], start: -0.5, end: 1 },
      frequencies: { min: 4, max: 30, count: 6 },
      cycles: { fixed: 4 },
      baseline: { start: -0.4, end: -0.1, method: 'decibel' },
      spectrum: { segment: 1, overlap: 0.5, range: [1, 40] },
      aperiodic: { range: [2, 40], model: 'power-law' },
    });
    const [occipital] = defaultChannelGroups(result.channels).filter((g) => g.name === 'occipital');
    const idx = groupIndices(occipital, result.channels);
    const maps = result.channels.map((_, c) => Float64Array.from(result.conditions.tone.normalized[c].flat()));
    const g = groupMap(maps, idx);
    const nt = result.times.length;
    for (let f = 0; f < result.frequencies.length; f++) {
      for (let t = 0; t < nt; t += 17) {
        const byHand = (result.conditions.tone.normalized[0][f][t] + result.conditions.tone.normalized[1][f][t] + result.conditions.tone.normalized[2][f][t]) / 3;
        expect(g[f * nt + t]).toBeCloseTo(byHand, 12);
      }
    }
    expect(() => groupIndices({ name: 'bad', channels: ['O1', 'P9'] }, result.channels)).toThrow(/channelGroups\["bad"\]\[1\].*P9/);
    expect(() => groupIndices({ name: 'twice', channels: ['O1', 'O1'] }, result.channels)).toThrow(/repeats/);
  });
});

describe('contrasts', () => {
  const nt = 6;
  const base = { first: 0, last: 2 };
  // two frequency rows of made-up power, µV²
  const a = Float64Array.of(2, 4, 6, 8, 8, 8, 1, 1, 1, 2, 2, 2);
  const b = Float64Array.of(4, 4, 4, 4, 4, 4, 3, 3, 3, 3, 3, 3);

  it('two identical conditions give 0 with either baseline, for every method', () => {
    for (const method of ['decibel', 'percent-change', 'z-score', 'power-ratio'] as const) {
      for (const choice of ['own', 'shared'] as const) {
        // a baseline with spread in every row, so z-score is defined
        const c = Float64Array.of(2, 4, 6, 8, 8, 8, 1, 2, 3, 2, 2, 2);
        for (const v of contrastMap(c, c, nt, base, method, choice)) expect(v).toBe(0);
      }
    }
  });

  it('shared baseline: B = (B_A + B_B)/2, worked by hand in decibel', () => {
    // row 0: B_A = (2+4+6)/3 = 4, B_B = 4, shared 4 → at t = 3: 10·log10(8/4) − 10·log10(4/4) = 3.0103 dB
    // row 1: B_A = 1, B_B = 3, shared 2 → at t = 3: 10·log10(2/2) − 10·log10(3/2) = −1.7609 dB
    const shared = contrastMap(a, b, nt, base, 'decibel', 'shared');
    expect(shared[3]).toBeCloseTo(10 * Math.log10(2), 10);
    expect(shared[nt + 3]).toBeCloseTo(-10 * Math.log10(1.5), 10);
    // own baselines hide row 1's standing difference: 10·log10(2/1) − 10·log10(3/3) = 3.0103 dB
    const own = contrastMap(a, b, nt, base, 'decibel', 'own');
    expect(own[nt + 3]).toBeCloseTo(10 * Math.log10(2), 10);
    expect(symmetricLimit(own)).toBeCloseTo(10 * Math.log10(2), 10);
  });
});

describe('recipe channelGroups', () => {
  it('is checked against the analysed channels, naming the group and place', () => {
    const fs = 100;
    const data = [new Float32Array(20 * fs), new Float32Array(20 * fs)].map((d) => d.map((_, i) => Math.sin(i)));
    const rec = { sampleRateHz: fs, channelNames: ['C3', 'C4'], data, events: [5, 10, 15].map((t) => ({ onsetSeconds: t, durationSeconds: 0, label: 'x' })) };
    const recipe = {
      format: 2,
      epochs: { events: ['x'], start: -1, end: 1 },
      frequencies: { min: 4, max: 20, count: 3 },
      cycles: { fixed: 3 },
      baseline: { start: -0.8, end: -0.4, method: 'decibel' },
      spectrum: { segment: 1, overlap: 0.5, range: [1, 40] },
      aperiodic: { range: [2, 40], model: 'power-law' },
    };
    expect(() => runRecipe(rec as never, { ...recipe, channelGroups: { central: ['C3', 'C4'] } })).not.toThrow();
    expect(() => runRecipe(rec as never, { ...recipe, channelGroups: { central: ['C3', 'Cz'] } })).toThrow(/channelGroups\["central"\]\[1\].*"Cz"/);
    expect(() => runRecipe(rec as never, { ...recipe, channelGroups: { central: [] } })).toThrow(/channelGroups/);
  });
});
