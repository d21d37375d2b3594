import type { ChannelType, ChannelUnit } from './channel-types';

/**
 * The in-memory shape every reader produces and the analysis core consumes. Samples are in microvolts, one
 * Float32Array per channel, all at one sample rate. Events carry onset and duration in seconds from the first
 * sample, and a label (EDF+ annotation text or the BIDS `trial_type`).
 */
export interface RecordingEvent {
  onsetSeconds: number;
  durationSeconds: number;
  label: string;
}

export interface Recording {
  sampleRateHz: number;
  channelNames: string[];
  /** data[c][s] in µV; every channel has the same length. */
  data: Float32Array[];
  events: RecordingEvent[];
  /**
   * Discontinuities (EDF+D): [startSeconds, endSeconds) spans of recording time that hold no samples, expressed
   * on the sample axis as the sample index where a new continuous block begins. Epochs spanning one are dropped.
   */
  gapSampleIndices?: number[];
  /**
   * Each channel's type as the reader inferred it from the file (EDF+ type word, label, unit); when absent, the core
   * infers it from the channel name (`inferChannelType`). A recipe's `signals.types` changes it.
   */
  channelTypes?: ChannelType[];
  /** Each channel's unit: µV unless the reader kept an MEG unit (fT, fT/cm); absent means all µV. */
  channelUnits?: ChannelUnit[];
  /** SHA-256 of the file's bytes (lowercase hex) when the reader knows it; checked against a recipe's `recording`. */
  fingerprint?: string;
}
