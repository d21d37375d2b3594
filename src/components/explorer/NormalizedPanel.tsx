import { useMemo, type ReactNode } from 'react';
import MapPanel, { type MapGeometry } from './MapPanel';
import { normalizedSpecOf } from './map-specs';
import type { BaselineMethod } from '../../lib/analysis/baseline';
import { closeRenormalizeMeasure, useMapView } from '../../lib/client/workspace/map-view';
import type { Decomposition } from '../../lib/client/workspace/results';

interface NormalizedPanelProps {
  d: Decomposition;
  method: BaselineMethod;
  dt: number;
  snap: (seconds: number) => number;
  overlay?: (geometry: MapGeometry) => ReactNode;
}

/**
 * The normalized map as the controller re-makes it (map-view.ts): this panel alone re-renders when the baseline
 * moves, and closes the input's timing measure once a fresh picture is painted.
 */
export default function NormalizedPanel({ d, method, dt, snap, overlay }: NormalizedPanelProps) {
  const normalized = useMapView((s) => s.normalized);
  const fresh = useMapView((s) => s.fresh);
  const warnings = useMapView((s) => s.warnings);
  const spec = useMemo(() => (normalized === null ? null : normalizedSpecOf(d, normalized, method)), [d, normalized, method]);
  if (spec === null) return <p className="p-4 text-ink-soft">Preparing single-trial maps…</p>;
  return <MapPanel testId="map-normalized" spec={spec} dt={dt} snap={snap} focusable warnings={warnings} overlay={overlay} onPainted={fresh ? closeRenormalizeMeasure : undefined} />;
}
