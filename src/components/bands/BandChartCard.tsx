import type { ChannelGroup } from '../../lib/analysis/channel-groups';
import type { BandTableRow } from '../../lib/client/workspace/band-summary';
import { chartSitesOf, type ChartChoice } from '../../lib/client/workspace/band-view';
import type { Decomposition } from '../../lib/client/workspace/results';
import type { Band, TimeWindow } from '../../lib/client/workspace/view';
import { downloadBandBarsSvg } from '../explorer/download-figure';
import BandBars from './BandBars';
import { BAR_COLOURS } from './look';

interface Props {
  d: Decomposition;
  groups: ChannelGroup[];
  /** The view's channel: what the chart shows until sites are picked. */
  channel: string;
  rows: BandTableRow[];
  bands: Band[];
  windows: TimeWindow[];
  unit: string;
  neutral: number;
  /** The method's name, for the SVG's file name. */
  method: string;
  /** The sites picked for the chart (kept by the screen, so a passing band problem does not forget them). */
  choice: ChartChoice | null;
  onChoice: (choice: ChartChoice) => void;
  onExportCsv: () => void;
}

/** The Bands chart: the channels and groups to draw, both exports, one bar chart per site, the bands' legend. */
export default function BandChartCard({ d, groups, channel, rows, bands, windows, unit, neutral, method, choice, onChoice, onExportCsv }: Props) {
  const sites = chartSitesOf(choice, d, groups, channel);
  return (
    <div className="card p-3">
      <div className="mb-2 flex flex-wrap items-end gap-3">
        <label className="flex flex-col gap-0.5 text-xs text-ink-soft">
          Channels and groups in the chart (Ctrl or Shift to pick several)
          <select
            multiple
            size={Math.min(8, d.channels.length + groups.length + 2)}
            className="min-w-48 rounded-sm border border-shell bg-foam px-2 py-1 font-mono text-sm text-ink"
            value={sites}
            onChange={(e) => onChoice({ recordingId: d.recordingId, sites: Array.from(e.target.selectedOptions, (o) => o.value) })}
            data-testid="band-sites"
          >
            {groups.length > 0 && (
              <optgroup label="channel groups (mean of their channels)">
                {groups.map((g) => (
                  <option key={`g-${g.name}`} value={g.name}>
                    {g.name} ({g.channels.join(', ')})
                  </option>
                ))}
              </optgroup>
            )}
            <optgroup label="channels">
              {d.channels.map((c) => (
                <option key={c} value={c}>
                  {c}
                </option>
              ))}
            </optgroup>
          </select>
        </label>
        <button type="button" className="rounded-sm border border-kelp px-3 py-1 text-sm text-kelp-deep hover:bg-kelp-pale" onClick={onExportCsv} data-testid="export-bands">
          Export band summary CSV
        </button>
        <button
          type="button"
          className="rounded-sm border border-kelp px-3 py-1 text-sm text-kelp-deep hover:bg-kelp-pale"
          onClick={() => void downloadBandBarsSvg({ sites, rows, bands, windows, labels: d.labels, unit, neutral, colours: BAR_COLOURS }, `band-means-${sites.join('-')}-${method}`)}
          data-testid="export-bands-svg"
        >
          Export SVG
        </button>
      </div>
      <div className="flex flex-col gap-3">
        {sites.map((site) => (
          <BandBars key={site} site={site} rows={rows.filter((r) => r.site === site)} bands={bands} windows={windows} labels={d.labels} unit={unit} neutral={neutral} />
        ))}
      </div>
      <ul className="mt-2 flex flex-wrap gap-3 text-xs" aria-label="Bands in the chart">
        {bands.map((b, i) => (
          <li key={b.name + i} className="flex items-center gap-1">
            <span className="inline-block h-3 w-3" style={{ background: BAR_COLOURS[i % BAR_COLOURS.length] }} aria-hidden="true" />
            {b.name} {b.lowHz}–{b.highHz} Hz
          </li>
        ))}
      </ul>
    </div>
  );
}
