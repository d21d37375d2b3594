import type { ReactNode } from 'react';
import Choice from './Choice';
import MapSelection from './MapSelection';
import NumberField from './NumberField';
import { METHODS, type MapSelection as Selection } from '../../lib/client/workspace/map-view';
import type { Decomposition } from '../../lib/client/workspace/results';
import { useWorkspace } from '../../lib/client/workspace/store';

/** The live baseline's start and end as number fields (they read the baseline themselves, like the bands). */
function BaselineFields({ dt, snap }: { dt: number; snap: (seconds: number) => number }) {
  const baseline = useWorkspace((s) => s.baseline);
  const setBaseline = useWorkspace((s) => s.setBaseline);
  return (
    <>
      <NumberField label="Baseline start" unit="s" value={baseline.start} step={dt} testId="baseline-start" onValue={(v) => setBaseline({ start: snap(Math.min(v, baseline.end)), end: baseline.end })} />
      <NumberField label="Baseline end" unit="s" value={baseline.end} step={dt} testId="baseline-end" onValue={(v) => setBaseline({ start: baseline.start, end: snap(Math.max(v, baseline.start)) })} />
    </>
  );
}

interface MapControlsProps {
  d: Decomposition;
  selection: Selection;
  groups: string[];
  limitsKey: string;
  /** Holds the colour limits now shown, or lets them go. */
  onHoldLimits: () => void;
  dt: number;
  snap: (seconds: number) => number;
  /** The export buttons. */
  children: ReactNode;
}

/** The Maps screen's choices: what is shown, how it is normalized and coloured, the baseline, and the exports. */
export default function MapControls({ d, selection: s, groups, limitsKey, onHoldLimits, dt, snap, children }: MapControlsProps) {
  const contrastBaseline = useWorkspace((st) => st.contrastBaseline);
  const method = useWorkspace((st) => st.method);
  const spread = useWorkspace((st) => st.spread);
  const scope = useWorkspace((st) => st.scope);
  const rawScale = useWorkspace((st) => st.rawScale);
  const heldLimits = useWorkspace((st) => st.heldLimits);
  const setView = useWorkspace((st) => st.set);
  return (
    <div className="card flex flex-wrap items-end gap-4 p-3">
      <MapSelection d={d} channel={s.channel ?? d.channels[Math.max(0, s.indices[0])]} a={s.a} b={s.b} groups={groups} group={s.group} onView={setView} />
      {s.b >= 0 && (
        <Choice
          legend="A − B normalized against"
          value={contrastBaseline}
          options={[
            { value: 'own', label: 'own baseline' },
            { value: 'shared', label: 'shared baseline' },
          ]}
          onChange={(c) => setView({ contrastBaseline: c })}
        />
      )}
      <Choice legend="Method" value={method} options={METHODS} onChange={(m) => setView({ method: m })} />
      {method === 'z-score' && (
        <Choice legend="z-score spread" value={spread} options={[{ value: 'time', label: 'over baseline time' }, { value: 'trials', label: 'across trials' }]} onChange={(v) => setView({ spread: v })} />
      )}
      <Choice legend="Scope" value={scope} options={[{ value: 'average', label: 'trial average' }, { value: 'trial', label: 'single trial' }]} onChange={(v) => setView({ scope: v })} />
      <label className="flex items-center gap-1 text-sm" title="Keep the colour limits fixed while you switch channels and conditions, so maps can be compared">
        <input type="checkbox" checked={heldLimits !== null} onChange={onHoldLimits} data-testid="hold-limits" />
        same colour limits for every map{heldLimits !== null && heldLimits.key !== limitsKey ? ' (taken for another method or view: not applied)' : ''}
      </label>
      <Choice legend="Raw colour scale" value={rawScale} options={[{ value: 'log', label: 'log' }, { value: 'linear', label: 'linear' }]} onChange={(v) => setView({ rawScale: v })} />
      <BaselineFields dt={dt} snap={snap} />
      {children}
    </div>
  );
}
