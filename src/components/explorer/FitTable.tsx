import { useState } from 'react';
import { createColumnHelper, flexRender, getCoreRowModel, getSortedRowModel, useReactTable, type SortingState } from '@tanstack/react-table';

export interface FitRow {
  channel: string;
  exponent: number | null;
  offset: number | null;
  knee: number | null;
  r2: number | null;
  rmse: number | null;
  points: number | null;
  excluded: number | null;
}

const col = createColumnHelper<FitRow>();
const num = (digits: number) => (v: number | null) => (v === null || !Number.isFinite(v) ? '—' : v.toFixed(digits));
const columns = [
  col.accessor('channel', { header: 'channel' }),
  col.accessor('exponent', { header: 'exponent', cell: (c) => num(3)(c.getValue()), sortUndefined: 'last' }),
  col.accessor('offset', { header: 'offset (log10 µV²/Hz)', cell: (c) => num(3)(c.getValue()) }),
  col.accessor('knee', { header: 'knee', cell: (c) => num(2)(c.getValue()) }),
  col.accessor('r2', { header: 'r²', cell: (c) => num(4)(c.getValue()) }),
  col.accessor('rmse', { header: 'RMSE (log10)', cell: (c) => num(4)(c.getValue()) }),
  col.accessor('points', { header: 'bins', cell: (c) => c.getValue() ?? '—' }),
  col.accessor('excluded', { header: 'peak bins left out', cell: (c) => c.getValue() ?? '—' }),
];

/** Every channel's aperiodic fit, sortable by any column (click or Enter on a header). */
export default function FitTable({ rows, selected, onSelect }: { rows: FitRow[]; selected: string | null; onSelect: (channel: string) => void }) {
  const [sorting, setSorting] = useState<SortingState>([]);
  const table = useReactTable({ data: rows, columns, state: { sorting }, sortDescFirst: false, onSortingChange: setSorting, getCoreRowModel: getCoreRowModel(), getSortedRowModel: getSortedRowModel() });
  return (
    <div className="overflow-x-auto">
      <table className="w-full font-mono text-xs" data-testid="fit-table">
        <thead>
          {table.getHeaderGroups().map((g) => (
            <tr key={g.id} className="border-b border-shell text-left">
              {g.headers.map((h) => {
                const dir = h.column.getIsSorted();
                return (
                  <th key={h.id} className="px-2 py-1 font-semibold" aria-sort={dir === 'asc' ? 'ascending' : dir === 'desc' ? 'descending' : 'none'}>
                    <button type="button" className="text-left hover:underline" onClick={h.column.getToggleSortingHandler()}>
                      {flexRender(h.column.columnDef.header, h.getContext())} {dir === 'asc' ? '▲' : dir === 'desc' ? '▼' : ''}
                    </button>
                  </th>
                );
              })}
            </tr>
          ))}
        </thead>
        <tbody>
          {table.getRowModel().rows.map((r) => (
            <tr
              key={r.id}
              className={`border-b border-sand-deep ${r.original.channel === selected ? 'bg-kelp-pale' : ''}`}
              data-testid="fit-row"
              data-channel={r.original.channel}
              data-exponent={r.original.exponent ?? ''}
              data-offset={r.original.offset ?? ''}
              data-r2={r.original.r2 ?? ''}
              data-rmse={r.original.rmse ?? ''}
            >
              {r.getVisibleCells().map((c) => (
                <td key={c.id} className="px-2 py-0.5">
                  {c.column.id === 'channel' ? (
                    <button type="button" className="text-kelp-deep underline" onClick={() => onSelect(r.original.channel)}>
                      {r.original.channel}
                    </button>
                  ) : (
                    flexRender(c.column.columnDef.cell, c.getContext())
                  )}
                </td>
              ))}
            </tr>
          ))}
        </tbody>
      </table>
    </div>
  );
}
