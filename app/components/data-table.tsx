import {
  columnFilteringFeature,
  createColumnHelper,
  createFilteredRowModel,
  createSortedRowModel,
  filterFn_includesString,
  globalFilteringFeature,
  rowSortingFeature,
  sortFn_alphanumeric,
  sortFn_basic,
  sortFn_datetime,
  sortFn_text,
  tableFeatures,
  useTable,
  type ColumnDef,
  type RowData,
  type SortingState,
} from '@tanstack/react-table';
import { useId, useState } from 'react';
import { cx } from './ui';

/** The features every staff table has: sort by any column, filter by a search box. */
export const staffTableFeatures = tableFeatures({
  rowSortingFeature,
  sortedRowModel: createSortedRowModel(),
  sortFns: { alphanumeric: sortFn_alphanumeric, basic: sortFn_basic, datetime: sortFn_datetime, text: sortFn_text },
  columnFilteringFeature,
  globalFilteringFeature,
  filteredRowModel: createFilteredRowModel(),
  filterFns: { includesString: filterFn_includesString },
});

export type StaffFeatures = typeof staffTableFeatures;

export function staffColumnHelper<Row extends RowData>() {
  return createColumnHelper<StaffFeatures, Row>();
}

export interface ColumnMetaInfo {
  align?: 'right';
}

/** A sortable, filterable table: dense but quiet, numbers right-aligned. */
export function DataTable<Row extends RowData>({
  columns,
  data,
  caption,
  filterLabel = 'Filter',
  initialSorting = [],
  empty = 'Nothing to show.',
}: {
  // TanStack's own examples type a mixed list of columns with `any` as the value type
  // eslint-disable-next-line @typescript-eslint/no-explicit-any
  columns: ColumnDef<StaffFeatures, Row, any>[];
  data: Row[];
  caption: string;
  filterLabel?: string;
  initialSorting?: SortingState;
  empty?: string;
}) {
  const [sorting, setSorting] = useState<SortingState>(initialSorting);
  const [globalFilter, setGlobalFilter] = useState('');
  const filterId = useId();
  const table = useTable({
    features: staffTableFeatures,
    columns,
    data,
    globalFilterFn: 'includesString',
    state: { sorting, globalFilter },
    onSortingChange: setSorting,
    onGlobalFilterChange: setGlobalFilter,
  });
  const rows = table.getRowModel().rows;
  return (
    <div className="flex flex-col gap-3">
      <div className="flex flex-wrap items-end gap-3">
        <div className="flex flex-col gap-1">
          <label htmlFor={filterId} className="text-sm font-semibold text-slate-700">
            {filterLabel}
          </label>
          <input
            id={filterId}
            type="search"
            value={globalFilter}
            onChange={(e) => setGlobalFilter(e.target.value)}
            className="min-h-11 w-72 max-w-full rounded-lg border border-slate-300 bg-white px-3"
          />
        </div>
        <p className="pb-2 text-sm text-slate-600" aria-live="polite">
          {rows.length} of {data.length} shown
        </p>
      </div>
      <div className="relative overflow-x-auto rounded-lg border border-slate-200 bg-white">
        <table className="w-full text-left text-sm">
          <caption className="sr-only">{caption}</caption>
          <thead className="border-b border-slate-200 bg-slate-50 text-slate-700">
            {table.getHeaderGroups().map((group) => (
              <tr key={group.id}>
                {group.headers.map((header) => {
                  const sorted = header.column.getIsSorted();
                  const meta = header.column.columnDef.meta as ColumnMetaInfo | undefined;
                  const canSort = header.column.getCanSort();
                  return (
                    <th
                      key={header.id}
                      scope="col"
                      aria-sort={sorted === 'asc' ? 'ascending' : sorted === 'desc' ? 'descending' : undefined}
                      className={cx('px-3 py-2 font-semibold whitespace-nowrap', meta?.align === 'right' && 'text-right')}
                    >
                      {header.isPlaceholder ? null : canSort ? (
                        <button
                          type="button"
                          onClick={header.column.getToggleSortingHandler()}
                          className="inline-flex min-h-9 items-center gap-1 rounded hover:text-accent-800"
                        >
                          <table.FlexRender header={header} />
                          <span aria-hidden="true" className="text-xs text-slate-500">
                            {sorted === 'asc' ? '▲' : sorted === 'desc' ? '▼' : '↕'}
                          </span>
                        </button>
                      ) : (
                        <table.FlexRender header={header} />
                      )}
                    </th>
                  );
                })}
              </tr>
            ))}
          </thead>
          <tbody>
            {rows.length === 0 ? (
              <tr>
                <td colSpan={columns.length} className="px-3 py-6 text-center text-slate-600">
                  {empty}
                </td>
              </tr>
            ) : (
              rows.map((row) => (
                <tr key={row.id} className="border-b border-slate-100 last:border-0 hover:bg-slate-50">
                  {row.getAllCells().map((cell) => {
                    const meta = cell.column.columnDef.meta as ColumnMetaInfo | undefined;
                    return (
                      <td key={cell.id} className={cx('px-3 py-2 align-middle', meta?.align === 'right' && 'num text-right')}>
                        <table.FlexRender cell={cell} />
                      </td>
                    );
                  })}
                </tr>
              ))
            )}
          </tbody>
        </table>
      </div>
    </div>
  );
}
