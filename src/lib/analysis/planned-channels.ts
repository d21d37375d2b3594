import { conditionKey } from './condition-recording';
import type { RecipePlan } from './analyze-channel';
import { parseRecipe } from './recipe';
import type { Recording } from './recording';
import { planRun } from './run-recipe';

/** Conditioned channels a caller already holds from an earlier plan: their conditioning and names. */
export interface ConditionedHeld {
  conditioning: string;
  channels: readonly string[];
}

/**
 * A plan made away from its caller (a worker), shaped so the conditioned samples cross once: `plan.channelIndices`
 * index `channels` (0 … n − 1, in plan channel order), and each entry is the channel's conditioned samples (a copy
 * the caller owns and may transfer), the index of the input channel it equals sample for sample (conditioning left
 * it as recorded: the caller uses its own array), or null (the caller already holds it under `conditioning`).
 */
export interface PlannedChannels {
  plan: RecipePlan;
  /** `conditionKey` of the recipe: two recipes with the same key condition the recording alike. */
  conditioning: string;
  channels: (Float32Array | number | null)[];
}

/**
 * `planRun` (conditioning, epoch decisions, grids; throws AnalysisInputError naming the field) with its conditioned
 * recording reduced to the planned channels, leaving out what the caller has: its own input channels and the
 * conditioned channels it `held` from an earlier plan of the same conditioning.
 */
export function planChannels(input: Recording, recipe: unknown, held: ConditionedHeld | null): PlannedChannels {
  const { plan, recording } = planRun(input, recipe);
  const conditioning = conditionKey(parseRecipe(recipe));
  const inputIndex = new Map<Float32Array, number>();
  input.data.forEach((d, k) => inputIndex.set(d, k));
  const known = new Set(held !== null && held.conditioning === conditioning ? held.channels : []);
  const channels = plan.channels.map((name, i) => {
    const samples = recording.data[plan.channelIndices[i]];
    const k = inputIndex.get(samples);
    if (k !== undefined) return k;
    if (known.has(name)) return null;
    // A copy: conditionRecording keeps its own for the next plan of this conditioning.
    return samples.slice();
  });
  return { plan: { ...plan, channelIndices: plan.channels.map((_, i) => i) }, conditioning, channels };
}
