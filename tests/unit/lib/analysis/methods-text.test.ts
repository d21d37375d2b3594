// The generated methods paragraph (issue "Beyond one channel's power", item 5): every numeric recipe field that
// changes the numbers is named with its value, the resolution at both ends of the grid, trials kept per condition,
// and the published sources of the methods used.
import { describe, expect, it } from 'vitest';
import { methodsNumber, methodsParagraph } from '../../../../src/lib/analysis/methods-text';
import { parseRecipe } from '../../../../src/lib/analysis/recipe';
import { runRecipe } from '../../../../src/lib/analysis/run-recipe';
import { seededNormal } from '../../../helpers/seeded-random';

// A scenario of our own: three channels at 250 Hz, "bell" and "drum" cues every 3 s.
const fs = 250;
const normal = seededNormal(12);
const names = ['Fz', 'Cz', 'Pz'];
const data = names.map(() => Float32Array.from({ length: 60 * fs }, () => 10 * normal()));
const events = Array.from({ length: 18 }, (_, k) => ({ onsetSeconds: 2 + 3 * k, durationSeconds: 0, label: k % 2 === 0 ? 'bell' : 'drum' }));
const recording = { sampleRateHz: fs, channelNames: names, data, events };

const input = {
  format: 2,
  epochs: { events: ['bell', 'drum'], start: -0.8, end: 1.2 },
  frequencies: { min: 3, max: 45, count: 24, spacing: 'log' },
  cycles: { min: 3, max: 9 },
  baseline: { start: -0.6, end: -0.2, method: 'percent-change', scope: 'trial' },
  spectrum: { segment: 1.5, overlap: 0.25, range: [1, 60], source: 'recording' },
  aperiodic: { range: [2.5, 40], model: 'power-law' },
  reference: { kind: 'common-average' },
  filters: { highPass: { cutoffHz: 0.3, order: 4 }, notch: { lineHz: 50, harmonics: 2, q: 25 } },
  rejection: { peakToPeakMicrovolts: 180, flatMicrovolts: 0.2, scope: 'any', overrides: {} },
  itpc: true,
  trialPower: 'induced',
};

// Every number in the recipe, with its path (the recipe's own leaves, walked generically).
function numericLeaves(x: unknown, path = ''): [string, number][] {
  if (typeof x === 'number') return [[path, x]];
  if (Array.isArray(x)) return x.flatMap((v, i) => numericLeaves(v, `${path}[${i}]`));
  if (x !== null && typeof x === 'object') return Object.entries(x).flatMap(([k, v]) => numericLeaves(v, path ? `${path}.${k}` : k));
  return [];
}

describe('methods paragraph', () => {
  const recipe = parseRecipe(input);
  const result = runRecipe(recording as never, input);
  const { paragraph, references } = methodsParagraph(recipe, result);

  it('names every numeric recipe field with its value', () => {
    const leaves = numericLeaves(recipe).filter(([p]) => p !== 'format');
    expect(leaves.length).toBeGreaterThan(15);
    for (const [path, value] of leaves) {
      // the overlap is written as a percentage (25 %), every other value as itself
      const shown = path === 'spectrum.overlap' ? `${methodsNumber(value * 100)} %` : methodsNumber(value);
      expect(paragraph, `${path} = ${value}`).toContain(shown);
    }
  });

  it('gives the resolution at the lowest and highest frequency, the trials kept and the options used', () => {
    const last = result.frequencies.length - 1;
    for (const v of [result.temporalFwhmSeconds[0], result.spectralFwhmHz[0], result.temporalFwhmSeconds[last], result.spectralFwhmHz[last]]) {
      expect(paragraph).toContain(methodsNumber(v, 3));
    }
    for (const [label, c] of Object.entries(result.conditions)) expect(paragraph).toContain(`${label}: ${c.trials} kept`);
    expect(paragraph).toMatch(/common average/);
    expect(paragraph).toMatch(/Induced power/);
    expect(paragraph).toMatch(/phase consistency/);
    expect(paragraph).toMatch(/not for clinical decisions/);
  });

  it('cites each method it uses, and only those', () => {
    for (const who of ['Cohen', 'Welch', 'Harris', 'Donoghue', 'Lachaux', 'Tallon-Baudry', 'Butterworth']) {
      expect(references.some((r) => r.startsWith(who)), who).toBe(true);
      expect(paragraph).toContain(who);
    }
    const plain = parseRecipe({ ...input, itpc: undefined, trialPower: undefined, filters: undefined });
    const refs = methodsParagraph(plain, result).references;
    expect(refs.some((r) => r.startsWith('Lachaux'))).toBe(false);
    expect(refs.some((r) => r.startsWith('Butterworth'))).toBe(false);
  });

  it('writes numbers without float noise', () => {
    if (process.env.SHOW_METHODS) console.log(paragraph);
    expect(methodsNumber(-0.31399999999999995)).toBe('-0.314');
    expect(methodsNumber(0.1 + 0.2)).toBe('0.3');
    expect(paragraph).not.toMatch(/\.\d*(0{5,}|9{5,})\d/);
  });
});
