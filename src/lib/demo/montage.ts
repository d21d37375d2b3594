/**
 * The demo's 32 electrodes: 10-20 system names (common practice for a 32-channel cap) with rough 2-D scalp
 * positions (nose up, left ear at x = −1), drawn by hand for the demo only; they shape the effects' topography.
 */
export const DEMO_CHANNELS: readonly { name: string; x: number; y: number }[] = [
  { name: 'Fp1', x: -0.3, y: 0.9 }, { name: 'Fp2', x: 0.3, y: 0.9 },
  { name: 'F7', x: -0.75, y: 0.55 }, { name: 'F3', x: -0.4, y: 0.5 }, { name: 'Fz', x: 0, y: 0.45 },
  { name: 'F4', x: 0.4, y: 0.5 }, { name: 'F8', x: 0.75, y: 0.55 },
  { name: 'FC5', x: -0.65, y: 0.25 }, { name: 'FC1', x: -0.2, y: 0.22 }, { name: 'FC2', x: 0.2, y: 0.22 },
  { name: 'FC6', x: 0.65, y: 0.25 },
  { name: 'T7', x: -0.95, y: 0 }, { name: 'C3', x: -0.45, y: 0 }, { name: 'Cz', x: 0, y: 0 },
  { name: 'C4', x: 0.45, y: 0 }, { name: 'T8', x: 0.95, y: 0 },
  { name: 'TP9', x: -1, y: -0.35 }, { name: 'CP5', x: -0.65, y: -0.25 }, { name: 'CP1', x: -0.2, y: -0.22 },
  { name: 'CP2', x: 0.2, y: -0.22 }, { name: 'CP6', x: 0.65, y: -0.25 }, { name: 'TP10', x: 1, y: -0.35 },
  { name: 'P7', x: -0.75, y: -0.55 }, { name: 'P3', x: -0.4, y: -0.5 }, { name: 'Pz', x: 0, y: -0.45 },
  { name: 'P4', x: 0.4, y: -0.5 }, { name: 'P8', x: 0.75, y: -0.55 },
  { name: 'PO9', x: -0.55, y: -0.85 }, { name: 'O1', x: -0.3, y: -0.9 }, { name: 'Oz', x: 0, y: -0.95 },
  { name: 'O2', x: 0.3, y: -0.9 }, { name: 'PO10', x: 0.55, y: -0.85 },
];

/** Gaussian fall-off of an effect centred on `centre`: exp(−d²/(2σ²)) with d the distance on the sketch above. */
export function topographyGains(centre: string, sigma: number): number[] {
  const c = DEMO_CHANNELS.find((ch) => ch.name === centre);
  if (c === undefined) throw new Error(`unknown demo channel ${centre}`);
  return DEMO_CHANNELS.map((ch) => Math.exp(-((ch.x - c.x) ** 2 + (ch.y - c.y) ** 2) / (2 * sigma * sigma)));
}
