// Edge zones as the maps draw them. The rule itself (which grid points are edge-affected) and its mask are the
// core's: src/lib/analysis/edge-zone.ts.
export { edgeMask, edgeZones, type EdgeZones } from '../analysis/edge-zone';
