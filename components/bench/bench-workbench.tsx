'use client';

import { zodResolver } from '@hookform/resolvers/zod';
import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { usePathname, useRouter } from 'next/navigation';
import { useRef, useState } from 'react';
import { useForm } from 'react-hook-form';
import { StatusBadge } from '@/components/ui/badge';
import { Button } from '@/components/ui/button';
import { Card, CardBody, CardHeader } from '@/components/ui/card';
import { Field } from '@/components/ui/field';
import { Input, Select, Textarea } from '@/components/ui/input';
import type { BenchCheckDTO, BenchContext, BenchPhoto } from '@/lib/bench/service';
import { ApiRequestError, fetchJson } from '@/lib/hooks/fetch-json';
import { formatDateTime } from '@/lib/utils';
import { benchCheckSchema, type BenchCheckInput, type BenchCheckValues } from '@/lib/validation/bench';
import { BenchCheckCard } from './bench-check-card';
import { uploadPhoto } from './bench-api';
import { formatMaybe, formatTolerance } from '@/lib/format/number';
import { ROUTE_WORDS } from './labels';

export type PickerProject = { id: number; name: string; stages: { id: number; name: string; position: number; tubeDesignation: string; lastVerdict: 'pass' | 'check' | 'fail' | null }[] };

type StageData = { context: BenchContext; checks: BenchCheckDTO[] };

export function BenchWorkbench({ projects, stageId, initial, canRecord }: { projects: PickerProject[]; stageId: number | null; initial: StageData | null; canRecord: boolean }) {
  const router = useRouter();
  const pathname = usePathname();
  const selectedProject = projects.find((p) => p.stages.some((s) => s.id === stageId)) ?? null;
  const [projectId, setProjectId] = useState<number | null>(selectedProject?.id ?? null);
  const project = projects.find((p) => p.id === projectId) ?? null;

  const chooseStage = (id: number | null) => router.replace(id ? `${pathname}?stage=${id}` : pathname);

  return (
    <div className="space-y-5">
      <Card>
        <CardBody className="grid gap-3 sm:grid-cols-2 lg:max-w-3xl">
          <Field label="Project" htmlFor="bench-project">
            <Select
              id="bench-project"
              value={projectId ?? ''}
              onChange={(e) => {
                const id = e.target.value ? Number(e.target.value) : null;
                setProjectId(id);
                const only = projects.find((p) => p.id === id)?.stages;
                chooseStage(only && only.length === 1 ? only[0]!.id : null);
              }}
            >
              <option value="">Choose a project…</option>
              {projects.map((p) => (
                <option key={p.id} value={p.id}>
                  {p.name}
                </option>
              ))}
            </Select>
          </Field>
          <Field label="Stage" htmlFor="bench-stage">
            <Select id="bench-stage" value={stageId ?? ''} disabled={!project} onChange={(e) => chooseStage(e.target.value ? Number(e.target.value) : null)}>
              <option value="">{project ? 'Choose a stage…' : 'Choose a project first'}</option>
              {project?.stages.map((s) => (
                <option key={s.id} value={s.id}>
                  {s.position}. {s.name} ({s.tubeDesignation}){s.lastVerdict ? ` · last check: ${s.lastVerdict}` : ' · not checked yet'}
                </option>
              ))}
            </Select>
          </Field>
        </CardBody>
      </Card>
      {stageId && initial ? <StageBench key={stageId} stageId={stageId} initial={initial} canRecord={canRecord} /> : <p className="text-sm text-muted">Choose a project and one of its stages to record a bench check.</p>}
    </div>
  );
}

