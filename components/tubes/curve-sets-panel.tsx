'use client';

import { zodResolver } from '@hookform/resolvers/zod';
import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { useEffect, useRef, useState } from 'react';
import { useForm } from 'react-hook-form';
import { PlateCurvesChart } from '@/components/charts/lazy';
import { gridLabel } from '@/components/charts/series';
import { Badge } from '@/components/ui/badge';
import { Button } from '@/components/ui/button';
import { Card, CardBody, CardHeader } from '@/components/ui/card';
import { Field } from '@/components/ui/field';
import { Input, Select } from '@/components/ui/input';
import { validateUpload } from '@/lib/curves/validate-upload';
import type { FitAnswer, FittedPlotCurve, MeasuredPlotPoint } from '@/lib/curves/service';
import type { CurveSetRow, FitRow, TubeDetail } from '@/lib/tubes/service';
import { ApiRequestError, fetchJson } from '@/lib/hooks/fetch-json';
import { formatDateTime } from '@/lib/utils';
import { curveUploadFieldsSchema, type FitModel } from '@/lib/validation/curve-set';
import { MODEL_KIND_LABELS } from '@/lib/validation/tube';
import { formatMaybe } from '@/lib/format/number';
import { parameterText, PARAMETER_LABELS, tubeQueryKey } from './labels';

type CsvIssue = { line: number | null; column: string | null; message: string };
type Detail = { curveSet: CurveSetRow; measured: MeasuredPlotPoint[]; curves: FittedPlotCurve[]; screenVoltage: number | null; vaMax: number; fit: FitRow | null };

export function CurveSetsPanel({ tube, canWrite, canEditPublished }: { tube: TubeDetail; canWrite: boolean; canEditPublished: boolean }) {
  const [selected, setSelected] = useState<number | null>(tube.curveSets[0]?.id ?? null);
  return (
    <Card>
      <CardHeader title="Measured curve sets" />
      <CardBody className="space-y-4">
        {tube.curveSets.length === 0 ? <p className="text-sm text-muted">No measured curves yet.</p> : null}
        {tube.curveSets.length ? (
          <ul className="divide-y divide-rule rounded-md border border-rule" data-testid="curve-sets">
            {tube.curveSets.map((s) => (
              <li key={s.id} className={`flex flex-wrap items-center gap-x-3 gap-y-1 px-3 py-2 text-sm ${selected === s.id ? 'bg-paper' : ''}`}>
                <button type="button" className="font-medium text-ink hover:underline" onClick={() => setSelected(s.id)} aria-pressed={selected === s.id}>
                  {s.name}
                </button>
                {s.demo ? <Badge tone="near">demo data</Badge> : null}
                <span className="num text-xs text-muted">
                  #{s.id} · {s.pointCount} points · {s.kind} · currents in {s.currentUnit}
                </span>
                <span className="text-xs text-muted">
                  {s.uploadedBy ? `${s.uploadedBy}, ` : ''}
                  {formatDateTime(s.createdAt)}
                </span>
                <span className="ml-auto flex items-center gap-2 text-xs">
                  {s.fits.some((f) => f.status === 'accepted') ? <Badge tone="ok">fit accepted</Badge> : s.fits.some((f) => f.status === 'proposed') ? <Badge tone="info">fit proposed</Badge> : null}
                  <a className="text-dcline hover:underline" href={`/api/curve-sets/${s.id}/file`} download>
                    CSV file
                  </a>
                </span>
              </li>
            ))}
          </ul>
        ) : null}
        {selected !== null ? <FitWorkbench key={selected} tube={tube} curveSetId={selected} canWrite={canWrite} canEditPublished={canEditPublished} /> : null}
        {canWrite ? <UploadForm tube={tube} onUploaded={(id) => setSelected(id)} /> : null}
      </CardBody>
    </Card>
  );
}

