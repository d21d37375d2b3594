import { defaultChannelGroups, type ChannelGroup } from '../../analysis/channel-groups';

/**
 * The default regions (frontal midline, left/right central, parietal midline, occipital) among `channels`, for the
 * Recipe screen's group editor. A module of its own so the Recipe screen does not pull the Maps screen's maths into
 * the workspace island's chunk.
 */
export function defaultGroupsFor(channels: readonly string[]): ChannelGroup[] {
  return defaultChannelGroups(channels);
}
