'use client';
import { useState } from 'react';
import {
  flexRender,
  getCoreRowModel,
  getFilteredRowModel,
  getSortedRowModel,
  useReactTable,
  type ColumnDef,
  type SortingState,
} from '@tanstack/react-table';
import { inputClass } from './field';
import { cn } from '@/lib/client/cn';

/** A sortable, filterable table (TanStack Table). Headers are buttons so sorting works from the keyboard. */
export function DataTable<T>({
  data,
  columns,
  label,
  filterPlaceholder = 'Filter…',
  initialSort = [],
  empty = 'Nothing here yet.',
}: {
  data: T[];
  columns: ColumnDef<T, unknown>[];
  label: string;
  filterPlaceholder?: string;
  initialSort?: SortingState;
  empty?: string;
}) {
  const [sorting, setSorting] = useState<SortingState>(initialSort);
  const [filter, setFilter] = useState('');
  const table = useReactTable({
    data,
    columns,
    state: { sorting, globalFilter: filter },
    onSortingChange: setSorting,
    onGlobalFilterChange: setFilter,
    getCoreRowModel: getCoreRowModel(),
    getSortedRowModel: getSortedRowModel(),
    getFilteredRowModel: getFilteredRowModel(),
  });
  const id = label.toLowerCase().replace(/[^a-z0-9]+/g, '-');
  const rows = table.getRowModel().rows;
  return (
    <div>
      <div className="flex flex-wrap items-center justify-between gap-2 px-5 py-3">
        <label htmlFor={`${id}-filter`} className="sr-only">
          Filter {label}
        </label>
        <input
          id={`${id}-filter`}
          type="search"
          value={filter}
          onChange={(e) => setFilter(e.target.value)}
          placeholder={filterPlaceholder}
          className={cn(inputClass, 'max-w-xs py-1.5')}
        />
        <p className="text-xs text-ink-500 tabular" aria-live="polite">
          {rows.length} of {data.length} shown
        </p>
      </div>
      <div className="overflow-x-auto">
        <table className="w-full border-t border-ink-100 text-left text-sm" aria-label={label}>
          <thead className="bg-ink-50/70 text-2xs tracking-wide text-ink-500 uppercase">
            {table.getHeaderGroups().map((hg) => (
              <tr key={hg.id}>
                {hg.headers.map((h) => {
                  const sorted = h.column.getIsSorted();
                  return (
                    <th
                      key={h.id}
                      scope="col"
                      aria-sort={sorted === 'asc' ? 'ascending' : sorted === 'desc' ? 'descending' : 'none'}
                      className="px-5 py-2 font-semibold whitespace-nowrap"
                    >
                      {h.column.getCanSort() ? (
                        <button
                          type="button"
                          onClick={h.column.getToggleSortingHandler()}
                          className="inline-flex items-center gap-1 uppercase hover:text-ink-900"
                        >
                          {flexRender(h.column.columnDef.header, h.getContext())}
                          <span aria-hidden className="text-ink-400">
                            {sorted === 'asc' ? '▲' : sorted === 'desc' ? '▼' : '↕'}
                          </span>
                        </button>
                      ) : (
                        flexRender(h.column.columnDef.header, h.getContext())
                      )}
                    </th>
                  );
                })}
              </tr>
            ))}
          </thead>
          <tbody className="divide-y divide-ink-100">
            {rows.length === 0 ? (
              <tr>
                <td colSpan={columns.length} className="px-5 py-6 text-center text-sm text-ink-500">
                  {data.length === 0 ? empty : 'No rows match the filter.'}
                </td>
              </tr>
            ) : (
              rows.map((row) => (
                <tr key={row.id} className="hover:bg-glass-50/40">
                  {row.getVisibleCells().map((cell) => (
                    <td key={cell.id} className="px-5 py-2.5 align-top">
                      {flexRender(cell.column.columnDef.cell, cell.getContext())}
                    </td>
                  ))}
                </tr>
              ))
            )}
          </tbody>
        </table>
      </div>
    </div>
  );
}
