import { useDeferredValue, useMemo } from 'react';
import Papa from 'papaparse';
import type { WorkspaceProps } from './types';
import { bandSummary, bandSummaryProblems, type BandRow } from '../../lib/client/workspace/band-summary';
import { methodUnit, neutralValue } from '../../lib/plot/colour-scale';
import { selectActive, useResultsStore } from '../../lib/client/workspace/results';
import { DEFAULT_BANDS, DEFAULT_WINDOWS, type Band, type TimeWindow } from '../../lib/client/workspace/view';
import { baselinePoints } from '../explorer/map-model';
import { downloadBlob } from '../explorer/download';
import { downloadBandBarsSvg } from '../explorer/download-figure';
import { usePanelVisible } from '../explorer/usePanelVisible';
import NumberField from '../explorer/NumberField';
import { useWorkspace } from '../../lib/client/workspace/store';

// Okabe–Ito colours, distinguishable with the common colour-vision deficiencies (Okabe & Ito, 2008, "Color Universal Design").
const BAR_COLOURS = ['#0072B2', '#E69F00', '#009E73', '#CC79A7', '#56B4E9', '#D55E00'];

/** Band × window comparison of the normalized maps: the comparison raw power cannot make across frequencies. */
export default function BandsScreen(_props: WorkspaceProps) {
  const d = useResultsStore(selectActive);
  const bands = useWorkspace((s) => s.bands);
  const windows = useWorkspace((s) => s.windows);
  const method = useWorkspace((s) => s.method);
  const scope = useWorkspace((s) => s.scope);
  const channel = useWorkspace((s) => s.channel);
  const setView = useWorkspace((s) => s.set);
  // Deferred, so a baseline drag on the Maps screen repaints the maps first.
  const baseline = useDeferredValue(useWorkspace((s) => s.baseline));
  const visible = usePanelVisible('Bands');

  const problems = d === null ? [] : bandSummaryProblems(d, bands, windows);
  const rows = useMemo(() => (d === null || !visible || problems.length > 0 ? null : bandSummary(d, bands, windows, baselinePoints(d, baseline), method)), [d, visible, bands, windows, baseline, method, problems.length]);

  if (d === null) {
    return (
      <div className="card p-4">
        <p>No decomposition yet: run a recipe on the Recipe screen first.</p>
      </div>
    );
  }
  const unit = methodUnit(method);
  const ch = channel !== null && d.channels.includes(channel) ? channel : d.channels[0];
  const setBand = (i: number, patch: Partial<Band>) => setView({ bands: bands.map((b, j) => (j === i ? { ...b, ...patch } : b)) });
  const setWindow = (i: number, patch: Partial<TimeWindow>) => setView({ windows: windows.map((w, j) => (j === i ? { ...w, ...patch } : w)) });

  const exportCsv = () => {
    if (rows === null) return;
    const csv = Papa.unparse({
      fields: ['band', 'band_low_hz', 'band_high_hz', 'window', 'window_start_s', 'window_end_s', 'channel', 'condition', 'method', 'scope', 'baseline_start_s', 'baseline_end_s', 'value', 'unit', 'cells'],
      data: rows.map((r) => [r.band.name, r.band.lowHz, r.band.highHz, r.window.name, r.window.startSeconds, r.window.endSeconds, r.channel, r.condition, method, 'average', baseline.start, baseline.end, Number.isFinite(r.value) ? r.value : '', unit, r.cells]),
    });
    downloadBlob(new Blob([csv + '\n'], { type: 'text/csv' }), 'band-summary.csv');
  };

  return (
    <div className="flex flex-col gap-4" data-testid="bands-screen">
      <div className="grid grid-cols-1 gap-4 lg:grid-cols-2">
        <fieldset className="card p-3">
          <legend className="px-1 text-sm font-semibold">Bands (Hz)</legend>
          {bands.map((b, i) => (
            <div key={i} className="flex flex-wrap items-end gap-2">
              <label className="flex flex-col text-xs text-ink-soft">
                name
                <input className="w-24 rounded-sm border border-shell bg-foam px-2 py-1 text-sm text-ink" value={b.name} onChange={(e) => setBand(i, { name: e.target.value })} />
              </label>
              <NumberField label="low" value={b.lowHz} step={0.5} width="w-20" onValue={(v) => setBand(i, { lowHz: v })} />
              <NumberField label="high" value={b.highHz} step={0.5} width="w-20" onValue={(v) => setBand(i, { highHz: v })} />
              <button type="button" className="mb-1 text-sm text-coral-deep underline" onClick={() => setView({ bands: bands.filter((_, j) => j !== i) })} aria-label={`Remove band ${b.name}`}>
                remove
              </button>
            </div>
          ))}
          <div className="mt-2 flex gap-3 text-sm">
            <button type="button" className="text-kelp-deep underline" onClick={() => setView({ bands: [...bands, { name: `band ${bands.length + 1}`, lowHz: 1, highHz: 4 }] })}>
              add a band
            </button>
            <button type="button" className="text-kelp-deep underline" onClick={() => setView({ bands: DEFAULT_BANDS })}>
              defaults (common practice)
            </button>
          </div>
        </fieldset>
        <fieldset className="card p-3">
          <legend className="px-1 text-sm font-semibold">Time windows (s after the event)</legend>
          {windows.map((w, i) => (
            <div key={i} className="flex flex-wrap items-end gap-2">
              <label className="flex flex-col text-xs text-ink-soft">
                name
                <input className="w-24 rounded-sm border border-shell bg-foam px-2 py-1 text-sm text-ink" value={w.name} onChange={(e) => setWindow(i, { name: e.target.value })} />
              </label>
              <NumberField label="start" value={w.startSeconds} step={0.05} width="w-20" onValue={(v) => setWindow(i, { startSeconds: v })} />
              <NumberField label="end" value={w.endSeconds} step={0.05} width="w-20" onValue={(v) => setWindow(i, { endSeconds: v })} />
              <button type="button" className="mb-1 text-sm text-coral-deep underline" onClick={() => setView({ windows: windows.filter((_, j) => j !== i) })} aria-label={`Remove window ${w.name}`}>
                remove
              </button>
            </div>
          ))}
          <div className="mt-2 flex gap-3 text-sm">
            <button type="button" className="text-kelp-deep underline" onClick={() => setView({ windows: [...windows, { name: `window ${windows.length + 1}`, startSeconds: 0, endSeconds: 0.5 }] })}>
              add a window
            </button>
            <button type="button" className="text-kelp-deep underline" onClick={() => setView({ windows: DEFAULT_WINDOWS })}>
              defaults
            </button>
          </div>
        </fieldset>
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
        edge-zone cells left out.
      </p>
      {rows !== null && (
        <>
          <div className="card p-3">
            <div className="mb-2 flex flex-wrap items-end gap-3">
              <label className="flex flex-col gap-0.5 text-xs text-ink-soft">
                Channel in the plot
                <select className="rounded-sm border border-shell bg-foam px-2 py-1 text-sm text-ink" value={ch} onChange={(e) => setView({ channel: e.target.value })}>
                  {d.channels.map((c) => (
                    <option key={c}>{c}</option>
                  ))}
                </select>
              </label>
              <button type="button" className="rounded-sm border border-kelp px-3 py-1 text-sm text-kelp-deep hover:bg-kelp-pale" onClick={exportCsv} data-testid="export-bands">
                Export band summary CSV
              </button>
              <button type="button" className="rounded-sm border border-kelp px-3 py-1 text-sm text-kelp-deep hover:bg-kelp-pale" onClick={() => void downloadBandBarsSvg({ title: `Band means · ${ch} · ${unit}`, rows: rows.filter((r) => r.channel === ch), bands, windows, labels: d.labels, unit, neutral: neutralValue(method), colours: BAR_COLOURS }, `band-means-${ch}-${method}`)} data-testid="export-bands-svg">
                Export SVG
              </button>
            </div>
            <BandBars rows={rows.filter((r) => r.channel === ch)} bands={bands} windows={windows} labels={d.labels} unit={unit} neutral={neutralValue(method)} />
          </div>
          <div className="card max-h-96 overflow-auto p-2">
            <table className="w-full font-mono text-xs" data-testid="band-table">
              <thead className="sticky top-0 bg-foam">
                <tr className="border-b border-shell text-left">
                  <th className="px-2">band</th>
                  <th className="px-2">window</th>
                  <th className="px-2">channel</th>
                  <th className="px-2">condition</th>
                  <th className="px-2 text-right">value ({unit})</th>
                  <th className="px-2 text-right">cells</th>
                </tr>
              </thead>
              <tbody>
                {rows.map((r, i) => (
                  <tr key={i} className="border-b border-sand-deep">
                    <td className="px-2">
                      {r.band.name} {r.band.lowHz}–{r.band.highHz}
                    </td>
                    <td className="px-2">
                      {r.window.name} {r.window.startSeconds}–{r.window.endSeconds}
                    </td>
                    <td className="px-2">{r.channel}</td>
                    <td className="px-2">{r.condition}</td>
                    <td className="px-2 text-right">{Number.isFinite(r.value) ? r.value.toFixed(3) : '—'}</td>
                    <td className="px-2 text-right">{r.cells}</td>
                  </tr>
                ))}
              </tbody>
            </table>
          </div>
        </>
      )}
    </div>
  );
}