function StageBench({ stageId, initial, canRecord }: { stageId: number; initial: StageData; canRecord: boolean }) {
  const qc = useQueryClient();
  const [failingOnly, setFailingOnly] = useState(false);
  const key = ['bench', stageId, failingOnly] as const;
  const data = useQuery({
    queryKey: key,
    queryFn: () => fetchJson<StageData>(`/api/stages/${stageId}/bench-checks${failingOnly ? '?failing=1' : ''}`),
    initialData: failingOnly ? undefined : initial,
  });
  const ctx = data.data?.context ?? initial.context;
  const [latest, setLatest] = useState<BenchCheckDTO | null>(null);

  return (
    <div className="grid gap-5 xl:grid-cols-[minmax(0,420px)_minmax(0,1fr)]">
      <div className="space-y-5">
        <DesignCard ctx={ctx} />
        {canRecord ? (
          <ReadingsForm
            ctx={ctx}
            onRecorded={(check) => {
              setLatest(check);
              void qc.invalidateQueries({ queryKey: ['bench', stageId] });
            }}
          />
        ) : null}
      </div>
      <div className="space-y-5">
        {latest ? (
          <div data-testid="bench-result">
            <BenchCheckCard check={latest} highlight onPhoto={(p) => setLatest({ ...latest, photos: [...latest.photos, p] })} canUpload={canRecord} />
          </div>
        ) : null}
        <Card>
          <CardHeader
            title={`History of ${ctx.stage.name}`}
            actions={
              <label className="flex items-center gap-2 text-xs text-muted">
                <input type="checkbox" checked={failingOnly} onChange={(e) => setFailingOnly(e.target.checked)} className="accent-[var(--heater)]" />
                Failing only
              </label>
            }
          />
          <CardBody className="space-y-3" data-testid="bench-history">
            {data.isFetching && !data.data ? <p className="text-sm text-muted">Loading…</p> : null}
            {data.data && data.data.checks.length === 0 ? <p className="text-sm text-muted">{failingOnly ? 'No failing checks for this stage.' : 'No bench checks recorded for this stage yet.'}</p> : null}
            {data.data?.checks.map((c) => (
              <details key={c.id} className="rounded-md border border-rule" data-verdict={c.verdict}>
                <summary className="flex cursor-pointer flex-wrap items-center gap-x-3 gap-y-1 px-3 py-2 text-sm">
                  <StatusBadge status={c.verdict} />
                  <span className="text-muted">{formatDateTime(c.createdAt)}</span>
                  <span>{c.technician?.displayName ?? 'unknown'}</span>
                  <span className="num text-xs">Ia {formatMaybe(c.comparisons.find((x) => x.key === 'plateCurrent')?.measured, 'A')}</span>
                  <span className="num text-xs">Pa {formatMaybe(c.comparisons.find((x) => x.key === 'plateDissipation')?.measured, 'W')}</span>
                  {c.tubeSerial ? <span className="num text-xs text-muted">tube {c.tubeSerial}</span> : null}
                  {c.photos.length ? <span className="text-xs text-muted">{c.photos.length} photo{c.photos.length === 1 ? '' : 's'}</span> : null}
                </summary>
                <div className="border-t border-rule p-3">
                  <BenchCheckCard check={c} bare canUpload={false} />
                </div>
              </details>
            ))}
          </CardBody>
        </Card>
      </div>
    </div>
  );
}

