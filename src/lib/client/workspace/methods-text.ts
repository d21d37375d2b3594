import { methodsParagraph, type MethodsText } from '../../analysis/methods-text';
import { parseRecipe, type RecipeInput } from '../../analysis/recipe';
import { gaussianSigmas, resolutionOf } from '../../analysis/wavelet';
import type { AnalysisResult } from '../../analysis/run-recipe';
import type { Decomposition } from './results';
import type { WorkspaceData } from './store';

export type { MethodsText };

/** The view settings that change the numbers after a run: the live baseline and the aperiodic fit range. */
export type LiveSettings = Pick<WorkspaceData, 'baseline' | 'method' | 'scope' | 'spread' | 'fitRange'>;

/**
 * The decomposition's recipe with the live baseline and fit range: what the Maps screen exports as recipe.json and
 * what `npm run analyze` needs to give the numbers on screen.
 */
export function liveRecipe(d: Decomposition, live: LiveSettings): RecipeInput {
  const spreadTrials = live.method === 'z-score' && live.spread === 'trials';
  return {
    ...d.recipe,
    baseline: { start: live.baseline.start, end: live.baseline.end, method: live.method, scope: live.scope, ...(spreadTrials ? { spread: 'trials' as const } : {}) },
    aperiodic: { ...d.recipe.aperiodic, range: [live.fitRange[0], live.fitRange[1]] },
  };
}

/**
 * The methods paragraph (core `methodsParagraph`) of what is on screen: the live recipe, the decomposition's
 * channels, grid and kept trials, and each frequency's resolution from the core's own wavelet widths.
 */
export function methodsTextOf(d: Decomposition, live: LiveSettings): MethodsText {
  const recipe = parseRecipe(liveRecipe(d, live));
  const resolution = resolutionOf(gaussianSigmas(d.frequencies, recipe.cycles));
  const conditions: AnalysisResult['conditions'] = {};
  d.labels.forEach((label, c) => {
    conditions[label] = { trials: d.trials[c], rejected: d.rejected[c], dropped: d.dropped[c], power: [], normalized: [] };
  });
  const result: Pick<AnalysisResult, 'channels' | 'frequencies' | 'temporalFwhmSeconds' | 'spectralFwhmHz' | 'conditions'> = {
    channels: d.channels,
    frequencies: Array.from(d.frequencies),
    temporalFwhmSeconds: Array.from(resolution.temporalFwhmSeconds),
    spectralFwhmHz: Array.from(resolution.spectralFwhmHz),
    conditions,
  };
  return methodsParagraph(recipe, result as AnalysisResult);
}
