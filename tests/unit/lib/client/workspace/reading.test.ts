import { describe, expect, it } from 'vitest';
import { parseRecipe } from '../../../../../src/lib/analysis/recipe';
import { applyRecipe, describeReading } from '../../../../../src/lib/client/workspace/apply-recipe';
import { DEFAULT_DRAFT, toRecipe } from '../../../../../src/lib/client/workspace/recipe';
import { defaultRejection } from '../../../../../src/lib/client/workspace/source-rules';

// Scenario of our own: one EEG channel plus a pulse sensor read as µV × 2.5, a breathing belt left out.
const source = { draft: DEFAULT_DRAFT, conditions: [{ name: 'bell', labels: ['bell'] }], epochWindow: { start: -1, end: 2 }, rejection: defaultRejection, fitRange: [2, 40] as const };
const baseline = { baseline: { start: -0.5, end: -0.2 }, method: 'decibel' as const, scope: 'average' as const };
const fingerprint = 'b'.repeat(64);
const recording = {
  sampleRateHz: 100,
  channelNames: ['Fz', 'Pleth'],
  data: [Float32Array.from({ length: 2000 }, (_, i) => Math.sin(i / 3)), Float32Array.from({ length: 2000 }, (_, i) => Math.cos(i / 5))],
  events: [{ onsetSeconds: 5, durationSeconds: 0, label: 'bell' }],
};

describe('reading choices in the recipe', () => {
  it('toRecipe writes recording.units and recording.exclude beside the fingerprint, and the schema takes them back', () => {
    const recipe = toRecipe({ ...source, ...baseline, fingerprint, local: { reading: { unitFactors: { '%': 2.5 }, exclude: ['Resp'] } } });
    expect(recipe.recording).toEqual({ fingerprint, units: { '%': 2.5 }, exclude: ['Resp'] });
    expect(parseRecipe(recipe).recording).toEqual({ fingerprint, units: { '%': 2.5 }, exclude: ['Resp'] });
  });

  it('toRecipe leaves recording out when there is neither a fingerprint nor a choice, and writes no empty fields', () => {
    expect('recording' in toRecipe({ ...source, ...baseline, fingerprint: null, local: { reading: { unitFactors: {}, exclude: [] } } })).toBe(false);
    expect(toRecipe({ ...source, ...baseline, fingerprint: null, local: { reading: { exclude: ['Resp'] } } }).recording).toEqual({ exclude: ['Resp'] });
  });

  it('loading a recipe that reads the file differently says so, and the same choices say nothing', () => {
    const recipe = toRecipe({ ...source, ...baseline, fingerprint, local: { reading: { unitFactors: { '%': 2.5 }, exclude: ['Resp'] } } });
    const same = applyRecipe(recipe, recording, fingerprint, { exclude: ['Resp'], unitFactors: { '%': 2.5 } });
    expect(same).toEqual({ ok: true, notices: [] });
    const other = applyRecipe(recipe, recording, fingerprint, { exclude: ['Resp'], unitFactors: { '%': 1 } });
    expect(other.ok && other.notices).toEqual([
      'This recipe reads the file with "%" × 2.5 µV; "Resp" left out; the open recording was read with "%" × 1 µV; "Resp" left out. Open the file again with the recipe\'s choices to get its numbers.',
    ]);
    expect(describeReading(null)).toBe('the built-in units only');
  });
});

describe('recipe formats in the browser', () => {
  it('exports format 2 and loads it back with no notice', () => {
    const recipe = toRecipe({ ...source, ...baseline, fingerprint });
    expect(recipe.format).toBe(2);
    expect(recipe.epochs).toMatchObject({ start: -1, end: 2 });
    expect(recipe.aperiodic).toEqual({ range: [2, 40], model: 'power-law' });
    expect(applyRecipe(recipe, recording, fingerprint)).toEqual({ ok: true, notices: [] });
  });

  it('loads a format-1 recipe with a visible note that it was upgraded (analysis contract), and the same settings', () => {
    const two = toRecipe({ ...source, ...baseline, fingerprint, method: 'z-score' });
    const { format: _f, ...rest } = two;
    const one = { ...rest, epochs: { events: two.epochs.events, tmin: -1, tmax: 2 }, baseline: { ...two.baseline, method: 'zscore' }, aperiodic: { range: [2, 40], mode: 'fixed' } };
    const outcome = applyRecipe(one, recording, fingerprint);
    expect(outcome.ok).toBe(true);
    expect(outcome.ok && outcome.notices).toEqual([expect.stringMatching(/^This recipe is in format 1 .*upgraded .*Export recipe JSON writes it in format 2\.$/)]);
    expect(parseRecipe(one)).toEqual(parseRecipe(two));
  });
});
