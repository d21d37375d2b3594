// The Maps screen's panels as the painters take them: the controller's values and limits (map-view.ts, maps.ts)
// with the look's colour scales (GLOSSARY.md: cividis for raw power, a diverging scale for normalized power).
import type { BaselineMethod } from '../../lib/analysis/baseline';
import { consistencyColormap, divergingColormap, sequentialColormap } from '../../lib/plot/colormap';
import { methodUnit } from '../../lib/plot/colour-scale';
import type { PanelSpec } from '../../lib/plot/panel';
import { itpcOf, rayleighMarks } from '../../lib/client/workspace/maps';
import { rawMapOf, type MapSelection, type NormalizedMap } from '../../lib/client/workspace/map-view';
import type { Decomposition } from '../../lib/client/workspace/results';

const grid = (d: Decomposition) => ({ times: d.times, frequencies: d.frequencies, spacing: d.spacing, edges: d.edges });

/** Raw (or induced) power of the selection, A − B on a diverging scale for a difference. */
export function rawSpecOf(d: Decomposition, s: MapSelection, rawScale: 'linear' | 'log', held: [number, number] | null): PanelSpec {
  const raw = rawMapOf(d, s, rawScale, held);
  return { ...grid(d), title: raw.title, unit: 'µV²', values: raw.values, colormap: s.b >= 0 ? divergingColormap() : sequentialColormap(), scale: { domain: raw.domain, kind: raw.kind } };
}

/** The normalized map on the diverging scale, in the method's unit. */
export function normalizedSpecOf(d: Decomposition, n: NormalizedMap, method: BaselineMethod): PanelSpec {
  return { ...grid(d), title: n.title, unit: methodUnit(method), values: n.values, colormap: divergingColormap(), scale: { domain: n.domain, kind: n.kind } };
}

/** Phase consistency of condition A on its own 0–1 scale; Rayleigh p < 0.05 outlined for a single channel. */
export function itpcSpecOf(d: Decomposition, s: MapSelection): PanelSpec | null {
  const values = itpcOf(d, s.indices, s.a);
  if (values === null) return null;
  return {
    ...grid(d),
    title: `ITPC · ${d.labels[s.a]} · ${s.where}`,
    unit: 'ITPC',
    values,
    colormap: consistencyColormap(),
    scale: { domain: [0, 1], kind: 'linear' },
    outline: s.indices.length === 1 ? rayleighMarks(values, d.trials[s.a]) : null,
  };
}
