// Test and benchmark hooks, installed only when the page URL carries `?testhooks`: they fill the Source store with
// a synthetic demo recording (the invented Harbour Lights scenario, generated in this tab) and expose the stores.
// Nothing here reads or sends a real recording.
import { describeCohort, synthesizeSubject } from '../../lib/demo/cohort';
import { useResultsStore } from '../../lib/client/workspace/results';
import { runPoolOnOpenRecording } from './pool-test-hook';
import { useWorkspace } from '../../lib/client/workspace/store';
import { lateFingerprintSeam } from '../../lib/client/intake';

export interface DemoLoadOptions {
  seconds?: number;
  seed?: number;
  subject?: number;
  /** Keep only these channels (fewer channels, faster tests). */
  channels?: string[];
  epochStart?: number;
  epochEnd?: number;
  /** Pool both conditions into one named `all` (the benchmark's many-trial condition). */
  pooled?: boolean;
}

/** The demo subject as a Recording, the same in Node and in the browser (pure functions of the seed). */
export function demoRecording(options: DemoLoadOptions = {}) {
  const cohort = describeCohort({ seed: options.seed, subjects: (options.subject ?? 0) + 1, seconds: options.seconds ?? 60 });
  const p = cohort.subjects[options.subject ?? 0];
  const { data, events } = synthesizeSubject(p);
  const keep = options.channels ?? p.channels;
  const idx = keep.map((name) => p.channels.indexOf(name));
  return {
    parameters: p,
    recording: { sampleRateHz: p.sampleRateHz, channelNames: keep, data: idx.map((i) => data[i]), events },
  };
}

/** Loads the demo into the Source store through its own actions, as the Source screen would. */
export function loadDemo(options: DemoLoadOptions = {}) {
  const { parameters, recording } = demoRecording(options);
  const workspace = useWorkspace.getState();
  workspace.load({
    recording,
    local: {
      fileName: parameters.fileName,
      sizeBytes: 0,
      format: 'edf+c',
      identifying: null,
      startDateTime: null,
      ignoredSignals: [],
      warnings: [],
    },
    fingerprint: `demo-${parameters.seed}-${parameters.seconds}-${recording.channelNames.join('.')}`,
  });
  useWorkspace.getState().setEpochWindow({ start: options.epochStart ?? -0.5, end: options.epochEnd ?? 1.5 });
  useWorkspace
    .getState()
    .setConditions(options.pooled ? [{ name: 'all', labels: ['lamp-watch', 'oar-pull'] }] : [{ name: 'lamp-watch', labels: ['lamp-watch'] }, { name: 'oar-pull', labels: ['oar-pull'] }]);
  const s = useWorkspace.getState();
  return { channels: recording.channelNames, decisions: s.decisions.length, kept: s.decisions.filter((d) => !d.rejected).length, settingsError: s.settingsError };
}

let releaseFingerprints: (() => void) | null = null;

/**
 * Late fingerprints on demand: `holdFrom(0)` makes every EDF opened from then on shown before its SHA-256 is known
 * and holds that fingerprint until `release()` (as a 500 MB file's hashing would take its time).
 */
export const fingerprintHooks = {
  holdFrom(bytes: number): void {
    lateFingerprintSeam.fromBytes = bytes;
    lateFingerprintSeam.held ??= new Promise<void>((resolve) => (releaseFingerprints = resolve));
  },
  release(): void {
    releaseFingerprints?.();
    releaseFingerprints = null;
    lateFingerprintSeam.held = null;
  },
};

declare global {
  interface Window {
    __tidemark?: {
      loadDemo: typeof loadDemo;
      runPool: typeof runPoolOnOpenRecording;
      fingerprints: typeof fingerprintHooks;
      stores: { workspace: typeof useWorkspace; results: typeof useResultsStore };
    };
  }
}

export function installTestHooks(): void {
  if (typeof window === 'undefined' || window.__tidemark !== undefined) return;
  if (!new URLSearchParams(window.location.search).has('testhooks')) return;
  window.__tidemark = { loadDemo, runPool: runPoolOnOpenRecording, fingerprints: fingerprintHooks, stores: { workspace: useWorkspace, results: useResultsStore } };
}
