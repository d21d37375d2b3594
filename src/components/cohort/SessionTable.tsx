import { useMemo, useState } from 'react';
import { createColumnHelper, flexRender, getCoreRowModel, getFilteredRowModel, getSortedRowModel, useReactTable, type SortingState } from '@tanstack/react-table';
import SortableHeader from '../table/SortableHeader';
import type { CohortSessionRow } from '../../lib/cohort/overview';
import { mayEnter } from '../../lib/cohort/model';
import { fmt } from './plots';

export interface SessionTableProps {
  sessions: CohortSessionRow[];
  bands: string[];
  /** The unit of the band values (the recipe's normalization, e.g. "dB"), shown in each band column's header. */
  unit: string;
  window: string;
  condition: string;
  covariateNames: string[];
  covariates: Record<string, Record<string, number>>;
  includeUnsigned: boolean;
  excluded: ReadonlySet<string>;
  onToggle: (id: string, enter: boolean) => void;
}

type Row = CohortSessionRow & { enters: boolean; eligible: boolean };
const column = createColumnHelper<Row>();

/** Subjects and sessions: who enters, status, version, analyst, recipe, and the per-band values (mean over channels). */
export default function SessionTable({ sessions, bands, unit, window, condition, covariateNames, covariates, includeUnsigned, excluded, onToggle }: SessionTableProps) {
  const [sorting, setSorting] = useState<SortingState>([]);
  const [filter, setFilter] = useState('');
  const rows = useMemo<Row[]>(
    () => sessions.map((s) => ({ ...s, eligible: mayEnter(s, includeUnsigned), enters: mayEnter(s, includeUnsigned) && !excluded.has(s.analysisSessionId) })),
    [sessions, includeUnsigned, excluded],
  );
  const columns = useMemo(
    () => [
      column.accessor('enters', {
        header: 'Enters',
        cell: (c) => (
          <input
            type="checkbox"
            aria-label={`${c.row.original.subject} enters the cohort`}
            data-testid="enter-box"
            checked={c.getValue()}
            disabled={!c.row.original.eligible}
            title={c.row.original.eligible ? '' : c.row.original.summaryHash === null ? 'No summary saved for the current version' : 'Not signed off (a lead may include unsigned sessions)'}
            onChange={(e) => onToggle(c.row.original.analysisSessionId, e.target.checked)}
          />
        ),
        enableColumnFilter: false,
      }),
      column.accessor('subject', { header: 'Subject', cell: (c) => <span className="font-mono">{c.getValue()}</span> }),
      column.accessor('status', { header: 'Status', cell: (c) => <span className={`role-badge ${c.getValue() === 'signed off' ? '' : 'cohort-unsigned'}`}>{c.getValue()}</span> }),
      column.accessor('recipeVersion', { header: 'Version', cell: (c) => <span className="font-mono">{c.getValue() ?? '—'}</span> }),
      column.accessor('ownerName', { header: 'Analyst' }),
      column.accessor((r) => r.recipeHash ?? '', { id: 'recipe', header: 'Recipe', cell: (c) => <span className="font-mono text-2xs" title={c.getValue()}>{c.getValue() ? c.getValue().slice(0, 10) + '…' : '—'}</span> }),
      ...bands.map((band) =>
        column.accessor((r) => r.digest[band]?.[window]?.[condition] ?? null, {
          id: `band:${band}`,
          header: () => (
            <>
              {band} <span className="font-normal text-ink-soft">({unit})</span>
            </>
          ),
          sortingFn: (a, b, id) => ((a.getValue<number | null>(id) ?? -Infinity) - (b.getValue<number | null>(id) ?? -Infinity)),
          cell: (c) => <span className="font-mono">{fmt(c.getValue())}</span>,
        }),
      ),
      ...covariateNames.map((name) =>
        column.accessor((r) => covariates[r.subject]?.[name] ?? null, { id: `cov:${name}`, header: name, cell: (c) => <span className="font-mono">{c.getValue() ?? '—'}</span> }),
      ),
    ],
    [bands, unit, window, condition, covariateNames, covariates, onToggle],
  );
  const table = useReactTable({
    data: rows,
    columns,
    state: { sorting, globalFilter: filter },
    onSortingChange: setSorting,
    onGlobalFilterChange: setFilter,
    globalFilterFn: (row, _id, value: string) => {
      const q = value.trim().toLowerCase();
      if (q === '') return true;
      const r = row.original;
      return [r.subject, r.status, r.ownerName, String(r.recipeVersion ?? ''), r.recipeHash ?? ''].some((t) => t.toLowerCase().includes(q));
    },
    getCoreRowModel: getCoreRowModel(),
    getSortedRowModel: getSortedRowModel(),
    getFilteredRowModel: getFilteredRowModel(),
  });
  return (
    <div>
      <label className="field inline-flex max-w-xs">
        <span className="text-sm">Find</span>
        <input type="search" value={filter} onChange={(e) => setFilter(e.target.value)} placeholder="subject, status, analyst…" data-testid="session-filter" />
      </label>
      <div className="mt-2 max-h-[28rem] overflow-auto">
        <table className="data-table" data-testid="cohort-sessions">
          <thead>
            {table.getHeaderGroups().map((g) => (
              <tr key={g.id}>
                {g.headers.map((h) => (
                  <SortableHeader key={h.id} header={h} />
                ))}
              </tr>
            ))}
          </thead>
          <tbody>
            {table.getRowModel().rows.map((r) => (
              <tr key={r.id} data-session-id={r.original.analysisSessionId} data-enters={r.original.enters ? 'yes' : 'no'}>
                {r.getVisibleCells().map((c) => <td key={c.id}>{flexRender(c.column.columnDef.cell, c.getContext())}</td>)}
              </tr>
            ))}
          </tbody>
        </table>
      </div>
      <p className="mt-1 text-2xs text-ink-soft">Band columns: the normalized value in {window} · {condition}, averaged over each session's channels.</p>
    </div>
  );
}