/** Grouped bars: one group per window × condition, one bar per band, drawn from the method's neutral value. */
function BandBars({ rows, bands, windows, labels, unit, neutral }: { rows: BandRow[]; bands: Band[]; windows: TimeWindow[]; labels: string[]; unit: string; neutral: number }) {
  const groups = windows.flatMap((w) => labels.map((l) => ({ w, l })));
  const width = Math.max(360, groups.length * (bands.length * 18 + 24) + 70);
  const height = 240;
  const top = 16;
  const bottom = 44;
  const left = 56;
  const values = rows.map((r) => r.value).filter(Number.isFinite);
  const m = Math.max(1e-9, ...values.map((v) => Math.abs(v - neutral)));
  const y = (v: number) => top + ((neutral + m - v) / (2 * m)) * (height - top - bottom);
  const groupWidth = bands.length * 18 + 24;
  return (
    <div className="overflow-x-auto">
      <svg width={width} height={height} role="img" aria-label={`Band means for the chosen channel, in ${unit}`} data-testid="band-plot" className="font-mono">
        <line x1={left} x2={width - 10} y1={y(neutral)} y2={y(neutral)} stroke="#10283a" />
        {[neutral - m, neutral, neutral + m].map((v) => (
          <text key={v} x={left - 6} y={y(v) + 3} textAnchor="end" fontSize={10} fill="#10283a">
            {Number(v.toPrecision(3))}
          </text>
        ))}
        <text x={8} y={top + 4} fontSize={10} fill="#10283a">
          {unit}
        </text>
        {groups.map((g, gi) => (
          <g key={`${g.w.name}-${g.l}`} transform={`translate(${left + 12 + gi * groupWidth} 0)`}>
            {bands.map((b, bi) => {
              const r = rows.find((x) => x.band === b && x.window === g.w && x.condition === g.l);
              const v = r === undefined || !Number.isFinite(r.value) ? neutral : r.value;
              const y0 = y(Math.max(v, neutral));
              const h = Math.abs(y(v) - y(neutral));
              return (
                <rect key={b.name + bi} x={bi * 18} y={y0} width={14} height={Math.max(1, h)} fill={BAR_COLOURS[bi % BAR_COLOURS.length]}>
                  <title>
                    {b.name} · {g.w.name} · {g.l}: {r === undefined ? '—' : r.value.toFixed(3)} {unit}
                  </title>
                </rect>
              );
            })}
            <text x={(bands.length * 18) / 2} y={height - bottom + 16} textAnchor="middle" fontSize={10} fill="#10283a">
              {g.w.name}
            </text>
            <text x={(bands.length * 18) / 2} y={height - bottom + 30} textAnchor="middle" fontSize={10} fill="#3b5366">
              {g.l}
            </text>
          </g>
        ))}
      </svg>
      <ul className="flex flex-wrap gap-3 text-xs">
        {bands.map((b, i) => (
          <li key={b.name + i} className="flex items-center gap-1">
            <span className="inline-block h-3 w-3" style={{ background: BAR_COLOURS[i % BAR_COLOURS.length] }} />
            {b.name} {b.lowHz}–{b.highHz} Hz
          </li>
        ))}
      </ul>
    </div>
  );
}
