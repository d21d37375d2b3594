// The Maps screen's methods paragraph is the core's (methodsParagraph over the full Result of runRecipe) for the
// live recipe: the decomposition's grid, kept/rejected/dropped trials and the resolution recomputed from the
// recipe's wavelet widths must give the same words. A scenario of our own: two channels, "gull" and "tern" calls.
import { describe, expect, it } from 'vitest';
import { liveRecipe, methodsTextOf } from '../../../../../src/lib/client/workspace/methods-text';
import { methodsParagraph } from '../../../../../src/lib/analysis/methods-text';
import { parseRecipe } from '../../../../../src/lib/analysis/recipe';
import { runRecipe } from '../../../../../src/lib/analysis/run-recipe';
import type { Decomposition } from '../../../../../src/lib/client/workspace/results';
import { seededNormal } from '../../../../helpers/seeded-random';

const fs = 200;
const normal = seededNormal(31);
const recording = {
  sampleRateHz: fs,
  channelNames: ['C3', 'C4'],
  data: [0, 1].map(() => Float32Array.from({ length: 40 * fs }, () => 8 * normal())),
  // the last "tern" sits 0.3 s before the end: its epoch falls outside the recording (dropped)
  events: [...Array.from({ length: 12 }, (_, k) => ({ onsetSeconds: 2 + 3 * k, durationSeconds: 0, label: k % 2 === 0 ? 'gull' : 'tern' })), { onsetSeconds: 39.7, durationSeconds: 0, label: 'tern' }],
};
const input = {
  format: 2 as const,
  epochs: { events: ['gull', 'tern'], start: -0.6, end: 1 },
  frequencies: { min: 4, max: 30, count: 10, spacing: 'log' as const },
  cycles: { min: 3, max: 7 },
  baseline: { start: -0.5, end: -0.2, method: 'decibel' as const, scope: 'average' as const },
  spectrum: { segment: 1, overlap: 0.5, range: [1, 45] as [number, number], source: 'recording' as const },
  aperiodic: { range: [2, 35] as [number, number], model: 'power-law' as const },
};

describe('methodsTextOf', () => {
  it('gives the core’s paragraph for the live baseline, method and fit range', () => {
    const result = runRecipe(recording, input);
    const labels = ['gull', 'tern'];
    const d = {
      recipe: input,
      channels: result.channels,
      labels,
      frequencies: Float64Array.from(result.frequencies),
      trials: labels.map((l) => result.conditions[l].trials),
      rejected: labels.map((l) => result.conditions[l].rejected),
      dropped: labels.map((l) => result.conditions[l].dropped),
    } as unknown as Decomposition;
    expect(d.dropped).toEqual([0, 1]);
    const live = { baseline: { start: -0.4, end: -0.1 }, method: 'z-score' as const, scope: 'trial' as const, spread: 'trials' as const, fitRange: [3, 30] as [number, number] };
    const recipe = liveRecipe(d, live);
    expect(recipe.baseline).toEqual({ start: -0.4, end: -0.1, method: 'z-score', scope: 'trial', spread: 'trials' });
    expect(recipe.aperiodic.range).toEqual([3, 30]);
    const ours = methodsTextOf(d, live);
    expect(ours).toEqual(methodsParagraph(parseRecipe(recipe), result));
    expect(ours.paragraph).toContain('tern: 6 kept, 1 outside the recording');
  });
});
