'use client';

import { useRouter } from 'next/navigation';
import { useState } from 'react';
import { Badge } from '@/components/ui/badge';
import { Button } from '@/components/ui/button';
import type { SwapRow } from '@/lib/calc/explore/swap';
import type { StageDTO } from '@/lib/stages/service';
import { formatMetric, PART_WORDS } from './format';
import { openAsDraft } from './open-draft';
import { SortableTable } from './sortable-table';

const TONE = { ok: 'ok', near: 'near', over: 'over', 'not-checked': 'neutral' } as const;

/** Side-by-side table of the library types that fit the socket, with the part changes each would need. */
export function SwapResults({ rows, stage, canEdit }: { rows: SwapRow[]; stage: StageDTO; canEdit: boolean }) {
  const router = useRouter();
  const [busy, setBusy] = useState<string | null>(null);
  const [error, setError] = useState<string | null>(null);
  const open = async (r: SwapRow, withChanges: boolean) => {
    setBusy(`${r.tubeId}-${withChanges}`);
    setError(null);
    try {
      const parts = withChanges ? Object.fromEntries(r.changes.map((c) => [c.path, c.to])) : undefined;
      router.push(await openAsDraft(stage, `${stage.name} (${r.designation}${withChanges && r.changes.length ? ', parts changed' : ''})`, { tubeId: r.tubeId, parts }));
    } catch (e) {
      setError(e instanceof Error ? e.message : 'Could not open the draft.');
      setBusy(null);
    }
  };
  return (
    <div className="space-y-2" data-testid="swap-results">
      {error ? <p role="alert" className="text-sm text-over">{error}</p> : null}
      <SortableTable
        caption="Tube swap"
        fileName={`stage-${stage.id}-tube-swap.csv`}
        rows={rows}
        rowKey={(r) => String(r.tubeId)}
        columns={[
          { key: 'designation', label: 'Type', value: (r) => r.designation, cell: (r) => <span className="num font-medium">{r.designation}{r.current ? <Badge className="ml-1.5" tone="accent">fitted now</Badge> : null}</span> },
          { key: 'vak', label: 'Va–k (V)', value: (r) => r.plateCathodeVoltage, cell: (r) => formatMetric(r.plateCathodeVoltage, 'V'), numeric: true },
          { key: 'ia', label: 'Ia (A)', value: (r) => r.plateCurrent, cell: (r) => formatMetric(r.plateCurrent, 'A'), numeric: true },
          { key: 'vgk', label: 'Vg–k (V)', value: (r) => r.gridCathodeVoltage, cell: (r) => formatMetric(r.gridCathodeVoltage, 'V'), numeric: true },
          { key: 'gain', label: 'Gain', value: (r) => (r.gain === null ? null : Math.abs(r.gain)), cell: (r) => formatMetric(r.gain === null ? null : Math.abs(r.gain), ''), numeric: true },
          { key: 'headroom', label: 'Headroom (V)', value: (r) => r.headroom, cell: (r) => formatMetric(r.headroom, 'V'), numeric: true },
          { key: 'thd', label: 'THD (%)', value: (r) => r.thd, cell: (r) => formatMetric(r.thd, '%'), numeric: true },
          { key: 'power', label: 'Output (W)', value: (r) => r.outputPower, cell: (r) => formatMetric(r.outputPower, 'W'), numeric: true },
          { key: 'pd', label: 'Pa, % of rating', value: (r) => r.plateDissipationPercent, cell: (r) => formatMetric(r.plateDissipationPercent, '%'), numeric: true },
          {
            key: 'status',
            label: 'Ratings',
            value: (r) => r.error ? `not analysed: ${r.error.message}` : (r.worstStatus ?? ''),
            cell: (r) => r.error ? <span className="text-xs text-over">{r.error.message}</span> : r.worstStatus ? <Badge tone={TONE[r.worstStatus]} title={r.ratingsOver.join(', ')}>{r.worstStatus}</Badge> : '–',
          },
          {
            key: 'changes',
            label: 'Parts to change',
            value: (r) => r.changes.map((c) => `${PART_WORDS[c.path] ?? c.path} ${c.from} → ${c.to} (${c.reason})`).join('; '),
            cell: (r) => r.changes.length ? (
              <ul className="text-xs">
                {r.changes.map((c) => (
                  <li key={c.path + c.reason}>
                    {PART_WORDS[c.path] ?? c.path}: <span className="num">{formatMetric(c.from, c.unit)} → {formatMetric(c.to, c.unit)}</span> <span className="text-muted">({c.reason}; then Pa {formatMetric(c.plateDissipationPercent, '%')})</span>
                  </li>
                ))}
              </ul>
            ) : <span className="text-xs text-muted">none</span>,
          },
          {
            key: 'open',
            label: '',
            value: () => null,
            cell: (r) => canEdit && !r.current ? (
              <span className="flex flex-col gap-1">
                <Button type="button" size="sm" variant="secondary" disabled={busy !== null} onClick={() => void open(r, false)}>Open as draft stage</Button>
                {r.changes.length ? <Button type="button" size="sm" variant="secondary" disabled={busy !== null} onClick={() => void open(r, true)}>…with the part changes</Button> : null}
              </span>
            ) : null,
          },
        ]}
      />
    </div>
  );
}
