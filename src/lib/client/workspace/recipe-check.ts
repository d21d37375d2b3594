import { useEffect } from 'react';
import { create } from 'zustand';
import type { RecipeInput } from '../../analysis/recipe';
import type { Recording } from '../../analysis/recording';
import { checkRecipe, planKey, type RecipeProblem } from './results';

/** The latest verdict on a recipe: the plan key it is for and the core's problem (null: the recipe fits). */
const useVerdict = create<{ key: string | null; problem: RecipeProblem | null }>(() => ({ key: null, problem: null }));

// Checks run one at a time, latest first: while one plan is made, only the newest recipe waits (typing a number makes
// a recipe per keystroke; the ones overtaken get no verdict, and no plan).
let checking = false;
let waiting: (() => Promise<void>) | null = null;

async function pump(): Promise<void> {
  checking = true;
  try {
    while (waiting !== null) {
      const job = waiting;
      waiting = null;
      await job();
    }
  } finally {
    checking = false;
  }
}

/**
 * The Recipe screen's check of `recipe` against the open recording, while `enabled`: the recipe's plan is made in the
 * plan worker (and kept for the run that follows), and its problem, if any, arrives when the plan does. Null while
 * the plan is being made, when the recipe fits, and when not enabled.
 */
export function useRecipeCheck(recording: Recording | null, recordingId: string | null, recipe: RecipeInput, enabled: boolean): RecipeProblem | null {
  const key = enabled && recording !== null && recordingId !== null ? planKey(recordingId, recipe) : null;
  const problem = useVerdict((s) => (key !== null && s.key === key ? s.problem : null));
  useEffect(() => {
    if (key === null || recording === null || recordingId === null) return;
    waiting = () => checkRecipe(recording, recordingId, recipe).then((p) => useVerdict.setState({ key, problem: p }));
    if (!checking) void pump();
    // The key stands for the recipe (its JSON) and the recording id.
    // eslint-disable-next-line react-hooks/exhaustive-deps
  }, [key, recording]);
  return problem;
}
