'use client';

import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import Link from 'next/link';
import { useState } from 'react';
import { PlateCurvesChart, TransferChart } from '@/components/charts/lazy';
import { curveSeriesFromPlot } from '@/components/charts/series';
import { Caution } from '@/components/shell/caution';
import { Badge } from '@/components/ui/badge';
import { Button, buttonVariants } from '@/components/ui/button';
import { Card, CardBody, CardHeader } from '@/components/ui/card';
import { Select } from '@/components/ui/input';
import type { ModelRow, TubeDetail, TubePlot } from '@/lib/tubes/service';
import { fetchJson } from '@/lib/hooks/fetch-json';
import { MODEL_KIND_LABELS, RATING_KEYS, RATING_META } from '@/lib/validation/tube';
import { AttachmentsPanel } from './attachments-panel';
import { CurveSetsPanel } from './curve-sets-panel';
import { formatMaybe } from '@/lib/format/number';
import { familyLabel, heaterText, parameterText, PARAMETER_LABELS, tubeQueryKey } from './labels';
import { ModelForm } from './model-form';

export function TubeDetailView({ initialTube, initialPlot, canWrite, canEditPublished }: { initialTube: TubeDetail; initialPlot: TubePlot | null; canWrite: boolean; canEditPublished: boolean }) {
  const qc = useQueryClient();
  const id = initialTube.id;
  const tubeQ = useQuery({ queryKey: tubeQueryKey(id), queryFn: () => fetchJson<{ tube: TubeDetail }>(`/api/tubes/${id}`).then((r) => r.tube), initialData: initialTube });
  const tube = tubeQ.data;
  const mayEdit = canWrite && (!tube.published || canEditPublished) && !tube.retired;
  const [notice, setNotice] = useState<{ tone: 'ok' | 'over'; text: string } | null>(null);

  const retire = useMutation({
    mutationFn: (retired: boolean) => fetchJson(`/api/tubes/${id}`, { method: 'PATCH', body: { retired } }),
    onSuccess: (_d, retired) => {
      setNotice({ tone: 'ok', text: retired ? `${tube.designation} is retired: hidden from the library and from tube selects.` : `${tube.designation} is back in the library.` });
      qc.invalidateQueries({ queryKey: tubeQueryKey(id) });
    },
    onError: (err) => setNotice({ tone: 'over', text: err.message }),
  });

  return (
    <div className="space-y-5">
      <div className="flex flex-wrap items-end justify-between gap-3">
        <div>
          <p className="text-xs text-muted">
            <Link href="/tubes" className="hover:underline">Tube library</Link> /
          </p>
          <h1 className="flex flex-wrap items-center gap-2 text-2xl font-semibold tracking-tight">
            {tube.designation}
            {tube.aliases.length ? <span className="text-base font-normal text-muted">{tube.aliases.join(' · ')}</span> : null}
          </h1>
          <div className="mt-1 flex flex-wrap items-center gap-2 text-sm text-muted">
            <span>{familyLabel(tube.family, tube.sections)}</span>
            <span aria-hidden>·</span>
            <span>
              Heater <span className="num text-ink">{heaterText(tube.heater)}</span>
            </span>
            {tube.published ? <Badge tone="info">published entry</Badge> : <Badge>workshop entry{tube.createdBy ? ` by ${tube.createdBy}` : ''}</Badge>}
            {tube.retired ? <Badge tone="over">retired</Badge> : null}
          </div>
        </div>
        <div className="flex gap-2">
          {mayEdit ? <Link href={`/tubes/${id}/edit`} className={buttonVariants({ variant: 'secondary' })}>Edit ratings and notes</Link> : null}
          {canWrite && (!tube.published || canEditPublished) ? (
            <Button variant={tube.retired ? 'secondary' : 'danger'} disabled={retire.isPending} onClick={() => retire.mutate(!tube.retired)}>
              {tube.retired ? 'Bring back' : 'Retire'}
            </Button>
          ) : null}
        </div>
      </div>
      {canWrite && tube.published && !canEditPublished ? (
        <p className="text-xs text-muted">This is a published library entry: only an admin edits or retires it. You can still upload curve sets, fit them and add models.</p>
      ) : null}
      {notice ? <p role="status" className={notice.tone === 'ok' ? 'text-sm text-ok' : 'text-sm text-over'}>{notice.text}</p> : null}
      <Caution />

      <div className="grid gap-5 xl:grid-cols-[minmax(0,1fr)_400px]">
        <div className="min-w-0 space-y-5">
          <CurvesCard tube={tube} initialPlot={initialPlot} />
          <CurveSetsPanel tube={tube} canWrite={canWrite && !tube.retired} canEditPublished={canEditPublished} />
        </div>
        <div className="space-y-5">
          <RatingsCard tube={tube} />
          <ModelsCard tube={tube} canWrite={canWrite && !tube.retired} canEditPublished={canEditPublished} />
          <AttachmentsPanel tube={tube} canWrite={canWrite && !tube.retired} />
          {tube.notes ? (
            <Card>
              <CardHeader title="Notes" />
              <CardBody className="whitespace-pre-line text-sm">{tube.notes}</CardBody>
            </Card>
          ) : null}
        </div>
      </div>
    </div>
  );
}

