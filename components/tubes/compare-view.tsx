'use client';

import { useQuery } from '@tanstack/react-query';
import { useRouter } from 'next/navigation';
import { useState } from 'react';
import { CompareChart } from '@/components/charts/lazy';
import { COMPARE_STYLES } from '@/components/charts/series';
import { gridLabel } from '@/components/charts/plate-curves-chart';
import { Caution } from '@/components/shell/caution';
import { Card, CardBody, CardHeader } from '@/components/ui/card';
import { Select } from '@/components/ui/input';
import type { CompareSeries, TubeOption } from '@/lib/tubes/service';
import { fetchJson } from '@/lib/hooks/fetch-json';
import { MODEL_KIND_LABELS } from '@/lib/validation/tube';
import { formatMaybe } from '@/lib/format/number';

type Answer = { vaMax: number; transferPlateVoltage: number; series: CompareSeries[] };

export function CompareView({ options, initialIds }: { options: TubeOption[]; initialIds: number[] }) {
  const router = useRouter();
  const [slots, setSlots] = useState<(number | null)[]>([initialIds[0] ?? null, initialIds[1] ?? null, initialIds[2] ?? null]);
  const [mode, setMode] = useState<'plate' | 'transfer'>('plate');
  const ids = [...new Set(slots.filter((x): x is number => x !== null))];
  const q = useQuery({
    queryKey: ['tube-compare', ids.join(',')],
    queryFn: () => fetchJson<Answer>(`/api/tubes/compare?ids=${ids.join(',')}`),
    enabled: ids.length >= 2,
    placeholderData: (prev) => prev,
  });
  const pick = (i: number, v: string) => {
    const next = [...slots];
    next[i] = v ? Number(v) : null;
    setSlots(next);
    const picked = [...new Set(next.filter((x): x is number => x !== null))];
    router.replace(picked.length ? `/tubes/compare?ids=${picked.join(',')}` : '/tubes/compare', { scroll: false });
  };
  const data = ids.length >= 2 ? q.data : undefined;
  const series =
    data?.series.map((s) => ({
      label: `${s.designation} (${s.modelName})`,
      curves:
        mode === 'plate'
          ? s.plateCurves.map((c) => ({ key: gridLabel(c.gridVoltage), points: c.points.map((p) => ({ x: p.va, ia: p.ia })) }))
          : [{ key: 'transfer', points: s.transfer.map((p) => ({ x: p.vg, ia: p.ia })) }],
    })) ?? [];
  return (
    <div className="space-y-4">
      <Caution compact />
      <div className="flex flex-wrap items-end gap-3">
        {slots.map((v, i) => (
          <label key={i} className="space-y-1 text-xs text-muted">
            <span className="flex items-center gap-1.5">
              <svg width="22" height="8" aria-hidden>
                <line x1="1" y1="4" x2="21" y2="4" stroke={COMPARE_STYLES[i]!.color} strokeWidth="2" strokeDasharray={COMPARE_STYLES[i]!.dash} />
              </svg>
              Type {i + 1}
              {i === 2 ? ' (optional)' : ''}
            </span>
            <Select aria-label={`Type ${i + 1}`} className="w-48" value={v ?? ''} onChange={(e) => pick(i, e.target.value)}>
              <option value="">—</option>
              {options.map((o) => (
                <option key={o.id} value={o.id} disabled={slots.includes(o.id) && v !== o.id}>
                  {o.designation}
                </option>
              ))}
            </Select>
          </label>
        ))}
        <div className="ml-auto inline-flex rounded-md border border-rule p-0.5" role="group" aria-label="View">
          {(['plate', 'transfer'] as const).map((m) => (
            <button key={m} type="button" aria-pressed={mode === m} onClick={() => setMode(m)} className={`rounded px-3 py-1 text-sm ${mode === m ? 'bg-heater/15 text-heater-ink' : 'text-muted hover:text-ink'}`}>
              {m === 'plate' ? 'Plate curves' : 'Transfer curves'}
            </button>
          ))}
        </div>
      </div>
      <Card>
        <CardHeader title={mode === 'plate' ? 'Plate curves' : `Transfer curves at Va = ${formatMaybe(data?.transferPlateVoltage ?? 250, 'V')}`} />
        <CardBody>
          {ids.length < 2 ? (
            <p className="text-sm text-muted">Choose at least two types (only types with a model are listed).</p>
          ) : q.isError ? (
            <p role="alert" className="text-sm text-over">{q.error.message}</p>
          ) : (
            <CompareChart series={series} mode={mode} xMax={data?.vaMax} />
          )}
          {data ? (
            <ul className="mt-3 space-y-1 text-xs text-muted">
              {data.series.map((s) => (
                <li key={s.tubeTypeId}>
                  <span className="text-ink">{s.designation}</span>: {s.modelName} ({MODEL_KIND_LABELS[s.kind]})
                  {mode === 'plate' ? `, grid steps ${s.plateCurves.map((c) => gridLabel(c.gridVoltage)).join(', ')}` : ''}
                  {s.screenVoltage !== null ? `, screen at ${formatMaybe(s.screenVoltage, 'V')}` : ''}
                  {s.plateDissipation ? `; Pa(max) ${formatMaybe(s.plateDissipation, 'W')}` : ''}
                </li>
              ))}
            </ul>
          ) : null}
        </CardBody>
      </Card>
    </div>
  );
}
