import { useDeferredValue, useMemo, useState } from 'react';
import type { WorkspaceProps } from './types';
import { bandSummary, bandSummaryProblems, bandTableRows, channelGroupsOf, itpcBandSummary } from '../../lib/client/workspace/band-summary';
import { bandSummaryCsv, type ChartChoice } from '../../lib/client/workspace/band-view';
import { methodUnit, neutralValue } from '../../lib/plot/colour-scale';
import { selectActive, useResultsStore } from '../../lib/client/workspace/results';
import { DEFAULT_BANDS, DEFAULT_WINDOWS, type Band, type TimeWindow } from '../../lib/client/workspace/view';
import { baselinePoints } from '../../lib/client/workspace/maps';
import { downloadBlob } from '../explorer/download';
import { usePanelVisible } from '../explorer/usePanelVisible';
import { useWorkspace } from '../../lib/client/workspace/store';
import RangeListEditor from '../bands/RangeListEditor';
import BandChartCard from '../bands/BandChartCard';
import BandScalp from '../bands/BandScalp';
import BandTable from '../bands/BandTable';

/** Band × window comparison of the normalized maps: the comparison raw power cannot make across frequencies. */
export default function BandsScreen(_props: WorkspaceProps) {
  const d = useResultsStore(selectActive);
  const bands = useWorkspace((s) => s.bands);
  const windows = useWorkspace((s) => s.windows);
  const method = useWorkspace((s) => s.method);
  const scope = useWorkspace((s) => s.scope);
  const channel = useWorkspace((s) => s.channel);
  const setView = useWorkspace((s) => s.set);
  const visible = usePanelVisible('Bands');
  // Deferred, so a baseline drag on the Maps screen repaints the maps first; hidden, the screen does not follow the
  // drag at all (no render per move) and reads the baseline once it is shown.
  const baseline = useDeferredValue(useWorkspace((s) => (visible ? s.baseline : null)) ?? useWorkspace.getState().baseline);

  const problems = d === null ? [] : bandSummaryProblems(d, bands, windows);
  const rows = useMemo(() => (d === null || !visible || problems.length > 0 ? null : bandSummary(d, bands, windows, baselinePoints(d, baseline), method)), [d, visible, bands, windows, baseline, method, problems.length]);
  const itpcRows = useMemo(() => (d === null || rows === null ? null : itpcBandSummary(d, bands, windows)), [d, rows, bands, windows]);
  const groups = useMemo(() => (d === null ? [] : channelGroupsOf(d)), [d]);
  const tableRows = useMemo(() => (rows === null ? null : bandTableRows(rows, itpcRows, groups)), [rows, itpcRows, groups]);
  // Display choices of this screen (not recipe, not undo history): which sites the chart shows, on which recording.
  const [chartChoice, setChartChoice] = useState<ChartChoice | null>(null);

  if (d === null) {
    return (
      <div className="card p-4">
        <p>No decomposition yet: run a recipe on the Recipe screen first.</p>
      </div>
    );
  }
  const unit = methodUnit(method);
  const ch = channel !== null && d.channels.includes(channel) ? channel : d.channels[0];
  const exportCsv = () => {
    if (rows !== null) downloadBlob(new Blob([bandSummaryCsv(rows, method, unit, baseline)], { type: 'text/csv' }), 'band-summary.csv');
  };

  return (
    <div className="flex flex-col gap-4" data-testid="bands-screen">
      <div className="grid grid-cols-1 gap-4 lg:grid-cols-2">
        <RangeListEditor<Band>
          legend="Bands (Hz)"
          word="band"
          items={bands}
          ends={[{ key: 'lowHz', label: 'low' }, { key: 'highHz', label: 'high' }]}
          step={0.5}
          onItems={(b) => setView({ bands: b })}
          fresh={(n) => ({ name: `band ${n + 1}`, lowHz: 1, highHz: 4 })}
          defaults={DEFAULT_BANDS}
          defaultsLabel="defaults (common practice)"
        />
        <RangeListEditor<TimeWindow>
          legend="Time windows (s after the event)"
          word="window"
          items={windows}
          ends={[{ key: 'startSeconds', label: 'start' }, { key: 'endSeconds', label: 'end' }]}
          step={0.05}
          onItems={(w) => setView({ windows: w })}
          fresh={(n) => ({ name: `window ${n + 1}`, startSeconds: 0, endSeconds: 0.5 })}
          defaults={DEFAULT_WINDOWS}
          defaultsLabel="defaults"
        />
      </div>
      {problems.length > 0 && (
        <ul className="text-sm text-coral-deep" role="alert">
          {problems.map((p) => (
            <li key={p}>{p}</li>
          ))}
        </ul>
      )}
      <p className="text-sm text-ink-soft">
        Mean normalized value (in {unit}, baseline {Number(baseline.start.toFixed(4))} to {Number(baseline.end.toFixed(4))} s, trial-average scope{scope === 'trial' ? '; the Maps screen shows single-trial scope for one channel only' : ''}) over the band's grid frequencies and the window's times,
        edge-zone cells left out. A channel group's value is the mean of its channels' values ({groups.length > 0 ? `groups: ${d.recipe.channelGroups && Object.keys(d.recipe.channelGroups).length > 0 ? "the recipe's" : 'default regions from the 10-20 names'}` : 'no group applies to these channels'}).
      </p>
      {tableRows !== null && rows !== null && (
        <>
          <BandChartCard d={d} groups={groups} channel={ch} rows={tableRows} bands={bands} windows={windows} unit={unit} neutral={neutralValue(method)} method={method} choice={chartChoice} onChoice={setChartChoice} onExportCsv={exportCsv} />
          <BandScalp rows={tableRows} bands={bands} windows={windows} labels={d.labels} channels={d.channels} unit={unit} neutral={neutralValue(method)} hasItpc={itpcRows !== null} />
          <BandTable rows={tableRows} unit={unit} hasItpc={itpcRows !== null} />
        </>
      )}
    </div>
  );
}
