'use client';

import Papa from 'papaparse';
import { useMemo, useState, type ReactNode } from 'react';
import { Button } from '@/components/ui/button';
import { cn } from '@/lib/utils';

export type Column<R> = {
  key: string;
  label: string;
  /** sort and CSV value (SI number or text) */
  value: (r: R) => number | string | null;
  /** on-screen cell (defaults to the value) */
  cell?: (r: R) => ReactNode;
  numeric?: boolean;
};

/** A table sortable by any column, with its rows downloadable as CSV (the values in SI units). */
export function SortableTable<R>({ rows, columns, fileName, rowKey, caption, initialSort }: { rows: R[]; columns: Column<R>[]; fileName: string; rowKey: (r: R, i: number) => string; caption?: string; initialSort?: { key: string; desc: boolean } }) {
  const [sort, setSort] = useState<{ key: string; desc: boolean } | null>(initialSort ?? null);
  const sorted = useMemo(() => {
    if (!sort) return rows;
    const col = columns.find((c) => c.key === sort.key);
    if (!col) return rows;
    return [...rows].sort((a, b) => {
      const x = col.value(a);
      const y = col.value(b);
      if (x === null && y === null) return 0;
      if (x === null) return 1;
      if (y === null) return -1;
      const c = typeof x === 'number' && typeof y === 'number' ? x - y : String(x).localeCompare(String(y));
      return sort.desc ? -c : c;
    });
  }, [rows, columns, sort]);
  const download = () => {
    const csv = Papa.unparse({ fields: columns.map((c) => c.label), data: sorted.map((r) => columns.map((c) => c.value(r) ?? '')) });
    const url = URL.createObjectURL(new Blob([csv], { type: 'text/csv' }));
    const a = document.createElement('a');
    a.href = url;
    a.download = fileName;
    a.click();
    URL.revokeObjectURL(url);
  };
  return (
    <div className="space-y-2">
      <div className="flex justify-end">
        <Button type="button" variant="secondary" size="sm" onClick={download}>
          Download CSV
        </Button>
      </div>
      <div className="overflow-x-auto">
        <table className="w-full text-sm">
          {caption ? <caption className="sr-only">{caption}</caption> : null}
          <thead>
            <tr className="border-b border-rule text-left text-xs text-muted">
              {columns.map((c) => (
                <th key={c.key} scope="col" className={cn('px-2 py-1.5 font-medium', c.numeric && 'text-right')} aria-sort={sort?.key === c.key ? (sort.desc ? 'descending' : 'ascending') : 'none'}>
                  <button type="button" className="hover:text-ink hover:underline" onClick={() => setSort((s) => ({ key: c.key, desc: s?.key === c.key ? !s.desc : false }))}>
                    {c.label}
                    {sort?.key === c.key ? (sort.desc ? ' ↓' : ' ↑') : ''}
                  </button>
                </th>
              ))}
            </tr>
          </thead>
          <tbody>
            {sorted.map((r, i) => (
              <tr key={rowKey(r, i)} className="border-b border-rule/60">
                {columns.map((c) => (
                  <td key={c.key} className={cn('px-2 py-1.5', c.numeric && 'num text-right')}>
                    {c.cell ? c.cell(r) : (c.value(r) ?? '–')}
                  </td>
                ))}
              </tr>
            ))}
          </tbody>
        </table>
      </div>
    </div>
  );
}