function UploadForm({ tube, onUploaded }: { tube: TubeDetail; onUploaded: (id: number) => void }) {
  const qc = useQueryClient();
  const fileRef = useRef<HTMLInputElement>(null);
  const form = useForm({ resolver: zodResolver(curveUploadFieldsSchema), defaultValues: { currentUnit: 'mA' as const, name: '', notes: '' } });
  const [fileError, setFileError] = useState<string | null>(null);
  const [problem, setProblem] = useState<{ message: string; errors: CsvIssue[] } | null>(null);
  const [done, setDone] = useState<string | null>(null);
  // the server's warning about implausible current sizes; "Store as they are" sends the same file again, confirmed
  const [magnitude, setMagnitude] = useState<string | null>(null);
  const confirmed = useRef(false);
  const onSubmit = form.handleSubmit(async (values) => {
    setProblem(null);
    setDone(null);
    setMagnitude(null);
    const file = fileRef.current?.files?.[0];
    if (!file) {
      setFileError('Choose a CSV file.');
      return;
    }
    const check = validateUpload({ size: file.size, type: file.type, name: file.name });
    if (!check.ok) {
      setFileError(check.errors[0]!.message);
      return;
    }
    setFileError(null);
    const body = new FormData();
    body.set('file', file);
    body.set('currentUnit', values.currentUnit);
    if (values.name) body.set('name', values.name);
    if (values.notes) body.set('notes', values.notes);
    if (confirmed.current) body.set('confirmMagnitude', 'yes');
    confirmed.current = false;
    const res = await fetch(`/api/tubes/${tube.id}/curve-sets`, { method: 'POST', body });
    const json = (await res.json().catch(() => null)) as {
      id?: number;
      pointCount?: number;
      error?: { message: string; details?: { errors?: CsvIssue[]; needsConfirmation?: string }; fieldErrors?: Record<string, string[]> };
    } | null;
    if (json?.error?.details?.needsConfirmation === 'confirmMagnitude') {
      setMagnitude(json.error.message);
      return;
    }
    if (!res.ok || !json?.id) {
      setProblem({ message: json?.error?.message ?? `Upload failed (${res.status}).`, errors: json?.error?.details?.errors ?? [] });
      return;
    }
    setDone(`Stored ${json.pointCount} points.`);
    form.reset({ currentUnit: values.currentUnit, name: '', notes: '' });
    if (fileRef.current) fileRef.current.value = '';
    await qc.invalidateQueries({ queryKey: tubeQueryKey(tube.id) });
    onUploaded(json.id);
  });
  return (
    <form onSubmit={onSubmit} noValidate className="space-y-3 rounded-md border border-dashed border-rule p-3" aria-label="Upload measured curves">
      <h3 className="text-sm font-semibold">Upload measured curves</h3>
      <p className="text-xs text-muted">
        CSV with a header row: <code className="num">grid_voltage, plate_voltage, plate_current</code> and, for pentodes, <code className="num">screen_voltage, screen_current</code>. Voltages in
        volts; currents in the unit chosen here. At least 20 points, at most 5 MB.
      </p>
      <div className="grid gap-3 sm:grid-cols-[1fr_140px_1fr]">
        <Field label="CSV file" htmlFor="curve-file" error={fileError ?? undefined}>
          <input id="curve-file" ref={fileRef} type="file" accept=".csv,.txt,.tsv,text/csv,text/plain" className="block w-full text-sm text-ink file:mr-3 file:rounded-md file:border file:border-rule file:bg-sheet file:px-2.5 file:py-1.5 file:text-sm file:text-ink" />
        </Field>
        <Field label="Currents in" htmlFor="curve-unit" error={form.formState.errors.currentUnit?.message}>
          <Select id="curve-unit" {...form.register('currentUnit')}>
            <option value="mA">mA</option>
            <option value="A">A</option>
          </Select>
        </Field>
        <Field label="Name (optional)" htmlFor="curve-name" error={form.formState.errors.name?.message}>
          <Input id="curve-name" placeholder="e.g. Bench sample 2, new stock" {...form.register('name')} />
        </Field>
      </div>
      {problem ? (
        <div role="alert" className="rounded-md border border-over/40 bg-over/10 p-2 text-sm">
          <p className="text-over">{problem.message}</p>
          {problem.errors.length > 1 ? (
            <ul className="mt-1 list-inside list-disc text-xs text-ink">
              {problem.errors.map((e, i) => (
                <li key={i}>
                  {e.line !== null ? `Line ${e.line}` : 'File'}
                  {e.column ? `, column "${e.column}"` : ''}: {e.message}
                </li>
              ))}
            </ul>
          ) : null}
        </div>
      ) : null}
      {magnitude ? (
        <div role="alert" className="space-y-2 rounded-md border border-near/50 bg-near/10 p-2 text-sm" data-testid="magnitude-warning">
          <p>{magnitude}</p>
          <div className="flex flex-wrap gap-2">
            <Button type="submit" size="sm" variant="secondary" onClick={() => (confirmed.current = true)}>
              Store as they are
            </Button>
            <Button type="button" size="sm" variant="ghost" onClick={() => setMagnitude(null)}>
              Change the unit first
            </Button>
          </div>
        </div>
      ) : null}
      {done ? <p role="status" className="text-sm text-ok">{done}</p> : null}
      <Button type="submit" disabled={form.formState.isSubmitting}>
        {form.formState.isSubmitting ? 'Uploading…' : 'Upload curve set'}
      </Button>
    </form>
  );
}

