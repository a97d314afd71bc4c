'use client';

import { flexRender, getCoreRowModel, getFilteredRowModel, getSortedRowModel, useReactTable, type ColumnDef, type SortingState } from '@tanstack/react-table';
import { useState } from 'react';
import { Input } from './input';

// Sortable, filterable table used by every list screen (TanStack Table).
export function DataTable<T>({ data, columns, filterPlaceholder = 'Filter…', initialSort = [], testId, toolbar }: {
  data: T[];
  columns: ColumnDef<T, unknown>[];
  filterPlaceholder?: string;
  initialSort?: SortingState;
  testId?: string;
  toolbar?: React.ReactNode;
}) {
  const [sorting, setSorting] = useState<SortingState>(initialSort);
  const [globalFilter, setGlobalFilter] = useState('');
  const table = useReactTable({
    data,
    columns,
    state: { sorting, globalFilter },
    onSortingChange: setSorting,
    onGlobalFilterChange: setGlobalFilter,
    getCoreRowModel: getCoreRowModel(),
    getSortedRowModel: getSortedRowModel(),
    getFilteredRowModel: getFilteredRowModel(),
  });
  return (
    <div className="space-y-3">
      <div className="flex flex-wrap items-center gap-2">
        <Input aria-label="Filter rows" placeholder={filterPlaceholder} value={globalFilter} onChange={(e) => setGlobalFilter(e.target.value)} className="max-w-xs" />
        {toolbar}
        <span className="ml-auto text-xs text-muted">{table.getRowModel().rows.length} of {data.length}</span>
      </div>
      <div className="overflow-x-auto rounded-lg border border-rule bg-sheet">
        <table className="w-full text-sm" data-testid={testId}>
          <thead className="border-b border-rule text-left text-xs text-muted">
            {table.getHeaderGroups().map((hg) => (
              <tr key={hg.id}>
                {hg.headers.map((h) => {
                  const sorted = h.column.getIsSorted();
                  return (
                    <th key={h.id} className="px-3 py-2 font-medium" aria-sort={sorted === 'asc' ? 'ascending' : sorted === 'desc' ? 'descending' : undefined}>
                      {h.isPlaceholder ? null : h.column.getCanSort() ? (
                        <button type="button" className="inline-flex items-center gap-1 hover:text-ink" onClick={h.column.getToggleSortingHandler()}>
                          {flexRender(h.column.columnDef.header, h.getContext())}
                          <span aria-hidden>{sorted === 'asc' ? '▲' : sorted === 'desc' ? '▼' : '↕'}</span>
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
          <tbody className="divide-y divide-rule">
            {table.getRowModel().rows.map((row) => (
              <tr key={row.id} className="hover:bg-paper/60">
                {row.getVisibleCells().map((cell) => (
                  <td key={cell.id} className="px-3 py-2 align-middle">
                    {flexRender(cell.column.columnDef.cell, cell.getContext())}
                  </td>
                ))}
              </tr>
            ))}
            {table.getRowModel().rows.length === 0 ? (
              <tr>
                <td colSpan={columns.length} className="px-3 py-6 text-center text-muted">No rows match.</td>
              </tr>
            ) : null}
          </tbody>
        </table>
      </div>
    </div>
  );
}
