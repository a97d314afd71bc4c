'use client';

import { useRef, useState } from 'react';
import { StatusBadge } from '@/components/ui/badge';
import { Button } from '@/components/ui/button';
import { Card, CardBody, CardHeader } from '@/components/ui/card';
import { METHOD_WORDS } from '@/lib/calc/bench';
import type { BenchCheckDTO, BenchPhoto } from '@/lib/bench/service';
import { cn, formatDateTime } from '@/lib/utils';
import { formatMaybe, formatDeviation, formatTolerance } from '@/lib/format/number';
import { uploadPhoto } from './bench-api';

const VERDICT_WORDS = {
  pass: 'Every reading is within tolerance of the design and inside the tube’s ratings.',
  check: 'Something is outside tolerance or close to a rating: look at the points below before signing the build off.',
  fail: 'A reading is over a rating or far from the design: find the cause before the amplifier is used.',
};

export function BenchCheckCard({ check, highlight = false, bare = false, canUpload, onPhoto }: { check: BenchCheckDTO; highlight?: boolean; bare?: boolean; canUpload: boolean; onPhoto?: (p: BenchPhoto) => void }) {
  const body = (
    <div className="space-y-3">
      <div className="flex flex-wrap items-center gap-3">
        <StatusBadge status={check.verdict} className="px-2 py-1 text-sm" />
        <p className="text-sm">{VERDICT_WORDS[check.verdict]}</p>
      </div>
      {check.summary.length ? (
        <ul className="space-y-1.5" data-testid="bench-advice">
          {check.summary.map((s) => (
            <li key={s} className={cn('rounded-md border-l-4 bg-paper px-3 py-1.5 text-sm', check.verdict === 'fail' ? 'border-over' : 'border-near')}>
              {s}.
            </li>
          ))}
        </ul>
      ) : null}
      <div className="overflow-x-auto">
        <table className="w-full min-w-[640px] text-sm" data-testid="bench-comparisons">
          <thead className="border-b border-rule text-left text-xs text-muted">
            <tr>
              <th className="py-1.5 pr-2 font-medium">Quantity</th>
              <th className="py-1.5 pr-2 text-right font-medium">Bench</th>
              <th className="py-1.5 pr-2 text-right font-medium">Design</th>
              <th className="py-1.5 pr-2 text-right font-medium">Deviation</th>
              <th className="py-1.5 pr-2 text-right font-medium">Tolerance</th>
              <th className="py-1.5 pr-2 text-right font-medium">Rating</th>
              <th className="py-1.5 font-medium">Verdict</th>
            </tr>
          </thead>
          <tbody className="divide-y divide-rule">
            {check.comparisons.map((c) => (
              <tr key={c.key} data-key={c.key}>
                <td className="py-1.5 pr-2">
                  {c.label}
                  {c.derived ? <span className="ml-1 text-xs text-muted">(derived)</span> : null}
                </td>
                <td className="num py-1.5 pr-2 text-right">{formatMaybe(c.measured, c.unit)}</td>
                <td className="num py-1.5 pr-2 text-right text-muted">{formatMaybe(c.design, c.unit)}</td>
                <td className={cn('num py-1.5 pr-2 text-right', c.deviation !== null && Math.abs(c.deviation) > c.tolerance ? (Math.abs(c.deviation) > 2 * c.tolerance ? 'text-over' : 'text-near') : '')}>{formatDeviation(c.deviation)}</td>
                <td className="num py-1.5 pr-2 text-right text-xs text-muted" title={c.toleranceSource === 'project' ? 'set for this project' : 'common practice'}>
                  {formatTolerance(c.tolerance)}
                  {c.toleranceSource === 'project' ? ' (project)' : ''}
                </td>
                <td className="num py-1.5 pr-2 text-right text-xs">
                  {c.limit !== null ? (
                    <span className="inline-flex items-center gap-1.5">
                      {formatMaybe(c.limit, c.unit)} <StatusBadge status={c.ratingStatus} />
                    </span>
                  ) : c.ratingStatus !== 'not-checked' ? (
                    <StatusBadge status={c.ratingStatus} />
                  ) : (
                    <span className="text-muted">—</span>
                  )}
                </td>
                <td className="py-1.5">
                  <StatusBadge status={c.status} />
                </td>
              </tr>
            ))}
          </tbody>
        </table>
      </div>
      <p className="text-xs text-muted">
        Plate current from {METHOD_WORDS[check.readings.plateCurrentMethod]}; Vpk = Vplate − Vcathode; Pa = Vpk × Ia.
        {check.tubeSerial ? (
          <>
            {' '}
            Tube <span className="num">{check.tubeSerial}</span>.
          </>
        ) : null}
      </p>
      {check.notes ? <p className="whitespace-pre-wrap rounded-md bg-paper px-3 py-2 text-sm">{check.notes}</p> : null}
      <Photos check={check} canUpload={canUpload} onPhoto={onPhoto} />
    </div>
  );
  if (bare) return body;
  return (
    <Card className={highlight ? (check.verdict === 'fail' ? 'border-over/60' : check.verdict === 'check' ? 'border-near/60' : 'border-ok/60') : undefined}>
      <CardHeader title={`Bench check · ${formatDateTime(check.createdAt)}`} actions={<span className="text-xs text-muted">{check.technician?.displayName}</span>} />
      <CardBody>{body}</CardBody>
    </Card>
  );
}

function Photos({ check, canUpload, onPhoto }: { check: BenchCheckDTO; canUpload: boolean; onPhoto?: (p: BenchPhoto) => void }) {
  const ref = useRef<HTMLInputElement>(null);
  const [error, setError] = useState<string | null>(null);
  const [busy, setBusy] = useState(false);
  if (!check.photos.length && !canUpload) return null;
  return (
    <div className="space-y-2">
      {check.photos.length ? (
        <div className="flex flex-wrap gap-2">
          {check.photos.map((p) => (
            <a key={p.id} href={p.url} target="_blank" rel="noreferrer" className="block overflow-hidden rounded-md border border-rule">
              {/* eslint-disable-next-line @next/next/no-img-element */}
              <img src={p.url} alt={p.fileName} className="h-24 w-32 object-cover" />
            </a>
          ))}
        </div>
      ) : null}
      {canUpload ? (
        <div className="flex items-center gap-2">
          <input ref={ref} type="file" accept="image/jpeg,image/png,image/webp" aria-label="Add a photo to this check" className="text-xs text-muted" />
          <Button
            type="button"
            size="sm"
            variant="secondary"
            disabled={busy}
            onClick={async () => {
              const f = ref.current?.files?.[0];
              if (!f) return setError('Choose a photo first.');
              setBusy(true);
              setError(null);
              try {
                onPhoto?.(await uploadPhoto(check.id, f));
                if (ref.current) ref.current.value = '';
              } catch (err) {
                setError(err instanceof Error ? err.message : 'Upload failed.');
              } finally {
                setBusy(false);
              }
            }}
          >
            Add photo
          </Button>
          {error ? <span className="text-xs text-over">{error}</span> : null}
        </div>
      ) : null}
    </div>
  );
}
