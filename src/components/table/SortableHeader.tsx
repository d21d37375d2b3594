import { flexRender, type Header } from '@tanstack/react-table';

interface Props<T> {
  header: Header<T, unknown>;
  /** Classes of the cell (alignment, padding). */
  className?: string;
  testId?: string;
}

/**
 * One column header of a TanStack table: a button that cycles the column's sort when it can sort, the direction as
 * an arrow, and `aria-sort` on the cell (WAI-ARIA 1.2, "aria-sort") so assistive technology reads it too.
 */
export default function SortableHeader<T>({ header, className, testId }: Props<T>) {
  const sorted = header.column.getIsSorted();
  const label = flexRender(header.column.columnDef.header, header.getContext());
  return (
    <th scope="col" className={className} aria-sort={sorted === 'asc' ? 'ascending' : sorted === 'desc' ? 'descending' : 'none'}>
      {header.column.getCanSort() ? (
        <button type="button" className="font-semibold hover:underline" onClick={header.column.getToggleSortingHandler()} data-testid={testId}>
          {label}
          {sorted === 'asc' ? ' ▲' : sorted === 'desc' ? ' ▼' : ''}
        </button>
      ) : (
        label
      )}
    </th>
  );
}
