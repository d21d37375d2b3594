import { methodsParagraph, type MethodsText } from '../../analysis/methods-text';
import { parseRecipe, type RecipeInput } from '../../analysis/recipe';
import { gaussianSigmas, resolutionOf } from '../../analysis/wavelet';
import type { AnalysisResult } from '../../analysis/run-recipe';
import type { Decomposition } from './results';
import { exportedRecipe } from './maps';
import type { WorkspaceData } from './store';

export type { MethodsText };

/** The view settings that change the numbers after a run: the live baseline and the aperiodic fit range. */
export type LiveSettings = Pick<WorkspaceData, 'baseline' | 'method' | 'scope' | 'spread' | 'fitRange'>;

/**
 * The decomposition's recipe with the live baseline and fit range: the recipe the Maps screen exports
 * (`exportedRecipe`), so the paragraph describes exactly the recipe.json a reader would rerun.
 */
export function liveRecipe(d: Decomposition, live: LiveSettings): RecipeInput {
  return exportedRecipe(d, { baseline: live.baseline, method: live.method, scope: live.scope, spreadTrials: live.method === 'z-score' && live.spread === 'trials', fitRange: live.fitRange });
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