function useElapsed(running: boolean) {
  const [ms, setMs] = useState(0);
  useEffect(() => {
    if (!running) return;
    const start = performance.now();
    setMs(0);
    const t = setInterval(() => setMs(performance.now() - start), 100);
    return () => clearInterval(t);
  }, [running]);
  return ms;
}

function FitWorkbench({ tube, curveSetId, canWrite, canEditPublished }: { tube: TubeDetail; curveSetId: number; canWrite: boolean; canEditPublished: boolean }) {
  const qc = useQueryClient();
  const detail = useQuery({ queryKey: ['curve-set', curveSetId], queryFn: () => fetchJson<Detail>(`/api/curve-sets/${curveSetId}`) });
  const [answer, setAnswer] = useState<FitAnswer | null>(null);
  const [message, setMessage] = useState<{ tone: 'ok' | 'over'; text: string } | null>(null);
  const [model, setModel] = useState<FitModel>('koren-triode');
  const [name, setName] = useState('');
  const [setDefault, setSetDefault] = useState(false);
  useEffect(() => {
    if (detail.data?.curveSet.kind === 'pentode' && tube.family !== 'triode') setModel('koren-pentode');
  }, [detail.data?.curveSet.kind, tube.family]);

  const refresh = async () => {
    await Promise.all([
      qc.invalidateQueries({ queryKey: tubeQueryKey(tube.id) }),
      qc.invalidateQueries({ queryKey: ['curve-set', curveSetId] }),
      qc.invalidateQueries({ queryKey: ['tube-plot', tube.id] }),
    ]);
  };
  const fit = useMutation({
    mutationFn: () => fetchJson<FitAnswer>(`/api/curve-sets/${curveSetId}/fit`, { method: 'POST', body: { model } }),
    onMutate: () => {
      setMessage(null);
      setAnswer(null);
    },
    onSuccess: async (a) => {
      setAnswer(a);
      setName(`Fitted from ${detail.data?.curveSet.name ?? `curve set ${curveSetId}`}`.slice(0, 120));
      await refresh();
    },
    onError: (err) => setMessage({ tone: 'over', text: err.message }),
  });
  const elapsed = useElapsed(fit.isPending);
  const accept = useMutation({
    mutationFn: (fitId: number) => fetchJson<{ model: { id: number; name: string; isDefault: boolean } }>(`/api/curve-sets/${curveSetId}/accept`, { method: 'POST', body: { fitId, name: name.trim() || undefined, setDefault } }),
    onSuccess: async (r) => {
      setAnswer(null);
      setMessage({ tone: 'ok', text: `Accepted as the model “${r.model.name}”${r.model.isDefault ? ', now the default' : ''}.` });
      await refresh();
    },
    onError: (err) => setMessage({ tone: 'over', text: err instanceof ApiRequestError ? err.message : 'Could not accept the fit.' }),
  });
  const discard = useMutation({
    mutationFn: (fitId: number) => fetchJson(`/api/curve-sets/${curveSetId}/discard`, { method: 'POST', body: { fitId } }),
    onSuccess: async () => {
      setAnswer(null);
      setMessage({ tone: 'ok', text: 'Fit discarded.' });
      await refresh();
    },
    onError: (err) => setMessage({ tone: 'over', text: err.message }),
  });

  if (detail.isPending) return <p className="text-sm text-muted">Loading the measured points…</p>;
  if (detail.isError) return <p role="alert" className="text-sm text-over">{detail.error.message}</p>;
  const d = detail.data;
  const proposed = answer?.fit ?? (d.fit?.status === 'proposed' ? d.fit : null);
  const curves = answer?.curves ?? (d.fit && d.fit.status !== 'discarded' ? d.curves : []);
  const shownFit: FitRow | null = answer?.fit ?? (d.fit && d.fit.status !== 'discarded' ? d.fit : null);
  const mayDefault = !tube.published || canEditPublished;

  return (
    <section className="space-y-3 rounded-md border border-rule p-3" aria-label={`Curve set ${d.curveSet.name}`} data-testid="fit-workbench">
      <div className="flex flex-wrap items-center justify-between gap-2">
        <h3 className="text-sm font-semibold">
          {d.curveSet.name}
          {d.curveSet.demo ? <span className="ml-2 text-xs font-normal text-near">Demo data: invented from a published model with noise, not a measurement.</span> : null}
        </h3>
        {canWrite ? (
          <div className="flex items-center gap-2">
            {d.curveSet.kind === 'pentode' && tube.family !== 'triode' ? (
              <Select aria-label="Model to fit" className="h-8 w-40" value={model} onChange={(e) => setModel(e.target.value as FitModel)}>
                <option value="koren-pentode">Koren pentode</option>
                <option value="koren-triode">Koren triode</option>
              </Select>
            ) : null}
            <Button size="sm" onClick={() => fit.mutate()} disabled={fit.isPending}>
              {fit.isPending ? 'Fitting…' : `Fit ${MODEL_KIND_LABELS[model]} model`}
            </Button>
          </div>
        ) : null}
      </div>
      {fit.isPending ? (
        <div role="progressbar" aria-label="Fitting" aria-valuetext={`${(elapsed / 1000).toFixed(1)} s`} className="space-y-1">
          <div className="h-1.5 overflow-hidden rounded bg-rule/60">
            <div className="h-full w-1/3 animate-[fitbar_1.1s_ease-in-out_infinite] rounded bg-heater" style={{ animationName: 'fitbar' }} />
          </div>
          <p className="num text-xs text-muted">
            Levenberg–Marquardt fit of {d.curveSet.pointCount} points… {(elapsed / 1000).toFixed(1)} s
          </p>
          <style>{'@keyframes fitbar { 0% { transform: translateX(-100%); } 100% { transform: translateX(300%); } }'}</style>
        </div>
      ) : null}
      <PlateCurvesChart
        // Before a fit there are no model curves; an empty series keeps the chart drawing the measured points alone.
        curves={curves.length ? curves.map((c) => ({ label: gridLabel(c.gridVoltage), vg: c.gridVoltage, points: c.points })) : [{ label: '', vg: 0, points: [] }]}
        measured={d.measured}
        vaMax={d.vaMax}
        height={340}
        stale={fit.isPending}
      />
      <p className="text-xs text-muted">
        Crosses: measured points{d.screenVoltage !== null ? <> at Vg2 = <span className="num">{formatMaybe(d.screenVoltage, 'V')}</span></> : null}. {curves.length ? 'Lines: the fitted model at the measured grid voltages.' : 'Run a fit to draw the model over them.'}
      </p>
      {shownFit ? <FitSummary fit={shownFit} extra={answer?.fit} /> : null}
      {message ? <p role="status" className={message.tone === 'ok' ? 'text-sm text-ok' : 'text-sm text-over'}>{message.text}</p> : null}
      {proposed && canWrite ? (
        <div className="flex flex-wrap items-end gap-3 rounded-md bg-paper/60 p-3">
          <Field label="Model name" htmlFor={`fit-name-${curveSetId}`} className="min-w-64 flex-1">
            <Input id={`fit-name-${curveSetId}`} value={name} onChange={(e) => setName(e.target.value)} placeholder={`Fitted from ${d.curveSet.name}`} />
          </Field>
          <label className="flex items-center gap-2 pb-2 text-sm" title={mayDefault ? undefined : 'Only an admin changes the default model of a published type.'}>
            <input type="checkbox" className="size-4 accent-[var(--heater)]" checked={setDefault} disabled={!mayDefault} onChange={(e) => setSetDefault(e.target.checked)} />
            Make it the default model
          </label>
          <Button onClick={() => accept.mutate(proposed.id)} disabled={accept.isPending}>Accept as a model</Button>
          <Button variant="secondary" onClick={() => discard.mutate(proposed.id)} disabled={discard.isPending}>Discard</Button>
        </div>
      ) : null}
    </section>
  );
}

