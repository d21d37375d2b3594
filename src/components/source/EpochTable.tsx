import { useLayoutEffect, useMemo, useRef, useState } from 'react';
import {
  createColumnHelper,
  flexRender,
  getCoreRowModel,
  getFilteredRowModel,
  getSortedRowModel,
  useReactTable,
  type SortingState,
} from '@tanstack/react-table';
import SortableHeader from '../table/SortableHeader';
import type { EpochDecision } from '../../lib/client/workspace/source-rules';

interface Props {
  decisions: EpochDecision[];
  onOverride: (eventIndex: number, decision: 'keep' | 'reject' | null) => void;
  onSelect: (eventIndex: number) => void;
}

const column = createColumnHelper<EpochDecision>();

/**
 * Above this many rows only the rows in view (and a margin) are in the page: a two-hour recording has thousands of
 * epochs, and a row each with its select would take seconds to build and lay out before anything else is shown.
 */
const WINDOWED_FROM = 200;
/** Rows kept in the page above and below the visible ones, so Tab and small scrolls never meet an empty row. */
const MARGIN_ROWS = 12;
const uv = (v: number | null | undefined) => (v === null || v === undefined ? '—' : v.toFixed(v >= 100 ? 0 : 1));

/** Every epoch of every condition, with the rules' measures, the verdict and a manual decision. */
export default function EpochTable({ decisions, onOverride, onSelect }: Props) {
  const [sorting, setSorting] = useState<SortingState>([]);
  // The columns are made once: a new cell function on every render would rebuild every row's select.
  const override = useRef(onOverride);
  override.current = onOverride;
  const box = useRef<HTMLDivElement>(null);
  const [view, setView] = useState({ top: 0, height: 320, rowHeight: 28 });
  const [condition, setCondition] = useState('');
  const [only, setOnly] = useState<'all' | 'rejected' | 'kept'>('all');
  const conditions = useMemo(() => [...new Set(decisions.map((d) => d.condition))], [decisions]);
  // A row decided by hand stays in view whatever the verdict filter, so changing a decision never makes the row
  // vanish under the pointer; it carries an "overridden by hand" marker instead.
  const rows = useMemo(
    () => decisions.filter((d) => (condition === '' || d.condition === condition) && (only === 'all' || d.manual !== null || (only === 'rejected') === d.rejected)),
    [decisions, condition, only],
  );
  const heldByHand = only === 'all' ? 0 : rows.filter((d) => d.manual !== null && (only === 'rejected') !== d.rejected).length;

  const columns = useMemo(
    () => [
      column.accessor((d) => d.eventIndex + 1, { id: 'event', header: 'Event' }),
      column.accessor('condition', { header: 'Condition' }),
      column.accessor('onsetSeconds', { header: 'Onset (s)', cell: (c) => c.getValue().toFixed(3) }),
      column.accessor((d) => d.peakToPeakMicrovolts ?? -1, {
        id: 'p2p',
        header: 'Peak-to-peak (µV)',
        cell: (c) => `${uv(c.row.original.peakToPeakMicrovolts)}${c.row.original.peakToPeakChannel ? ` ${c.row.original.peakToPeakChannel}` : ''}`,
      }),
      column.accessor((d) => d.minStdMicrovolts ?? -1, {
        id: 'sd',
        header: 'Lowest SD (µV)',
        cell: (c) => `${c.row.original.minStdMicrovolts === null || c.row.original.minStdMicrovolts === undefined ? '—' : c.row.original.minStdMicrovolts.toFixed(2)}${c.row.original.minStdChannel ? ` ${c.row.original.minStdChannel}` : ''}`,
      }),
      column.accessor((d) => (d.rejected ? 1 : 0), {
        id: 'verdict',
        header: 'Verdict',
        cell: (c) => (
          <>
            {c.row.original.rejected ? <span className="font-semibold text-coral-deep">✕ Rejected</span> : <span className="font-semibold text-kelp-deep">✓ Kept</span>}
            {c.row.original.manual !== null && (
              <span className="ml-1 rounded border border-ink-soft px-1 font-sans text-2xs text-ink" data-testid="by-hand-marker">
                overridden by hand
              </span>
            )}
          </>
        ),
      }),
      column.accessor((d) => d.reasons.join('; '), { id: 'reasons', header: 'Why', enableSorting: false }),
      column.display({
        id: 'decision',
        header: 'Decision',
        cell: (c) => {
          const d = c.row.original;
          const fits = d.fit === undefined || d.fit === 'fits';
          return (
            <select
              aria-label={`Decision for event ${d.eventIndex + 1}`}
              value={d.manual ?? 'rules'}
              disabled={!fits}
              title={fits ? undefined : 'An epoch that does not fit the recording cannot be kept'}
              onChange={(e) => override.current(d.eventIndex, e.target.value === 'rules' ? null : (e.target.value as 'keep' | 'reject'))}
              className="rounded border border-shell bg-foam px-1 py-0.5"
            >
              <option value="rules">by the rules</option>
              <option value="keep">keep</option>
              <option value="reject">reject</option>
            </select>
          );
        },
      }),
    ],
    [],
  );

  const table = useReactTable({
    data: rows,
    columns,
    state: { sorting },
    onSortingChange: setSorting,
    getCoreRowModel: getCoreRowModel(),
    getSortedRowModel: getSortedRowModel(),
    getFilteredRowModel: getFilteredRowModel(),
    getRowId: (d) => String(d.eventIndex),
  });
  const all = table.getRowModel().rows;
  const windowed = all.length > WINDOWED_FROM;
  const first = windowed ? Math.max(0, Math.floor(view.top / view.rowHeight) - MARGIN_ROWS) : 0;
  const last = windowed ? Math.min(all.length, Math.ceil((view.top + view.height) / view.rowHeight) + MARGIN_ROWS) : all.length;
  // The real row height, once rows are in the page (text size and zoom change it).
  useLayoutEffect(() => {
    const row = box.current?.querySelector('tbody tr[data-testid="epoch-row"]');
    const h = row?.getBoundingClientRect().height ?? 0;
    if (windowed && h > 0 && Math.abs(h - view.rowHeight) > 0.5) setView((v) => ({ ...v, rowHeight: h, height: box.current?.clientHeight ?? v.height }));
  }, [windowed, view.rowHeight]);
  const onScroll = () => {
    const el = box.current;
    if (el && windowed) setView((v) => (v.top === el.scrollTop && v.height === el.clientHeight ? v : { ...v, top: el.scrollTop, height: el.clientHeight }));
  };
  const spacer = (rows: number, key: string) =>
    rows > 0 && (
      <tr key={key} aria-hidden="true" style={{ height: `${rows * view.rowHeight}px` }}>
        <td colSpan={columns.length} className="p-0" />
      </tr>
    );

  return (
    <div className="grid gap-2">
      <div className="flex flex-wrap items-end gap-3">
        <div className="field">
          <label htmlFor="epoch-filter-condition">Show condition</label>
          <select id="epoch-filter-condition" value={condition} onChange={(e) => setCondition(e.target.value)}>
            <option value="">all conditions</option>
            {conditions.map((c) => (
              <option key={c}>{c}</option>
            ))}
          </select>
        </div>
        <div className="field">
          <label htmlFor="epoch-filter-verdict">Show epochs</label>
          <select id="epoch-filter-verdict" value={only} onChange={(e) => setOnly(e.target.value as typeof only)}>
            <option value="all">all</option>
            <option value="rejected">rejected only</option>
            <option value="kept">kept only</option>
          </select>
        </div>
        <p className="text-sm text-ink-soft" aria-live="polite">
          {rows.length} of {decisions.length} epochs shown
          {heldByHand > 0 && `, ${heldByHand} of them ${only === 'rejected' ? 'kept' : 'rejected'} by hand and shown so you can see your decision`}
        </p>
      </div>
      <div ref={box} onScroll={onScroll} className="max-h-[20rem] overflow-auto rounded border border-sand-deep">
        <table className="data-table" data-testid="epoch-table" aria-rowcount={all.length + 1}>
          <thead className="sticky top-0 bg-foam">
            {table.getHeaderGroups().map((g) => (
              <tr key={g.id}>
                {g.headers.map((h) => (
                  <SortableHeader key={h.id} header={h} />
                ))}
              </tr>
            ))}
          </thead>
          <tbody>
            {spacer(first, 'above')}
            {all.slice(first, last).map((r, i) => (
              <tr
                key={r.id}
                aria-rowindex={first + i + 2}
                data-testid="epoch-row"
                data-event-index={r.original.eventIndex}
                data-verdict={r.original.rejected ? 'rejected' : 'kept'}
                data-by-hand={r.original.manual ?? undefined}
                className={r.original.rejected ? 'bg-coral-pale/40' : undefined}
                onFocus={() => onSelect(r.original.eventIndex)}
                onMouseEnter={() => onSelect(r.original.eventIndex)}
              >
                {r.getVisibleCells().map((c) => (
                  <td key={c.id} className={c.column.id === 'reasons' ? 'text-xs' : 'font-mono text-xs whitespace-nowrap'}>
                    {flexRender(c.column.columnDef.cell, c.getContext())}
                  </td>
                ))}
              </tr>
            ))}
            {spacer(all.length - last, 'below')}
          </tbody>
        </table>
      </div>
    </div>
  );
}