function CurvesCard({ tube, initialPlot }: { tube: TubeDetail; initialPlot: TubePlot | null }) {
  const [modelId, setModelId] = useState<number | null>(initialPlot?.model.id ?? tube.defaultModel?.id ?? null);
  const plotQ = useQuery({
    queryKey: ['tube-plot', tube.id, modelId],
    queryFn: () => fetchJson<TubePlot>(`/api/tubes/${tube.id}/plot?modelId=${modelId}`),
    enabled: modelId !== null,
    initialData: initialPlot && initialPlot.model.id === modelId ? initialPlot : undefined,
    placeholderData: (prev) => prev,
  });
  const plot = plotQ.data;
  if (!tube.models.length || modelId === null) {
    return (
      <Card>
        <CardHeader title="Plate curves" />
        <CardBody>
          <p className="text-sm text-muted" data-testid="no-model">
            {tube.designation} has no model yet, so there are no curves to draw. Upload a measured curve set below and fit a Koren model to it, or add one by hand.
          </p>
        </CardBody>
      </Card>
    );
  }
  return (
    <>
      <Card>
        <CardHeader
          title="Plate curves"
          actions={
            <label className="flex items-center gap-2 text-xs text-muted">
              Model
              <Select aria-label="Model to draw" className="h-8 w-60" value={modelId} onChange={(e) => setModelId(Number(e.target.value))}>
                {tube.models.map((m) => (
                  <option key={m.id} value={m.id}>
                    {m.name}
                    {m.isDefault ? ' (default)' : ''}
                  </option>
                ))}
              </Select>
            </label>
          }
        />
        <CardBody>
          {plotQ.isError ? <p role="alert" className="text-sm text-over">{plotQ.error.message}</p> : null}
          {plot ? (
            <>
              <PlateCurvesChart curves={curveSeriesFromPlot(plot.plateCurves)} paMax={plot.paMax} vaMax={plot.vaMax} stale={plotQ.isFetching} height={400} />
              <p className="mt-2 text-xs text-muted">
                {plot.model.name} ({MODEL_KIND_LABELS[plot.model.kind]}), grid steps as labelled
                {plot.screenVoltage !== null ? (
                  <>
                    , screen at <span className="num">{formatMaybe(plot.screenVoltage, 'V')}</span>
                  </>
                ) : null}
                .{' '}
                {plot.plateDissipation ? (
                  <>
                    Dashed red: Pa(max) <span className="num">{formatMaybe(plot.plateDissipation, 'W')}</span> ({tube.ratings.plateDissipation?.source}).
                  </>
                ) : (
                  'No plate dissipation rating recorded, so no Pa(max) curve.'
                )}
              </p>
            </>
          ) : (
            <p className="text-sm text-muted">Drawing…</p>
          )}
        </CardBody>
      </Card>
      {plot ? (
        <div className="grid gap-5 2xl:grid-cols-2">
          <Card>
            <CardHeader title={`Transfer curve at Va = ${formatMaybe(plot.transferPlateVoltage, 'V')}`} />
            <CardBody>
              <TransferChart points={plot.transfer} plateVoltage={plot.transferPlateVoltage} height={260} stale={plotQ.isFetching} />
            </CardBody>
          </Card>
          <TypicalCard plot={plot} />
        </div>
      ) : null}
    </>
  );
}

