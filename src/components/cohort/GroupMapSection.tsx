import type { ReactNode } from 'react';
import type { GroupMap } from '../../lib/cohort/group-map';
import type { MapRun } from '../../lib/client/cohort/cohort-model';
import { clustersOut } from '../../lib/statistics/maps';
import { GroupMapPlot, fmt } from './plots';

interface Props {
  groups: string[];
  conditions: string[];
  mapGroup: string;
  onMapGroup: (group: string) => void;
  mapConditions: [string] | [string, string];
  onMapConditions: (conditions: [string] | [string, string]) => void;
  groupMap: GroupMap | null;
  run: MapRun;
  onRun: () => void;
  onCancel: () => void;
  neutral: number;
  /** The method's unit in words. */
  u: string;
  unsignedBanner: ReactNode;
}

/** The group map of one channel group and condition (or A − B), its cluster test, and the clusters found. */
export default function GroupMapSection({ groups, conditions, mapGroup, onMapGroup, mapConditions, onMapConditions, groupMap, run, onRun, onCancel, neutral, u, unsignedBanner }: Props) {
  return (
        <section className="card mt-6" aria-labelledby="map-h" data-testid="group-map">
          <h2 id="map-h" className="text-xl font-semibold">Group map and cluster test</h2>
          {unsignedBanner}
          <p className="text-sm text-ink-soft">The mean of the subjects' reduced maps; the cluster-based permutation test (Maris &amp; Oostenveld, 2007) outlines the clusters with p &lt; 0.05; the table lists every cluster.</p>
          <div className="mt-2 flex flex-wrap items-end gap-4">
            <label className="field"><span className="text-sm">Channel group</span>
              <select value={mapGroup} onChange={(e) => onMapGroup(e.target.value)}>{groups.map((g) => <option key={g}>{g}</option>)}</select>
            </label>
            <label className="field"><span className="text-sm">Condition</span>
              <select value={mapConditions[0]} onChange={(e) => onMapConditions(mapConditions.length === 2 ? [e.target.value, mapConditions[1]] : [e.target.value])}>{conditions.map((c) => <option key={c}>{c}</option>)}</select>
            </label>
            <label className="field"><span className="text-sm">Against</span>
              <select value={mapConditions[1] ?? ''} onChange={(e) => onMapConditions(e.target.value ? [mapConditions[0], e.target.value] : [mapConditions[0]])} data-testid="map-against">
                <option value="">no change ({fmt(neutral, 0)} {u})</option>
                {conditions.filter((c) => c !== mapConditions[0]).map((c) => <option key={c} value={c}>{c}</option>)}
              </select>
            </label>
            {run.state === 'running' ? (
              <button type="button" className="btn btn-quiet" onClick={onCancel} data-testid="cancel-map-test">Cancel</button>
            ) : (
              <button type="button" className="btn btn-primary" disabled={!groupMap?.testInput} onClick={onRun} data-testid="run-map-test">Run the cluster test</button>
            )}
          </div>
          {run.state === 'running' && <progress className="mt-2 w-full" max={1} value={run.progress} data-testid="map-test-progress" aria-label="Cluster test progress" />}
          {run.message && <p className="notice mt-2" role="status">{run.message}</p>}
          {groupMap && (
            <>
              <GroupMapPlot
                title={`${mapGroup}: ${mapConditions.length === 2 ? `${mapConditions[0]} − ${mapConditions[1]}` : mapConditions[0]} (n = ${groupMap.subjects.length})`}
                frequenciesHz={groupMap.frequenciesHz}
                timesS={groupMap.timesS}
                values={groupMap.mean}
                neutral={mapConditions.length === 2 ? 0 : neutral}
                unit={u}
                labels={run.result?.labels ?? null}
                clusters={run.result?.clusters ?? []}
                width={760}
                height={340}
              />
              {groupMap.warnings.map((w) => <p key={w} className="text-2xs text-ink-soft">{w}</p>)}
            </>
          )}
          {run.result && (
            <table className="data-table mt-3" data-testid="cluster-table">
              <thead><tr><th scope="col">Sign</th><th scope="col">Mass (Σt)</th><th scope="col">Cells</th><th scope="col">Time (s)</th><th scope="col">Frequency (Hz)</th><th scope="col">p</th></tr></thead>
              <tbody>
                {clustersOut(run.result, { times: groupMap!.timesS, frequencies: groupMap!.frequenciesHz }).slice(0, 12).map((c, i) => (
                  <tr key={i}><td>{c.sign > 0 ? 'positive' : 'negative'}</td><td className="font-mono">{fmt(c.mass, 1)}</td><td className="font-mono">{c.size}</td><td className="font-mono">{fmt(c.times[0])} … {fmt(c.times[1])}</td><td className="font-mono">{fmt(c.frequencies[0], 1)} … {fmt(c.frequencies[1], 1)}</td><td className="font-mono">{c.p < 0.001 ? c.p.toExponential(2) : c.p.toFixed(4)}</td></tr>
                ))}
              </tbody>
            </table>
          )}
          {run.result && <p className="mt-1 text-2xs text-ink-soft" data-testid="map-test-summary">{run.result.exact ? `All ${run.result.permutations} sign flips (exact)` : `${run.result.permutations} random sign flips, seed ${run.result.seed}`}; cluster threshold |t| &gt; {fmt(run.result.threshold, 3)} (df {run.result.df}).</p>}
        </section>
  );
}
