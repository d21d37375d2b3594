// The plan worker's API, apart from its entry file so the browser entry and tests expose the same object. It keeps
// one recording (sent once, channel by channel) and plans recipes on it with the core's `planChannels`; wiring only.
import * as Comlink from 'comlink';
import { AnalysisInputError } from '../src/lib/analysis/errors';
import { planChannels, type ConditionedHeld, type PlannedChannels } from '../src/lib/analysis/planned-channels';
import type { Recording } from '../src/lib/analysis/recording';

/** A plan, or the field and problem of the AnalysisInputError that refused it (comlink would keep only a message). */
export type PlanReply = ({ ok: true } & PlannedChannels) | { ok: false; field: string; problem: string };

export function planApi() {
  let held: Recording | null = null;
  return {
    /** Starts holding a new recording: everything but its samples, which follow with `holdChannel`. */
    hold(recording: Omit<Recording, 'data'>, channels: number): void {
      held = { ...recording, data: new Array<Float32Array>(channels) };
    },
    holdChannel(index: number, samples: Float32Array): void {
      if (held === null) throw new Error('the plan worker holds no recording: hold() comes first');
      held.data[index] = samples;
    },
    plan(recipe: unknown, known: ConditionedHeld | null): PlanReply {
      if (held === null) throw new Error('the plan worker holds no recording: hold() comes first');
      try {
        const out = planChannels(held, recipe, known);
        const copies = out.channels.filter((c): c is Float32Array => c instanceof Float32Array);
        return Comlink.transfer({ ok: true as const, ...out }, copies.map((c) => c.buffer as ArrayBuffer));
      } catch (error) {
        if (error instanceof AnalysisInputError) return { ok: false, field: error.field, problem: error.problem };
        throw error;
      }
    },
  };
}

export type PlanApi = ReturnType<typeof planApi>;
