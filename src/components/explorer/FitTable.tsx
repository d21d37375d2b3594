import { useState } from 'react';
import { createColumnHelper, flexRender, getCoreRowModel, getSortedRowModel, useReactTable, type SortingState } from '@tanstack/react-table';
import SortableHeader from '../table/SortableHeader';

export interface FitRow {
  channel: string;
  exponent: number | null;
  offset: number | null;
  knee: number | null;
  kneeHz: number | null;
  r2: number | null;
  rmse: number | null;
  r2Kept: number | null;
  points: number | null;
  excluded: number | null;
  /** Peaks above the aperiodic line in words: "10.02 Hz +0.58 (2.31 Hz wide)". */
  peaks: string;
}

/** A fit's peaks in words, for the table and the CSV export. */
export function describePeaks(peaks: readonly { centreHz: number; heightLog10: number; bandwidthHz: number }[] | undefined): string {
  if (peaks === undefined || peaks.length === 0) return '';
  return peaks.map((p) => `${p.centreHz.toFixed(2)} Hz +${p.heightLog10.toFixed(2)} (${p.bandwidthHz.toFixed(2)} Hz wide)`).join('; ');
}

const col = createColumnHelper<FitRow>();
const num = (digits: number) => (v: number | null) => (v === null || !Number.isFinite(v) ? '—' : v.toFixed(digits));
const columns = [
  col.accessor('channel', { header: 'channel' }),
  col.accessor('exponent', { header: 'exponent', cell: (c) => num(3)(c.getValue()), sortUndefined: 'last' }),
  col.accessor('offset', { header: 'offset (log10 µV²/Hz)', cell: (c) => num(3)(c.getValue()) }),
  col.accessor('knee', { header: 'knee', cell: (c) => num(2)(c.getValue()) }),
  col.accessor('kneeHz', { header: 'knee (Hz)', cell: (c) => num(2)(c.getValue()) }),
  col.accessor('r2', { header: 'r² (all bins)', cell: (c) => num(4)(c.getValue()) }),
  col.accessor('rmse', { header: 'RMSE (log10, all bins)', cell: (c) => num(4)(c.getValue()) }),
  col.accessor('r2Kept', { header: 'r² (kept bins)', cell: (c) => num(4)(c.getValue()) }),
  col.accessor('points', { header: 'bins', cell: (c) => c.getValue() ?? '—' }),
  col.accessor('excluded', { header: 'peak bins left out', cell: (c) => c.getValue() ?? '—' }),
  col.accessor('peaks', { header: 'peaks above the line (log10)', cell: (c) => c.getValue() || '—', enableSorting: false }),
];

/** Every channel's aperiodic fit, sortable by any column (click or Enter on a header). */
export default function FitTable({ rows, selected, onSelect }: { rows: FitRow[]; selected: string | null; onSelect: (channel: string) => void }) {
  const [sorting, setSorting] = useState<SortingState>([]);
  const table = useReactTable({ data: rows, columns, state: { sorting }, sortDescFirst: false, onSortingChange: setSorting, getCoreRowModel: getCoreRowModel(), getSortedRowModel: getSortedRowModel() });
  return (
    <div className="overflow-x-auto" tabIndex={0} role="region" aria-label="Aperiodic fit of every channel">
      <table className="w-full font-mono text-xs" data-testid="fit-table">
        <thead>
          {table.getHeaderGroups().map((g) => (
            <tr key={g.id} className="border-b border-shell text-left">
              {g.headers.map((h) => (
                <SortableHeader key={h.id} header={h} className="px-2 py-1 font-semibold" />
              ))}
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
