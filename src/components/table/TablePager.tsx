import type { Table } from '@tanstack/react-table';

interface Props<T> {
  table: Table<T>;
  /** The navigation's accessible name, e.g. "Pages of the band table". */
  label: string;
  /** Prefix of the test ids: `<prefix>-page` (where it stands) and `<prefix>-next-page`. */
  testIdPrefix: string;
  pageSizes: readonly number[];
}

/** Previous and next page of a paginated TanStack table, where it stands, and how many rows a page shows. */
export default function TablePager<T>({ table, label, testIdPrefix, pageSizes }: Props<T>) {
  const page = table.getState().pagination;
  return (
    <nav className="flex flex-wrap items-center gap-3 text-sm" aria-label={label}>
      <button type="button" className="rounded-sm border border-shell px-2 py-0.5 disabled:opacity-50" onClick={() => table.previousPage()} disabled={!table.getCanPreviousPage()}>
        previous page
      </button>
      <span data-testid={`${testIdPrefix}-page`}>
        page {page.pageIndex + 1} of {Math.max(1, table.getPageCount())}
      </span>
      <button type="button" className="rounded-sm border border-shell px-2 py-0.5 disabled:opacity-50" onClick={() => table.nextPage()} disabled={!table.getCanNextPage()} data-testid={`${testIdPrefix}-next-page`}>
        next page
      </button>
      <label className="flex items-center gap-1 text-xs text-ink-soft">
        rows per page
        <select className="rounded-sm border border-shell bg-foam px-2 py-1 text-sm text-ink" value={page.pageSize} onChange={(e) => table.setPageSize(Number(e.target.value))}>
          {pageSizes.map((n) => (
            <option key={n}>{n}</option>
          ))}
        </select>
      </label>
    </nav>
  );
}
