import * as Comlink from 'comlink';
import type { RecipePlan } from '../analysis/analyze-channel';
import { AnalysisInputError } from '../analysis/errors';
import type { Recording } from '../analysis/recording';
import type { PlanApi, PlanReply } from '../../../workers/plan-api';
import type { PoolWorker } from '../../../workers/pool-worker';
import { webPoolWorker } from './web-worker';

/**
 * A recipe's plan and the recording its channel indices point into: the input as the recipe conditions it (types,
 * bad channels, reference, filters). From the planner, that recording holds the planned channels only (in plan
 * order); from `planRun` (Node, tests), all of them. Either way `recording.data[plan.channelIndices[i]]` is channel i.
 */
export interface PlannedRecipe {
  plan: RecipePlan;
  recording: Recording;
}

export interface PlannerOptions {
  /** Injected for tests; default a module Web Worker of workers/plan.worker.ts. */
  createWorker?: () => PoolWorker;
}

function browserWorker(): PoolWorker {
  return webPoolWorker(new Worker(new URL('../../../workers/plan.worker.ts', import.meta.url), { type: 'module' }), 'its script did not load (a network error or a syntax error in the worker bundle)');
}

interface Started {
  worker: PoolWorker;
  remote: Comlink.Remote<PlanApi>;
  /** Rejects when the worker fails outside any answer (script not loaded, error escaped) or is ended. */
  failed: Promise<never>;
  fail: (error: Error) => void;
}

/**
 * Plans recipes in a worker of its own (`planRun` scans every sample: conditioning, epoch decisions), so the main
 * thread never does. The worker gets the recording once (one channel per message, so no single message blocks this
 * thread long: the page's own shared samples on a cross-origin-isolated page, else copies) and keeps it for every
 * later recipe. Conditioned samples come back transferred, only
 * for channels the conditioning changed and this side does not hold yet: a channel left as recorded is the
 * recording's own array, and a recipe that conditions alike (another baseline, grid or rejection) reuses the arrays
 * of the plan before. Calls run one at a time, in order.
 */
export class RecipePlanner {
  private readonly createWorker: () => PoolWorker;
  private started: Started | null = null;
  /** The recording the worker holds. */
  private held: Recording | null = null;
  /** Conditioned channels received for `held` under one conditioning. */
  private kept: { conditioning: string; channels: Map<string, Float32Array> } | null = null;
  private queue: Promise<unknown> = Promise.resolve();

  constructor(options: PlannerOptions = {}) {
    this.createWorker = options.createWorker ?? browserWorker;
  }

  /** The plan of `recipe` on `recording`; rejects with AnalysisInputError (field, problem) for a recipe that does not fit. */
  plan(recording: Recording, recipe: unknown): Promise<PlannedRecipe> {
    const next = this.queue.then(() => this.planNow(recording, recipe));
    this.queue = next.catch(() => undefined);
    return next;
  }

  /** Ends the worker (and its hold on the recording); a plan under way rejects; the next plan starts a new worker. */
  terminate(): void {
    const s = this.started;
    this.started = null;
    this.held = null;
    this.kept = null;
    if (s === null) return;
    s.fail(new Error('the plan worker was ended before it answered'));
    try {
      s.remote[Comlink.releaseProxy]();
    } catch {
      // an endpoint already closed: the worker is ended below either way
    }
    s.worker.terminate();
  }

  private start(): Started {
    if (this.started !== null) return this.started;
    const worker = this.createWorker();
    let fail: (error: Error) => void = () => undefined;
    const failed = new Promise<never>((_, reject) => (fail = reject));
    failed.catch(() => undefined);
    const started: Started = { worker, remote: Comlink.wrap<PlanApi>(worker.endpoint), failed, fail: (error) => fail(error) };
    worker.onFailure?.((problem) => {
      fail(new Error(`the plan worker failed: ${problem}`));
      if (this.started === started) this.terminate();
    });
    this.started = started;
    return started;
  }

  private async planNow(recording: Recording, recipe: unknown): Promise<PlannedRecipe> {
    const s = this.start();
    const call = <T>(p: Promise<T>): Promise<T> => Promise.race([p, s.failed]);
    if (this.held !== recording) {
      this.held = null;
      this.kept = null;
      const { data, ...header } = recording;
      await call(s.remote.hold(header, data.length));
      for (let k = 0; k < data.length; k++) await call(s.remote.holdChannel(k, data[k]));
      this.held = recording;
    }
    const known = this.kept === null ? null : { conditioning: this.kept.conditioning, channels: [...this.kept.channels.keys()] };
    // comlink's Remote spreads a union answer over two promises; it is one answer.
    const reply = await call(s.remote.plan(recipe, known) as Promise<PlanReply>);
    if (!reply.ok) throw new AnalysisInputError(reply.field, reply.problem);
    const { plan, conditioning, channels } = reply;
    if (this.kept === null || this.kept.conditioning !== conditioning) this.kept = { conditioning, channels: new Map() };
    const kept = this.kept.channels;
    const data = channels.map((c, i) => {
      const name = plan.channels[i];
      if (typeof c === 'number') return recording.data[c];
      if (c === null) {
        const have = kept.get(name);
        if (have === undefined) throw new Error(`the plan worker left out channel "${name}", which this side does not hold`);
        return have;
      }
      kept.set(name, c);
      return c;
    });
    return {
      plan,
      recording: {
        sampleRateHz: recording.sampleRateHz,
        channelNames: plan.channels.slice(),
        data,
        events: recording.events,
        channelTypes: plan.channelTypes.slice(),
        channelUnits: plan.channelUnits.slice(),
        ...(recording.gapSampleIndices !== undefined ? { gapSampleIndices: recording.gapSampleIndices } : {}),
        ...(recording.fingerprint !== undefined ? { fingerprint: recording.fingerprint } : {}),
      },
    };
  }
}

/**
 * `planned` for one of its channels: the same epochs, grids and baseline (none of them depends on which channels
 * are analysed), so a single-channel run of it gives that channel's numbers without planning again.
 */
export function plannedChannel(planned: PlannedRecipe, channel: string): PlannedRecipe {
  const { plan } = planned;
  const i = plan.channels.indexOf(channel);
  if (i < 0) throw new Error(`channel "${channel}" is not among the planned channels`);
  return {
    plan: { ...plan, channels: [channel], channelIndices: [plan.channelIndices[i]], channelTypes: [plan.channelTypes[i]], channelUnits: [plan.channelUnits[i]] },
    recording: planned.recording,
  };
}