function TypicalCard({ plot }: { plot: TubePlot }) {
  return (
    <Card>
      <CardHeader title="Datasheet points against the model" />
      <CardBody className="space-y-2">
        {plot.typical.length === 0 ? (
          <p className="text-sm text-muted">No typical operating points recorded for this type.</p>
        ) : (
          <div className="overflow-x-auto">
            <table className="w-full text-sm" data-testid="typical-points">
              <thead className="text-left text-xs text-muted">
                <tr>
                  <th className="py-1 pr-2 font-medium">Point</th>
                  <th className="whitespace-nowrap py-1 pr-2 text-right font-medium">Datasheet Ia</th>
                  <th className="py-1 pr-2 text-right font-medium">Model Ia</th>
                  <th className="py-1 pr-2 text-right font-medium">Diff.</th>
                  <th className="whitespace-nowrap py-1 text-right font-medium">Model gm · ra</th>
                </tr>
              </thead>
              <tbody className="divide-y divide-rule">
                {plot.typical.map((t) => {
                  const off = t.errorPercent === null ? null : Math.abs(t.errorPercent);
                  return (
                    <tr key={t.label} className="align-top">
                      <td className="py-1.5 pr-2">
                        <div className="num text-xs">
                          {formatMaybe(t.plateVoltage, 'V')}, {formatMaybe(t.gridVoltage, 'V')}
                          {t.screenVoltage !== null ? `, Vg2 ${formatMaybe(t.screenVoltage, 'V')}` : ''}
                        </div>
                        <div className="text-xs text-muted">{t.source}</div>
                      </td>
                      <td className="num whitespace-nowrap py-1.5 pr-2 text-right">{formatMaybe(t.datasheetIa, 'A')}</td>
                      <td className="num whitespace-nowrap py-1.5 pr-2 text-right">{formatMaybe(t.modelIa, 'A')}</td>
                      <td className="whitespace-nowrap py-1.5 pr-2 text-right">
                        {off === null ? '–' : (
                          <Badge tone={off <= 10 ? 'ok' : off <= 30 ? 'near' : 'over'}>
                            <span className="num">{t.errorPercent! > 0 ? '+' : '−'}{off.toFixed(0)} %</span>
                          </Badge>
                        )}
                      </td>
                      <td className="num whitespace-nowrap py-1.5 text-right text-xs">
                        {formatMaybe(t.gm, 'S')} · {formatMaybe(t.ra, 'Ω')}
                      </td>
                    </tr>
                  );
                })}
              </tbody>
            </table>
          </div>
        )}
        <p className="text-xs text-muted">Datasheet figures are averages; real samples spread by tens of percent. The model is a fit, not a measurement of your tube.</p>
      </CardBody>
    </Card>
  );
}

function RatingsCard({ tube }: { tube: TubeDetail }) {
  const rows = RATING_KEYS.filter((k) => tube.ratings[k]);
  const caps = tube.capacitances;
  return (
    <Card>
      <CardHeader title="Maximum ratings" />
      <CardBody className="space-y-4">
        {rows.length === 0 ? (
          <p className="text-sm text-muted">No ratings recorded. Enter them from a maker’s datasheet before trusting rating checks.</p>
        ) : (
          <dl className="divide-y divide-rule text-sm" data-testid="ratings">
            {rows.map((k) => (
              <div key={k} className="grid grid-cols-[1fr_auto] gap-x-3 py-1.5">
                <dt>{RATING_META[k].label}</dt>
                <dd className="num text-right font-medium">{formatMaybe(tube.ratings[k]!.value, RATING_META[k].unit)}</dd>
                <dd className="col-span-2 text-xs text-muted">{tube.ratings[k]!.source}</dd>
              </div>
            ))}
          </dl>
        )}
        <div className="text-sm">
          <h3 className="text-xs font-medium text-muted">Heater</h3>
          <p className="num">{heaterText(tube.heater)}</p>
          {tube.heater.source ? <p className="text-xs text-muted">{tube.heater.source}</p> : null}
        </div>
        {caps.cgk !== undefined || caps.cga !== undefined || caps.cak !== undefined ? (
          <div className="text-sm">
            <h3 className="text-xs font-medium text-muted">Interelectrode capacitances</h3>
            <p className="num">
              Cgk {formatMaybe(caps.cgk, 'F')} · Cga {formatMaybe(caps.cga, 'F')} · Cak {formatMaybe(caps.cak, 'F')}
            </p>
            {caps.source ? <p className="text-xs text-muted">{caps.source}</p> : null}
          </div>
        ) : null}
        {tube.typicalPoints.length ? (
          <div className="text-sm">
            <h3 className="text-xs font-medium text-muted">Typical operation</h3>
            <ul className="space-y-1.5">
              {tube.typicalPoints.map((p) => (
                <li key={p.label}>
                  <span>{p.label}</span>
                  <span className="num block text-xs">
                    Va {formatMaybe(p.plateVoltage, 'V')}, Vg {formatMaybe(p.gridVoltage, 'V')}
                    {p.screenVoltage ? `, Vg2 ${formatMaybe(p.screenVoltage, 'V')}` : ''} → Ia {formatMaybe(p.plateCurrent, 'A')}
                    {p.screenCurrent ? `, Ig2 ${formatMaybe(p.screenCurrent, 'A')}` : ''}
                    {p.mu ? `, µ ${p.mu}` : ''}
                    {p.ra ? `, ra ${formatMaybe(p.ra, 'Ω')}` : ''}
                    {p.gm ? `, gm ${formatMaybe(p.gm, 'S')}` : ''}
                  </span>
                  <span className="block text-xs text-muted">{p.source}</span>
                </li>
              ))}
            </ul>
          </div>
        ) : null}
      </CardBody>
    </Card>
  );
}