function DesignCard({ ctx }: { ctx: BenchContext }) {
  const e = ctx.expected;
  const rows: [string, string, string][] = [
    ['Supply (B+)', formatMaybe(e.supplyVoltage, 'V'), formatTolerance(ctx.tolerances.supplyVoltage.value)],
    ['Plate to ground', formatMaybe(e.plateVoltage, 'V'), formatTolerance(ctx.tolerances.plateVoltage.value)],
    ['Cathode to ground', formatMaybe(e.cathodeVoltage, 'V'), formatTolerance(ctx.tolerances.cathodeVoltage.value)],
    ...(ctx.pentode ? [['Screen to ground', formatMaybe(e.screenVoltage, 'V'), formatTolerance(ctx.tolerances.screenVoltage.value)] as [string, string, string]] : []),
    ['Heater (nominal)', formatMaybe(e.heaterVoltage, 'V'), formatTolerance(ctx.tolerances.heaterVoltage.value)],
    ['Plate current', formatMaybe(e.plateCurrent, 'A'), formatTolerance(ctx.tolerances.plateCurrent.value)],
    ['Plate to cathode', formatMaybe(e.plateCathodeVoltage, 'V'), formatTolerance(ctx.tolerances.plateCathodeVoltage.value)],
    ['Plate dissipation', formatMaybe(e.plateDissipation, 'W'), ctx.limits.plateDissipation ? `rating ${formatMaybe(ctx.limits.plateDissipation, 'W')}` : formatTolerance(ctx.tolerances.plateDissipation.value)],
  ];
  const projectTol = Object.values(ctx.tolerances).some((t) => t.source === 'project');
  return (
    <Card>
      <CardHeader title={`${ctx.stage.projectName} · ${ctx.stage.name}`} actions={<span className="num text-xs text-muted">{ctx.stage.tubeDesignation}</span>} />
      <CardBody className="space-y-3">
        {ctx.analysisError ? (
          <p role="alert" className="rounded-md border border-over/40 bg-over/10 px-3 py-2 text-sm">
            The design has no operating point ({ctx.analysisError.message}). Readings are checked against the tube&apos;s ratings only.
          </p>
        ) : null}
        <table className="w-full text-sm" data-testid="bench-expected">
          <thead className="text-left text-xs text-muted">
            <tr>
              <th className="pb-1 font-medium">Design value</th>
              <th className="pb-1 text-right font-medium">Expected</th>
              <th className="pb-1 text-right font-medium">Tolerance</th>
            </tr>
          </thead>
          <tbody className="divide-y divide-rule">
            {rows.map(([label, value, tol]) => (
              <tr key={label}>
                <td className="py-1.5">{label}</td>
                <td className="num py-1.5 text-right">{value}</td>
                <td className="num py-1.5 text-right text-xs text-muted">{tol}</td>
              </tr>
            ))}
          </tbody>
        </table>
        <p className="text-xs text-muted">
          {projectTol ? 'Tolerances marked by the project apply; the others are ' : 'Tolerances are '}±10 % of the design value, common workshop practice; the heater is checked against ±10 % of its nominal voltage. Outside twice the tolerance, or over a rating, is a fail.
        </p>
        <p className="text-xs text-muted">
          {ctx.plateCurrentRoute ? (
            <>Anodyne works out the plate current from {ROUTE_WORDS[ctx.plateCurrentRoute]}, unless you enter a measured current.</>
          ) : (
            <b className="text-near">This stage has nothing to measure the plate current across: enter the current read on a meter in the plate lead.</b>
          )}
        </p>
      </CardBody>
    </Card>
  );
}

