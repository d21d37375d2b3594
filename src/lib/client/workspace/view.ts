import type { BaselineMethod, BaselineScope, BaselineSpread } from '../../analysis/baseline';

export interface Band {
  name: string;
  lowHz: number;
  highHz: number;
}

export interface TimeWindow {
  name: string;
  startSeconds: number;
  endSeconds: number;
}

/** Defaults of common practice for EEG bands (theta 4–8, alpha 8–13, beta 13–30, gamma 30–45 Hz). */
export const DEFAULT_BANDS: Band[] = [
  { name: 'theta', lowHz: 4, highHz: 8 },
  { name: 'alpha', lowHz: 8, highHz: 13 },
  { name: 'beta', lowHz: 13, highHz: 30 },
  { name: 'gamma', lowHz: 30, highHz: 45 },
];

export const DEFAULT_WINDOWS: TimeWindow[] = [
  { name: 'early', startSeconds: 0.1, endSeconds: 0.5 },
  { name: 'late', startSeconds: 0.5, endSeconds: 1.0 },
];

export type SpectrumAxes = 'linear' | 'log-power' | 'log-log';

/**
 * What the explorer shows and how: the selection (channel, condition, comparison), the live baseline and the
 * display choices. Changing anything here re-normalizes and repaints; nothing here re-runs the decomposition.
 * The workspace store (store.ts) holds these fields beside the recipe's.
 */
export interface ViewSettings {
  channel: string | null;
  condition: string | null;
  /** Condition B of the difference map A − B; null shows condition A alone. */
  compareTo: string | null;
  /** A channel group (region) shown on the Maps screen in place of `channel`; null shows the one channel. */
  channelGroup: string | null;
  /** How A − B is normalized: each condition against its own baseline, or both against their shared one. */
  contrastBaseline: 'own' | 'shared';
  baseline: { start: number; end: number };
  method: BaselineMethod;
  scope: BaselineScope;
  /** For z-scores: S over the baseline's time points or across trials (recipe `baseline.spread`). */
  spread: BaselineSpread;
  rawScale: 'linear' | 'log';
  spectrumAxes: SpectrumAxes;
  /** Aperiodic fit range in Hz, dragged on the spectrum's frequency axis. */
  fitRange: [number, number];
  bands: Band[];
  windows: TimeWindow[];
  /**
   * Colour limits held fixed while other channels and conditions are shown, so panels can be compared; `key` names
   * what they were taken for (method, difference or not, raw scale), and they apply only while that matches.
   */
  heldLimits: { key: string; raw: [number, number]; normalized: [number, number] } | null;
}

export const DEFAULT_VIEW: ViewSettings = {
  channel: null,
  condition: null,
  compareTo: null,
  channelGroup: null,
  contrastBaseline: 'own',
  baseline: { start: -0.5, end: -0.2 },
  method: 'decibel',
  scope: 'average',
  spread: 'time',
  rawScale: 'log',
  spectrumAxes: 'log-log',
  fitRange: [2, 40],
  bands: DEFAULT_BANDS,
  windows: DEFAULT_WINDOWS,
  heldLimits: null,
};
