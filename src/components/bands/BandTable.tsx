import { useId, useMemo, useState } from 'react';
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
import type { BandTableRow } from '../../lib/client/workspace/band-summary';
import SortableHeader from '../table/SortableHeader';
import TablePager from '../table/TablePager';
import { formatValue } from './look';

const col = createColumnHelper<BandTableRow>();
const PAGE_SIZES = [25, 50, 100];

/** Every channel and group row, sortable (header buttons), filtered by text and by kind, a page at a time. */
export default function BandTable({ rows, unit, hasItpc }: { rows: BandTableRow[]; unit: string; hasItpc: boolean }) {
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
      <TablePager table={table} label="Pages of the band table" testIdPrefix="band" pageSizes={PAGE_SIZES} />
    </div>
  );
}
