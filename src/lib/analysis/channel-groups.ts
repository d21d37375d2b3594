import { AnalysisInputError } from './errors';

/** A named set of channels whose maps are averaged (a region). */
export interface ChannelGroup {
  name: string;
  channels: string[];
}

// Default regions by 10-20 / 10-10 electrode names (the names encode the position: F frontal, C central, P parietal,
// O occipital, z midline, odd left, even right; common practice). Only the channels a recording has are used.
const DEFAULTS: ChannelGroup[] = [
  { name: 'frontal midline', channels: ['Fpz', 'AFz', 'Fz', 'FCz', 'F1', 'F2'] },
  { name: 'left central', channels: ['C3', 'C1', 'C5', 'FC3', 'CP3', 'FC1', 'CP1'] },
  { name: 'right central', channels: ['C4', 'C2', 'C6', 'FC4', 'CP4', 'FC2', 'CP2'] },
  { name: 'parietal midline', channels: ['CPz', 'Pz', 'P1', 'P2', 'POz'] },
  { name: 'occipital', channels: ['O1', 'Oz', 'O2', 'PO3', 'PO4', 'PO7', 'PO8', 'Iz'] },
];

/** The default regions present in a recording (case-insensitive names; groups with no channel present are left out). */
export function defaultChannelGroups(channels: readonly string[]): ChannelGroup[] {
  const byLower = new Map(channels.map((c) => [c.trim().toLowerCase(), c]));
  const out: ChannelGroup[] = [];
  for (const g of DEFAULTS) {
    const present = g.channels.map((c) => byLower.get(c.toLowerCase())).filter((c): c is string => c !== undefined);
    if (present.length > 0) out.push({ name: g.name, channels: present });
  }
  return out;
}

/** Plan channel indices of a group; an unknown or repeated channel is an error naming the group and field. */
export function groupIndices(group: ChannelGroup, channels: readonly string[], field = 'channelGroups'): number[] {
  if (group.channels.length === 0) throw new AnalysisInputError(`${field}["${group.name}"]`, 'must list at least one channel');
  return group.channels.map((name, i) => {
    const idx = channels.indexOf(name);
    if (idx < 0) throw new AnalysisInputError(`${field}["${group.name}"][${i}]`, `"${name}" is not an analysed channel (${channels.slice(0, 12).join(', ')}${channels.length > 12 ? ', …' : ''})`);
    if (group.channels.indexOf(name) !== i) throw new AnalysisInputError(`${field}["${group.name}"][${i}]`, `repeats "${name}"`);
    return idx;
  });
}

/**
 * A region's map: the mean over its channels of their maps (normalized maps, power or phase consistency; every map
 * the same length), summed in channel order. Non-finite cells stay non-finite.
 */
export function groupMap(maps: readonly ArrayLike<number>[], indices: readonly number[]): Float64Array {
  const size = maps[indices[0]].length;
  const out = new Float64Array(size);
  for (const c of indices) {
    const m = maps[c];
    for (let i = 0; i < size; i++) out[i] += m[i];
  }
  for (let i = 0; i < size; i++) out[i] /= indices.length;
  return out;
}
