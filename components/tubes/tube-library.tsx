'use client';

import type { ColumnDef } from '@tanstack/react-table';
import Link from 'next/link';
import { useRouter } from 'next/navigation';
import { useState } from 'react';
import { Badge } from '@/components/ui/badge';
import { Button } from '@/components/ui/button';
import { DataTable } from '@/components/ui/data-table';
import type { TubeSummary } from '@/lib/tubes/service';
import { MODEL_KIND_LABELS } from '@/lib/validation/tube';
import { formatMaybe } from '@/lib/format/number';
import { familyLabel, heaterText } from './labels';

const rating = (t: TubeSummary, key: keyof TubeSummary['ratings']) => t.ratings[key]?.value ?? null;

export function TubeLibrary({ tubes }: { tubes: TubeSummary[] }) {
  const router = useRouter();
  const [picked, setPicked] = useState<number[]>([]);
  // retired types stay on file for old designs but are hidden from the list unless asked for
  const [showRetired, setShowRetired] = useState(false);
  const retiredCount = tubes.filter((t) => t.retired).length;
  const shown = showRetired ? tubes : tubes.filter((t) => !t.retired);
  const toggle = (id: number) => setPicked((p) => (p.includes(id) ? p.filter((x) => x !== id) : p.length >= 3 ? p : [...p, id]));

  const ratingColumn = (id: keyof TubeSummary['ratings'], header: string, unit: string): ColumnDef<TubeSummary, unknown> => ({
    id,
    header,
    accessorFn: (t) => rating(t, id) ?? -1,
    sortUndefined: 'last',
    cell: ({ row }) => <span className="num">{formatMaybe(rating(row.original, id), unit)}</span>,
  });

  const columns: ColumnDef<TubeSummary, unknown>[] = [
    {
      id: 'pick',
      header: 'Compare',
      enableSorting: false,
      cell: ({ row }) => {
        const t = row.original;
        const on = picked.includes(t.id);
        return (
          <input
            type="checkbox"
            aria-label={`Compare ${t.designation}`}
            className="size-4 accent-[var(--heater)]"
            checked={on}
            disabled={!t.defaultModel || (!on && picked.length >= 3)}
            title={t.defaultModel ? undefined : 'No model yet: nothing to draw'}
            onChange={() => toggle(t.id)}
          />
        );
      },
    },
    {
      id: 'designation',
      // aliases in the value so the search box finds ECC83 as well as 12AX7
      accessorFn: (t) => [t.designation, ...t.aliases].join(' '),
      // 2A3, 6DJ8, 6L6GC, 12AX7, 300B, EL34: numbers compared as numbers, the way the trade lists them
      sortingFn: (a, b) => a.original.designation.localeCompare(b.original.designation, 'en', { numeric: true, sensitivity: 'base' }),
      header: 'Type',
      cell: ({ row }) => (
        <div>
          <Link href={`/tubes/${row.original.id}`} className="font-semibold text-ink underline-offset-2 hover:underline">
            {row.original.designation}
          </Link>
          {row.original.aliases.length ? <span className="ml-2 text-xs text-muted">{row.original.aliases.join(', ')}</span> : null}
        </div>
      ),
    },
    { id: 'family', header: 'Family', accessorFn: (t) => familyLabel(t.family, t.sections) },
    { id: 'heater', header: 'Heater', accessorFn: (t) => t.heater.voltage ?? -1, cell: ({ row }) => <span className="num text-xs">{heaterText(row.original.heater)}</span> },
    ratingColumn('plateVoltage', 'Va max', 'V'),
    ratingColumn('plateDissipation', 'Pa max', 'W'),
    ratingColumn('cathodeCurrent', 'Ik max', 'A'),
    ratingColumn('screenVoltage', 'Vg2 max', 'V'),
    {
      id: 'model',
      header: 'Default model',
      accessorFn: (t) => t.defaultModel?.name ?? '',
      cell: ({ row }) => {
        const m = row.original.defaultModel;
        return m ? (
          <span className="text-xs">
            {m.name} <span className="text-muted">· {MODEL_KIND_LABELS[m.kind]}</span>
            {row.original.modelCount > 1 ? <span className="text-muted"> · +{row.original.modelCount - 1}</span> : null}
          </span>
        ) : (
          <span className="text-xs text-muted">ratings only</span>
        );
      },
    },
    { id: 'curves', header: 'Curve sets', accessorFn: (t) => t.curveSetCount, cell: ({ getValue }) => <span className="num">{getValue() as number}</span> },
    {
      id: 'status',
      header: 'Entry',
      accessorFn: (t) => (t.retired ? 'retired' : t.published ? 'published' : 'workshop'),
      cell: ({ getValue }) => {
        const v = getValue() as string;
        return <Badge tone={v === 'published' ? 'info' : v === 'retired' ? 'over' : 'neutral'}>{v}</Badge>;
      },
    },
  ];

  const compare = picked.length >= 2 ? `/tubes/compare?ids=${picked.join(',')}` : null;
  return (
    <DataTable
      data={shown}
      columns={columns}
      testId="tube-table"
      filterPlaceholder="Search type or alias (e.g. ECC83)…"
      initialSort={[{ id: 'designation', desc: false }]}
      toolbar={
        <div className="flex flex-wrap items-center gap-2 text-xs text-muted">
          {retiredCount > 0 ? (
            <label className="mr-2 inline-flex items-center gap-1.5">
              <input type="checkbox" className="size-4 accent-[var(--heater)]" checked={showRetired} onChange={(e) => setShowRetired(e.target.checked)} data-testid="show-retired" />
              Show retired types ({retiredCount})
            </label>
          ) : null}
          <span>{picked.length === 0 ? 'Tick two or three types to overlay their curves.' : `${picked.length} of 3 picked`}</span>
          <Button size="sm" variant="secondary" disabled={!compare} onClick={() => compare && router.push(compare)}>
            Compare picked
          </Button>
          {picked.length ? (
            <Button size="sm" variant="ghost" onClick={() => setPicked([])}>Clear</Button>
          ) : null}
        </div>
      }
    />
  );
}