function ReadingsForm({ ctx, onRecorded }: { ctx: BenchContext; onRecorded: (c: BenchCheckDTO) => void }) {
  const form = useForm<BenchCheckInput, unknown, BenchCheckValues>({
    resolver: zodResolver(benchCheckSchema),
    defaultValues: { supplyVoltage: '', plateVoltage: '', cathodeVoltage: '', screenVoltage: '', heaterVoltage: '', measuredCurrent: '', tubeSerial: '', notes: '' },
  });
  const { errors, isSubmitting } = form.formState;
  const [error, setError] = useState<string | null>(null);
  const photoRef = useRef<HTMLInputElement>(null);
  const e = ctx.expected;

  const onSubmit = form.handleSubmit(async (values) => {
    setError(null);
    try {
      const { benchCheck } = await fetchJson<{ benchCheck: BenchCheckDTO }>(`/api/stages/${ctx.stage.id}/bench-checks`, { method: 'POST', body: values });
      const files = Array.from(photoRef.current?.files ?? []);
      const photos: BenchPhoto[] = [];
      for (const f of files) {
        const p = await uploadPhoto(benchCheck.id, f).catch((err: Error) => {
          setError(`The check is saved, but the photo ${f.name} was not: ${err.message}`);
          return null;
        });
        if (p) photos.push(p);
      }
      if (photoRef.current) photoRef.current.value = '';
      onRecorded({ ...benchCheck, photos: [...benchCheck.photos, ...photos] });
    } catch (err) {
      if (err instanceof ApiRequestError && err.fieldErrors) {
        for (const [k, v] of Object.entries(err.fieldErrors)) form.setError(k as keyof BenchCheckInput, { message: v[0] });
      }
      setError(err instanceof Error ? err.message : 'The bench check was not saved.');
    }
  });

  const volt = (name: 'supplyVoltage' | 'plateVoltage' | 'cathodeVoltage' | 'screenVoltage' | 'heaterVoltage', label: string, expected: number | null, hint?: string) => (
    <Field label={label} htmlFor={`bench-${name}`} unit="V" error={errors[name]?.message} hint={expected !== null ? `design ${formatMaybe(expected, 'V')}${hint ? ` · ${hint}` : ''}` : hint}>
      <Input id={`bench-${name}`} inputMode="decimal" autoComplete="off" className="num" aria-invalid={!!errors[name]} {...form.register(name)} />
    </Field>
  );

  return (
    <Card>
      <CardHeader title="Record readings" />
      <CardBody>
        <form onSubmit={onSubmit} className="space-y-3" noValidate data-testid="bench-form">
          <p className="text-xs text-muted">DC voltages to ground (chassis), after warm-up, with no signal. One hand behind your back.</p>
          <div className="grid grid-cols-2 gap-3">
            {volt('supplyVoltage', 'Supply (B+)', e.supplyVoltage)}
            {volt('plateVoltage', 'Plate to ground', e.plateVoltage)}
            {volt('cathodeVoltage', 'Cathode to ground', e.cathodeVoltage)}
            {ctx.pentode ? volt('screenVoltage', 'Screen to ground', e.screenVoltage) : null}
            {volt('heaterVoltage', 'Heater voltage', e.heaterVoltage, 'optional')}
            <Field
              label={ctx.plateCurrentRoute ? 'Measured plate current' : 'Measured plate current (needed)'}
              htmlFor="bench-measuredCurrent"
              unit="A"
              error={errors.measuredCurrent?.message}
              hint={`${e.plateCurrent !== null ? `design ${formatMaybe(e.plateCurrent, 'A')} · ` : ''}${ctx.plateCurrentRoute ? 'optional, e.g. 1.1m' : 'e.g. 42m'}`}
            >
              <Input id="bench-measuredCurrent" inputMode="decimal" autoComplete="off" className="num" aria-invalid={!!errors.measuredCurrent} {...form.register('measuredCurrent')} />
            </Field>
          </div>
          <Field label="Tube serial or batch" htmlFor="bench-tubeSerial" error={errors.tubeSerial?.message}>
            <Input id="bench-tubeSerial" autoComplete="off" {...form.register('tubeSerial')} />
          </Field>
          <Field label="Notes" htmlFor="bench-notes" error={errors.notes?.message}>
            <Textarea id="bench-notes" rows={3} {...form.register('notes')} />
          </Field>
          <Field label="Photos of the build (JPEG, PNG or WebP, up to 8 MB each)" htmlFor="bench-photos">
            <input id="bench-photos" ref={photoRef} type="file" accept="image/jpeg,image/png,image/webp" multiple className="block w-full text-xs text-muted file:mr-3 file:rounded-md file:border file:border-rule file:bg-sheet file:px-2.5 file:py-1.5 file:text-ink" />
          </Field>
          {error ? (
            <p role="alert" className="text-sm text-over">
              {error}
            </p>
          ) : null}
          <Button type="submit" disabled={isSubmitting} className="w-full">
            {isSubmitting ? 'Checking…' : 'Record bench check'}
          </Button>
        </form>
      </CardBody>
    </Card>
  );
}
