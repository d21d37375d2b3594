// The README's example recipe must keep working: it parses, and the command line runs it on a demo subject (a short
// one from the same generator), recovering the generator's declared aperiodic exponents at its three channels.
import { execFileSync } from 'node:child_process';
import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { describe, expect, it, vi } from 'vitest';
import { readRecipe } from '../../../src/lib/analysis/recipe';
import { describeCohort, writeSubjectEdf } from '../../../src/lib/demo';

// These tests start the command line in a child process (tsx), several runs per test: on a loaded two-core
// machine one run alone has taken 15 s, so they get more than the suite's 30 s.
vi.setConfig({ testTimeout: 120_000 });

const recipePath = path.resolve('public/recipes/harbour-lights.json');

describe('public/recipes/harbour-lights.json', () => {
  it('parses with the recipe schema as format 2, with no upgrade notice', () => {
    const { recipe, notice } = readRecipe(JSON.parse(readFileSync(recipePath, 'utf8')));
    expect(notice).toBeNull();
    expect(recipe.format).toBe(2);
    expect(recipe.channels).toEqual(['Fz', 'Cz', 'Pz']);
  });

  it('runs on a demo subject through the command line', () => {
    const subject = describeCohort({ subjects: 1, seconds: 120 }).subjects[0];
    const dir = mkdtempSync(path.join(tmpdir(), 'tidemark-example-'));
    const edf = path.join(dir, 'subject.edf');
    writeFileSync(edf, writeSubjectEdf(subject));
    const out = path.join(dir, 'result.json');
    execFileSync(process.execPath, ['--import', 'tsx', 'src/cli/analyze.ts', edf, '--recipe', recipePath, '--out', out], { stdio: 'pipe' });
    const result = JSON.parse(readFileSync(out, 'utf8'));
    expect(Object.keys(result.conditions).sort()).toEqual(['lamp-watch', 'oar-pull']);
    for (const fit of result.aperiodic) {
      const declared = subject.exponents[subject.channels.indexOf(fit.channel)];
      // Recovery within ±0.15 of the synthesized exponent, the bound issue 3 sets for spectra with peaks.
      expect(Math.abs(fit.exponent - declared)).toBeLessThan(0.15);
    }
  }, 60_000);
});
