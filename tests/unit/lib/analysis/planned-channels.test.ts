// planChannels: the plan worker's share of planning. What crosses back to the caller must be exactly the channels the
// recipe's conditioning changed (copies the caller may transfer), never an alias of the conditioning cache, and the
// plan must point into that reduced list. Reference: planRun and conditionRecording of the core, in this thread.
import { describe, expect, it } from 'vitest';
import { conditionRecording } from '../../../../src/lib/analysis/condition-recording';
import { planChannels } from '../../../../src/lib/analysis/planned-channels';
import { parseRecipe } from '../../../../src/lib/analysis/recipe';
import type { Recording } from '../../../../src/lib/analysis/recording';
import { planRun } from '../../../../src/lib/analysis/run-recipe';
import { seededNormal } from '../../../helpers/seeded-random';

// Scenario of our own: four channels at 100 Hz, 30 s, a "tap" every 3 s; T7 is marked bad by the recipe.
function makeRecording(): Recording {
  const fs = 100;
  const normal = seededNormal(5);
  const names = ['C3', 'C4', 'T7', 'Oz'];
  return {
    sampleRateHz: fs,
    channelNames: names,
    data: names.map(() => Float32Array.from({ length: 30 * fs }, () => 5 * normal())),
    events: Array.from({ length: 8 }, (_, k) => ({ onsetSeconds: 3 + 3 * k, durationSeconds: 0, label: 'tap' })),
  };
}

const recipe = {
  format: 2,
  epochs: { events: ['tap'], start: -0.5, end: 1 },
  frequencies: { min: 5, max: 20, count: 3, spacing: 'log' },
  cycles: { fixed: 4 },
  baseline: { start: -0.4, end: -0.1, method: 'decibel', scope: 'average' },
  spectrum: { segment: 1, overlap: 0.5, range: [1, 40], source: 'recording' },
  aperiodic: { range: [2, 30], model: 'power-law' },
  signals: { bad: ['T7'] },
};

describe('planChannels', () => {
  it('as recorded: every planned channel is named by its input index, and the plan indexes the reduced list', () => {
    const input = makeRecording();
    const out = planChannels(input, recipe, null);
    expect(out.plan.channels).toEqual(['C3', 'C4', 'Oz']);
    expect(out.channels).toEqual([0, 1, 3]);
    expect(out.plan.channelIndices).toEqual([0, 1, 2]);
    // Everything else is planRun's plan.
    const { plan } = planRun(input, recipe);
    expect({ ...out.plan, channelIndices: plan.channelIndices }).toEqual(plan);
  });

  it('conditioned: copies equal to the core\'s conditioning, not aliases of its cache; left out when the caller holds them', () => {
    const input = makeRecording();
    const filtered = { ...recipe, reference: { kind: 'common-average' }, filters: { highPass: { cutoffHz: 1 } } };
    const out = planChannels(input, filtered, null);
    const core = conditionRecording(input, parseRecipe(filtered)).recording;
    out.plan.channels.forEach((name, i) => {
      const c = out.channels[i];
      expect(c).toBeInstanceOf(Float32Array);
      expect(Array.from(c as Float32Array)).toEqual(Array.from(core.data[core.channelNames.indexOf(name)]));
      expect(c).not.toBe(core.data[core.channelNames.indexOf(name)]);
    });
    // The caller may transfer (here: zero) its copies; the next plan of that conditioning is unharmed.
    for (const c of out.channels) (c as Float32Array).fill(0);
    const held = { conditioning: out.conditioning, channels: ['C3', 'Oz'] };
    const again = planChannels(input, { ...filtered, baseline: { ...filtered.baseline, start: -0.3 } }, held);
    expect(again.conditioning).toBe(out.conditioning);
    expect(again.channels[0]).toBeNull();
    expect(again.channels[2]).toBeNull();
    expect(Array.from(again.channels[1] as Float32Array)).toEqual(Array.from(core.data[core.channelNames.indexOf('C4')]));
    // Another conditioning: what the caller holds is of no use, everything comes again.
    const other = planChannels(input, { ...filtered, filters: { highPass: { cutoffHz: 2 } } }, held);
    expect(other.conditioning).not.toBe(out.conditioning);
    expect(other.channels.every((c) => c instanceof Float32Array)).toBe(true);
  });
});