function ModelsCard({ tube, canWrite, canEditPublished }: { tube: TubeDetail; canWrite: boolean; canEditPublished: boolean }) {
  const qc = useQueryClient();
  const [error, setError] = useState<string | null>(null);
  const [adding, setAdding] = useState(false);
  const mayChangeDefault = canWrite && (!tube.published || canEditPublished);
  const makeDefault = useMutation({
    mutationFn: (m: ModelRow) => fetchJson(`/api/tubes/${tube.id}/models/${m.id}`, { method: 'PATCH', body: { setDefault: true } }),
    onSuccess: () => {
      setError(null);
      qc.invalidateQueries({ queryKey: tubeQueryKey(tube.id) });
      qc.invalidateQueries({ queryKey: ['tube-plot', tube.id] });
    },
    onError: (err) => setError(err.message),
  });
  return (
    <Card>
      <CardHeader
        title="Models"
        actions={canWrite && !adding ? <Button size="sm" variant="secondary" onClick={() => setAdding(true)}>Add by hand</Button> : null}
      />
      <CardBody className="space-y-3">
        {tube.models.length === 0 ? <p className="text-sm text-muted">No model yet (ratings only).</p> : null}
        <ul className="space-y-3" data-testid="models">
          {tube.models.map((m) => (
            <li key={m.id} className="rounded-md border border-rule p-3" data-model-id={m.id}>
              <div className="flex flex-wrap items-center justify-between gap-2">
                <div className="font-medium">
                  {m.name} <span className="text-xs font-normal text-muted">{MODEL_KIND_LABELS[m.kind]}</span>
                </div>
                <div className="flex items-center gap-1.5">
                  {m.isDefault ? <Badge tone="accent">default</Badge> : null}
                  {m.published ? <Badge tone="info">published</Badge> : null}
                </div>
              </div>
              <p className="mt-0.5 text-xs text-muted">Source: {m.source}</p>
              <dl className="mt-2 grid grid-cols-3 gap-x-3 gap-y-1 text-xs">
                {Object.entries(m.parameters)
                  .filter(([k]) => PARAMETER_LABELS[k])
                  .map(([k, v]) => (
                    <div key={k}>
                      <dt className="text-muted">{PARAMETER_LABELS[k]!.label}</dt>
                      <dd className="num">{parameterText(k, v, m.kind)}</dd>
                    </div>
                  ))}
              </dl>
              <div className="mt-2 flex flex-wrap gap-2">
                <a className={buttonVariants({ size: 'sm', variant: 'secondary' })} href={`/api/tubes/${tube.id}/models/${m.id}/spice`} download>
                  SPICE subcircuit
                </a>
                {!m.isDefault && mayChangeDefault ? (
                  <Button size="sm" variant="ghost" disabled={makeDefault.isPending} onClick={() => makeDefault.mutate(m)}>
                    Make default
                  </Button>
                ) : null}
              </div>
            </li>
          ))}
        </ul>
        {error ? <p role="alert" className="text-sm text-over">{error}</p> : null}
        {adding ? (
          <ModelForm
            tube={tube}
            mayMakeDefault={mayChangeDefault}
            onDone={() => {
              setAdding(false);
              qc.invalidateQueries({ queryKey: tubeQueryKey(tube.id) });
              qc.invalidateQueries({ queryKey: ['tube-plot', tube.id] });
            }}
            onCancel={() => setAdding(false)}
          />
        ) : null}
      </CardBody>
    </Card>
  );
}