function FitSummary({ fit, extra }: { fit: FitRow; extra?: FitAnswer['fit'] }) {
  const tone = fit.rmsErrorPercent <= 3 ? 'ok' : fit.rmsErrorPercent <= 8 ? 'near' : 'over';
  return (
    <div className="space-y-2 text-sm" data-testid="fit-summary">
      <div className="flex flex-wrap items-center gap-3">
        <span>
          {MODEL_KIND_LABELS[fit.model]} fit #{fit.id}
        </span>
        <Badge tone={fit.status === 'accepted' ? 'ok' : fit.status === 'discarded' ? 'over' : 'info'}>{fit.status}</Badge>
        <span>
          RMS error{' '}
          <Badge tone={tone}>
            <span className="num" data-testid="rms-error">{fit.rmsErrorPercent.toFixed(2)} %</span>
          </Badge>
        </span>
        <span>
          max <span className="num">{fit.maxErrorPercent.toFixed(1)} %</span>
        </span>
        {extra ? (
          <span className="num text-xs text-muted">
            {extra.pointCount} points used{extra.skippedCount ? `, ${extra.skippedCount} below the current floor skipped` : ''} · {extra.elapsedMs.toFixed(0)} ms
          </span>
        ) : null}
      </div>
      <dl className="grid grid-cols-3 gap-x-4 gap-y-1 text-xs sm:grid-cols-6">
        {Object.entries(fit.parameters)
          .filter(([k]) => PARAMETER_LABELS[k])
          .map(([k, v]) => (
            <div key={k}>
              <dt className="text-muted">{PARAMETER_LABELS[k]!.label}</dt>
              <dd className="num">{parameterText(k, v, fit.model)}</dd>
            </div>
          ))}
      </dl>
      {extra?.notes.length ? (
        <ul className="list-inside list-disc text-xs text-muted">
          {extra.notes.map((n) => (
            <li key={n}>{n}</li>
          ))}
        </ul>
      ) : null}
      <p className="text-xs text-muted">Errors are relative (model ÷ measured − 1), so low currents near cutoff count as much as high ones.</p>
    </div>
  );
}
