import { useDeferredValue, useId, useMemo, useRef, useState } from 'react';
import Papa from 'papaparse';
import {
  createColumnHelper,
  flexRender,
  getCoreRowModel,
  getFilteredRowModel,
  getPaginationRowModel,
  getSortedRowModel,
  useReactTable,
  type ColumnFiltersState,
  type SortingState,
} from '@tanstack/react-table';
import SortableHeader from '../table/SortableHeader';
import type { WorkspaceProps } from './types';
import { bandSummary, bandSummaryProblems, bandTableRows, channelGroupsOf, itpcBandSummary, type BandTableRow } from '../../lib/client/workspace/band-summary';
import { methodUnit, neutralValue } from '../../lib/plot/colour-scale';
import { bandChartLayout } from '../../lib/plot/band-chart';
import { formatTick } from '../../lib/plot/axes';
import ScalpMap from '../explorer/ScalpMap';
import { useElementWidth } from '../explorer/useElementWidth';
import { selectActive, useResultsStore } from '../../lib/client/workspace/results';
import { DEFAULT_BANDS, DEFAULT_WINDOWS, type Band, type TimeWindow } from '../../lib/client/workspace/view';
import { baselinePoints } from '../../lib/client/workspace/maps';
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
  const itpcRows = useMemo(() => (d === null || rows === null ? null : itpcBandSummary(d, bands, windows)), [d, rows, bands, windows]);
  const groups = useMemo(() => (d === null ? [] : channelGroupsOf(d)), [d]);
  const tableRows = useMemo(() => (rows === null ? null : bandTableRows(rows, itpcRows, groups)), [rows, itpcRows, groups]);
  // Display choices of this screen (not recipe, not undo history): which sites the chart shows.
  const [chartSites, setChartSites] = useState<string[] | null>(null);

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
            <fieldset key={i} className="flex flex-wrap items-end gap-2">
              <legend className="sr-only">Band {i + 1}</legend>
              <label className="flex flex-col text-xs text-ink-soft">
                name
                <input className="w-24 rounded-sm border border-shell bg-foam px-2 py-1 text-sm text-ink" value={b.name} onChange={(e) => setBand(i, { name: e.target.value })} />
              </label>
              <NumberField label="low" value={b.lowHz} step={0.5} width="w-20" onValue={(v) => setBand(i, { lowHz: v })} />
              <NumberField label="high" value={b.highHz} step={0.5} width="w-20" onValue={(v) => setBand(i, { highHz: v })} />
              <button type="button" className="mb-1 text-sm text-coral-deep underline" onClick={() => setView({ bands: bands.filter((_, j) => j !== i) })} aria-label={`Remove band ${b.name}`}>
                remove
              </button>
            </fieldset>
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
            <fieldset key={i} className="flex flex-wrap items-end gap-2">
              <legend className="sr-only">Window {i + 1}</legend>
              <label className="flex flex-col text-xs text-ink-soft">
                name
                <input className="w-24 rounded-sm border border-shell bg-foam px-2 py-1 text-sm text-ink" value={w.name} onChange={(e) => setWindow(i, { name: e.target.value })} />
              </label>
              <NumberField label="start" value={w.startSeconds} step={0.05} width="w-20" onValue={(v) => setWindow(i, { startSeconds: v })} />
              <NumberField label="end" value={w.endSeconds} step={0.05} width="w-20" onValue={(v) => setWindow(i, { endSeconds: v })} />
              <button type="button" className="mb-1 text-sm text-coral-deep underline" onClick={() => setView({ windows: windows.filter((_, j) => j !== i) })} aria-label={`Remove window ${w.name}`}>
                remove
              </button>
            </fieldset>
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
        edge-zone cells left out. A channel group's value is the mean of its channels' values ({groups.length > 0 ? `groups: ${d.recipe.channelGroups && Object.keys(d.recipe.channelGroups).length > 0 ? "the recipe's" : 'default regions from the 10-20 names'}` : 'no group applies to these channels'}).
      </p>
      {tableRows !== null && rows !== null && (
        <>
          <div className="card p-3">
            <div className="mb-2 flex flex-wrap items-end gap-3">
              <label className="flex flex-col gap-0.5 text-xs text-ink-soft">
                Channels and groups in the chart (Ctrl or Shift to pick several)
                <select
                  multiple
                  size={Math.min(8, d.channels.length + groups.length + 2)}
                  className="min-w-48 rounded-sm border border-shell bg-foam px-2 py-1 font-mono text-sm text-ink"
                  value={chartSites ?? [ch]}
                  onChange={(e) => setChartSites(Array.from(e.target.selectedOptions, (o) => o.value))}
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
              <button type="button" className="rounded-sm border border-kelp px-3 py-1 text-sm text-kelp-deep hover:bg-kelp-pale" onClick={exportCsv} data-testid="export-bands">
                Export band summary CSV
              </button>
              <button type="button" className="rounded-sm border border-kelp px-3 py-1 text-sm text-kelp-deep hover:bg-kelp-pale" onClick={() => void downloadBandBarsSvg({ sites: chartSites ?? [ch], rows: tableRows, bands, windows, labels: d.labels, unit, neutral: neutralValue(method), colours: BAR_COLOURS }, `band-means-${(chartSites ?? [ch]).join('-')}-${method}`)} data-testid="export-bands-svg">
                Export SVG
              </button>
            </div>
            <div className="flex flex-col gap-3">
              {(chartSites ?? [ch]).map((site) => (
                <BandBars key={site} site={site} rows={tableRows.filter((r) => r.site === site)} bands={bands} windows={windows} labels={d.labels} unit={unit} neutral={neutralValue(method)} />
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
          <BandScalp rows={tableRows} bands={bands} windows={windows} labels={d.labels} channels={d.channels} unit={unit} neutral={neutralValue(method)} hasItpc={itpcRows !== null} />
          <BandTable rows={tableRows} unit={unit} hasItpc={itpcRows !== null} />
        </>
      )}
    </div>
  );
}

/**
 * Grouped bars for one channel or group: one group per window × condition, one bar per band, drawn from the method's
 * neutral value; as wide as its card (`bandChartLayout`), the unit on its own axis title, never against a number.
 */
function BandBars({ site, rows, bands, windows, labels, unit, neutral }: { site: string; rows: BandTableRow[]; bands: Band[]; windows: TimeWindow[]; labels: string[]; unit: string; neutral: number }) {
  const wrap = useRef<HTMLDivElement>(null);
  const width = useElementWidth(wrap);
  const groups = windows.flatMap((w) => labels.map((l) => ({ w, l })));
  const layout = bandChartLayout({ width: Math.max(240, width), height: 240, groups: groups.length, bars: bands.length, values: rows.map((r) => r.value), neutral });
  const find = (b: Band, w: TimeWindow, l: string) => rows.find((x) => x.band === b && x.window === w && x.condition === l);
  const summary = groups.map((g) => `${g.w.name} ${g.l}: ${bands.map((b) => `${b.name} ${formatValue(find(b, g.w, g.l)?.value)}`).join(', ')}`).join('; ');
  return (
    <div ref={wrap} className="w-full" data-testid="band-chart" data-site={site}>
      {width > 0 && (
        <svg width={layout.width} height={layout.height} role="img" aria-label={`Band means of ${site} in ${unit}. ${summary}`} data-testid="band-plot" className="block font-mono">
          <text x={layout.left} y={12} fontSize={12} fontWeight={600} fill="#10283a" fontFamily="Inter Variable, sans-serif">
            {site}
          </text>
          {layout.ticks.map((v) => (
            <g key={v}>
              <line x1={layout.left - 4} x2={layout.left} y1={layout.y(v)} y2={layout.y(v)} stroke="#10283a" />
              <text x={layout.left - 6} y={layout.y(v) + 3} textAnchor="end" fontSize={10} fill="#10283a" data-testid="band-tick">
                {formatTick(v)}
              </text>
            </g>
          ))}
          <line x1={layout.left} x2={layout.left} y1={layout.top} y2={layout.height - layout.bottom} stroke="#10283a" />
          <line x1={layout.left} x2={layout.width - layout.right} y1={layout.y(neutral)} y2={layout.y(neutral)} stroke="#10283a" />
          <text transform={`translate(14 ${(layout.top + layout.height - layout.bottom) / 2}) rotate(-90)`} textAnchor="middle" fontSize={10} fill="#10283a" data-testid="band-axis-title">
            mean ({unit})
          </text>
          {groups.map((g, gi) => (
            <g key={`${g.w.name}-${g.l}`} transform={`translate(${layout.groupX(gi)} 0)`}>
              {bands.map((b, bi) => {
                const r = find(b, g.w, g.l);
                const v = r === undefined || !Number.isFinite(r.value) ? neutral : r.value;
                const y0 = layout.y(Math.max(v, neutral));
                const h = Math.abs(layout.y(v) - layout.y(neutral));
                return (
                  <rect key={b.name + bi} x={layout.barX(bi)} y={y0} width={layout.barWidth} height={Math.max(1, h)} fill={BAR_COLOURS[bi % BAR_COLOURS.length]}>
                    <title>
                      {site} · {b.name} · {g.w.name} · {g.l}: {formatValue(r?.value)} {unit}
                    </title>
                  </rect>
                );
              })}
              <text x={layout.groupWidth / 2} y={layout.height - layout.bottom + 16} textAnchor="middle" fontSize={10} fill="#10283a">
                {g.w.name}
              </text>
              <text x={layout.groupWidth / 2} y={layout.height - layout.bottom + 30} textAnchor="middle" fontSize={10} fill="#3b5366">
                {g.l}
              </text>
            </g>
          ))}
        </svg>
      )}
    </div>
  );
}

const formatValue = (v: number | null | undefined) => (v === null || v === undefined || !Number.isFinite(v) ? '—' : v.toFixed(3));

/** The scalp map of one band × window × condition: normalized power, or phase consistency when the run has it. */
function BandScalp({ rows, bands, windows, labels, channels, unit, neutral, hasItpc }: { rows: BandTableRow[]; bands: Band[]; windows: TimeWindow[]; labels: string[]; channels: string[]; unit: string; neutral: number; hasItpc: boolean }) {
  const [bandIndex, setBandIndex] = useState(0);
  const [windowIndex, setWindowIndex] = useState(0);
  const [condition, setCondition] = useState(labels[0]);
  const [measure, setMeasure] = useState<'power' | 'itpc'>('power');
  const band = bands[Math.min(bandIndex, bands.length - 1)];
  const window = windows[Math.min(windowIndex, windows.length - 1)];
  const label = labels.includes(condition) ? condition : labels[0];
  const shown = measure === 'itpc' && hasItpc ? 'itpc' : 'power';
  if (band === undefined || window === undefined) return null;
  const values = channels.map((c) => {
    const r = rows.find((x) => x.kind === 'channel' && x.site === c && x.band === band && x.window === window && x.condition === label);
    return { channel: c, value: r === undefined ? null : shown === 'itpc' ? r.itpc : r.value };
  });
  const select = 'rounded-sm border border-shell bg-foam px-2 py-1 text-sm text-ink';
  return (
    <div className="card flex flex-col gap-2 p-3 lg:flex-row" data-testid="band-scalp-card">
      <div className="flex flex-col gap-2 lg:w-64">
        <h3 className="text-sm font-semibold">Scalp map of a band and window</h3>
        <label className="flex flex-col gap-0.5 text-xs text-ink-soft">
          Band
          <select className={select} value={bands.indexOf(band)} onChange={(e) => setBandIndex(Number(e.target.value))} data-testid="scalp-band">
            {bands.map((b, i) => (
              <option key={b.name + i} value={i}>
                {b.name} {b.lowHz}–{b.highHz} Hz
              </option>
            ))}
          </select>
        </label>
        <label className="flex flex-col gap-0.5 text-xs text-ink-soft">
          Window
          <select className={select} value={windows.indexOf(window)} onChange={(e) => setWindowIndex(Number(e.target.value))} data-testid="scalp-window">
            {windows.map((w, i) => (
              <option key={w.name + i} value={i}>
                {w.name} {w.startSeconds}–{w.endSeconds} s
              </option>
            ))}
          </select>
        </label>
        <label className="flex flex-col gap-0.5 text-xs text-ink-soft">
          Condition
          <select className={select} value={label} onChange={(e) => setCondition(e.target.value)} data-testid="scalp-condition">
            {labels.map((l) => (
              <option key={l}>{l}</option>
            ))}
          </select>
        </label>
        <label className="flex flex-col gap-0.5 text-xs text-ink-soft">
          Value
          <select className={select} value={shown} onChange={(e) => setMeasure(e.target.value as 'power' | 'itpc')} data-testid="scalp-measure">
            <option value="power">power, normalized ({unit})</option>
            <option value="itpc" disabled={!hasItpc}>
              phase consistency (ITPC){hasItpc ? '' : ': run a recipe with ITPC'}
            </option>
          </select>
        </label>
      </div>
      <div className="flex-1">
        <ScalpMap
          title={`${shown === 'itpc' ? 'ITPC' : 'Normalized power'}, ${band.name} ${band.lowHz}–${band.highHz} Hz, ${window.name} ${window.startSeconds}–${window.endSeconds} s, ${label}`}
          unit={shown === 'itpc' ? 'ITPC, 0–1' : unit}
          values={values}
          scale={shown === 'itpc' ? { kind: 'sequential' } : { kind: 'diverging', neutral }}
          testId="band-scalp"
        />
      </div>
    </div>
  );
}

const col = createColumnHelper<BandTableRow>();
const PAGE_SIZES = [25, 50, 100];

/** Every channel and group row, sortable (header buttons), filtered by text and by kind, a page at a time. */
function BandTable({ rows, unit, hasItpc }: { rows: BandTableRow[]; unit: string; hasItpc: boolean }) {
  const filterId = useId();
  const [sorting, setSorting] = useState<SortingState>([]);
  const [globalFilter, setGlobalFilter] = useState('');
  const [columnFilters, setColumnFilters] = useState<ColumnFiltersState>([]);
  const columns = useMemo(
    () => [
      col.accessor((r) => `${r.band.name} ${r.band.lowHz}–${r.band.highHz}`, { id: 'band', header: 'band (Hz)' }),
      col.accessor((r) => `${r.window.name} ${r.window.startSeconds}–${r.window.endSeconds}`, { id: 'window', header: 'window (s)' }),
      col.accessor('site', { header: 'channel or group' }),
      col.accessor('kind', { header: 'kind', filterFn: 'equalsString' }),
      col.accessor('condition', { header: 'condition' }),
      col.accessor('value', { header: `mean (${unit})`, cell: (c) => formatValue(c.getValue()), sortUndefined: 'last', enableGlobalFilter: false }),
      ...(hasItpc ? [col.accessor((r) => r.itpc ?? NaN, { id: 'itpc', header: 'ITPC (0–1)', cell: (c) => formatValue(c.getValue()), enableGlobalFilter: false })] : []),
      col.accessor('count', { header: 'cells or channels', enableGlobalFilter: false }),
    ],
    [unit, hasItpc],
  );
  const table = useReactTable({
    data: rows,
    columns,
    state: { sorting, globalFilter, columnFilters },
    onSortingChange: setSorting,
    onGlobalFilterChange: setGlobalFilter,
    onColumnFiltersChange: setColumnFilters,
    globalFilterFn: 'includesString',
    sortDescFirst: false,
    getCoreRowModel: getCoreRowModel(),
    getSortedRowModel: getSortedRowModel(),
    getFilteredRowModel: getFilteredRowModel(),
    getPaginationRowModel: getPaginationRowModel(),
    initialState: { pagination: { pageSize: PAGE_SIZES[0], pageIndex: 0 } },
    autoResetPageIndex: true,
  });
  const kind = (columnFilters.find((f) => f.id === 'kind')?.value as string | undefined) ?? '';
  const page = table.getState().pagination;
  const shown = table.getFilteredRowModel().rows.length;
  const input = 'rounded-sm border border-shell bg-foam px-2 py-1 text-sm text-ink';
  return (
    <div className="card flex flex-col gap-2 p-2">
      <div className="flex flex-wrap items-end gap-3">
        <label htmlFor={filterId} className="flex flex-col gap-0.5 text-xs text-ink-soft">
          Filter rows (band, window, channel, group, condition)
          <input id={filterId} type="search" className={`${input} w-64`} value={globalFilter} onChange={(e) => setGlobalFilter(e.target.value)} data-testid="band-filter" />
        </label>
        <label className="flex flex-col gap-0.5 text-xs text-ink-soft">
          Rows of
          <select className={input} value={kind} onChange={(e) => setColumnFilters(e.target.value === '' ? [] : [{ id: 'kind', value: e.target.value }])} data-testid="band-kind">
            <option value="">channels and groups</option>
            <option value="channel">channels</option>
            <option value="group">groups</option>
          </select>
        </label>
        <p className="text-xs text-ink-soft" role="status" data-testid="band-row-count">
          {shown} of {rows.length} rows
        </p>
      </div>
      <div className="overflow-x-auto" tabIndex={0} role="region" aria-label="Band × window table">
        <table className="w-full font-mono text-xs" data-testid="band-table">
          <thead className="bg-foam">
            {table.getHeaderGroups().map((g) => (
              <tr key={g.id} className="border-b border-shell text-left">
                {g.headers.map((h) => (
                  <SortableHeader
                    key={h.id}
                    header={h}
                    className={`px-2 py-1 font-semibold ${['value', 'itpc', 'count'].includes(h.column.id) ? 'text-right' : ''}`}
                    testId={`band-sort-${h.column.id}`}
                  />
                ))}
              </tr>
            ))}
          </thead>
          <tbody>
            {table.getRowModel().rows.map((r) => (
              <tr
                key={r.id}
                className={`border-b border-sand-deep ${r.original.kind === 'group' ? 'bg-kelp-pale/40' : ''}`}
                data-testid="band-row"
                data-site={r.original.site}
                data-kind={r.original.kind}
                data-band={r.original.band.name}
                data-window={r.original.window.name}
                data-condition={r.original.condition}
                data-value={Number.isFinite(r.original.value) ? r.original.value : ''}
                data-itpc={r.original.itpc ?? ''}
              >
                {r.getVisibleCells().map((c) => (
                  <td key={c.id} className={`px-2 ${['value', 'itpc', 'count'].includes(c.column.id) ? 'text-right' : ''}`}>
                    {flexRender(c.column.columnDef.cell, c.getContext())}
                  </td>
                ))}
              </tr>
            ))}
          </tbody>
        </table>
      </div>
      <nav className="flex flex-wrap items-center gap-3 text-sm" aria-label="Pages of the band table">
        <button type="button" className="rounded-sm border border-shell px-2 py-0.5 disabled:opacity-50" onClick={() => table.previousPage()} disabled={!table.getCanPreviousPage()}>
          previous page
        </button>
        <span data-testid="band-page">
          page {page.pageIndex + 1} of {Math.max(1, table.getPageCount())}
        </span>
        <button type="button" className="rounded-sm border border-shell px-2 py-0.5 disabled:opacity-50" onClick={() => table.nextPage()} disabled={!table.getCanNextPage()} data-testid="band-next-page">
          next page
        </button>
        <label className="flex items-center gap-1 text-xs text-ink-soft">
          rows per page
          <select className={input} value={page.pageSize} onChange={(e) => table.setPageSize(Number(e.target.value))}>
            {PAGE_SIZES.map((n) => (
              <option key={n}>{n}</option>
            ))}
          </select>
        </label>
      </nav>
    </div>
  );
}
