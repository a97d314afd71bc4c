'use client';

import { zodResolver } from '@hookform/resolvers/zod';
import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import dynamic from 'next/dynamic';
import Link from 'next/link';
import { useState } from 'react';
import { useForm } from 'react-hook-form';
import { Caution } from '@/components/shell/caution';
import { Badge, StatusBadge } from '@/components/ui/badge';
import { Button, buttonVariants } from '@/components/ui/button';
import { Card, CardBody, CardHeader } from '@/components/ui/card';
import { Field } from '@/components/ui/field';
import { Input, Textarea } from '@/components/ui/input';
import type { ProjectDetail, StageDTO, WatcherOption } from '@/lib/projects/service';
import { ApiRequestError, fetchJson } from '@/lib/hooks/fetch-json';
import { TOPOLOGY_LABELS } from '@/lib/report/labels';
import { PdfDownloadButton } from '@/components/shell/pdf-download-button';
import { formatEng } from '@/lib/format/number';
import { cn } from '@/lib/utils';
import { renameProjectSchema, type RenameProjectInput } from '@/lib/validation/project';
import { SubmitForReviewButton } from '@/components/reviews/submit-for-review-button';
import { ChainLinksEditor } from './chain-links-editor';
import { ChainView } from './chain-view';
import { ReviewSettings } from './review-settings';

// The supply editor (its ladder chart and rectifier tables) sits at the foot of the page: fetched after first paint.
const SupplyCircuitEditor = dynamic(() => import('./supply-circuit-editor').then((m) => m.SupplyCircuitEditor), { ssr: false });

export const projectKey = (id: number) => ['project', id] as const;

function worstRating(s: StageDTO): 'ok' | 'near' | 'over' | 'not-checked' | null {
  if (!s.analysis) return null;
  for (const k of ['over', 'near', 'ok'] as const) if (s.analysis.ratings.some((r) => r.status === k)) return k;
  return 'not-checked';
}

function Num({ v, unit, digits = 3 }: { v: number | null | undefined; unit: string; digits?: number }) {
  return <span className="num">{typeof v === 'number' ? formatEng(v, unit, digits) : '–'}</span>;
}

export function ProjectView({ initialProject, canWrite, watcherOptions = [] }: { initialProject: ProjectDetail; canWrite: boolean; watcherOptions?: WatcherOption[] }) {
  const qc = useQueryClient();
  const query = useQuery({
    queryKey: projectKey(initialProject.id),
    queryFn: ({ signal }) => fetchJson<{ project: ProjectDetail }>(`/api/projects/${initialProject.id}`, { signal }).then((r) => r.project),
    initialData: initialProject,
  });
  const project = query.data;
  const [renaming, setRenaming] = useState(false);
  const [notice, setNotice] = useState<string | null>(null);
  const setProject = (p: ProjectDetail) => qc.setQueryData(projectKey(p.id), p);
  const archive = useMutation({
    mutationFn: (archived: boolean) => fetchJson<{ project: ProjectDetail }>(`/api/projects/${project.id}`, { method: 'PATCH', body: { version: project.version, archived } }),
    onSuccess: (r) => {
      setProject(r.project);
      setNotice(r.project.archived ? 'Project archived. It stays readable; restore it to edit again.' : 'Project restored.');
    },
    onError: (err) => setNotice(err.message),
  });
  const editable = canWrite && !project.archived;

  return (
    <div className="space-y-5">
      <div className="flex flex-wrap items-start justify-between gap-3">
        <div className="min-w-0">
          <div className="mb-1 text-xs text-muted">
            <Link href="/projects" className="hover:underline">Projects</Link> /
          </div>
          {renaming ? (
            <RenameForm project={project} onDone={(p) => { if (p) setProject(p); setRenaming(false); }} />
          ) : (
            <>
              <h1 className="flex flex-wrap items-center gap-2 text-xl font-semibold tracking-tight" data-testid="project-name">
                {project.name}
                <StatusBadge status={project.status} />
                {project.archived ? <Badge>archived</Badge> : null}
              </h1>
              <p className="mt-0.5 text-sm text-muted">
                {project.owner ? `Owner ${project.owner.displayName} · ` : ''}version <span className="num">{project.version}</span> · last change{' '}
                <span className="num">{new Date(project.updatedAt).toISOString().slice(0, 16).replace('T', ' ')} UTC</span>
              </p>
              {project.description ? <p className="mt-2 max-w-3xl text-sm">{project.description}</p> : null}
            </>
          )}
        </div>
        <div className="flex flex-wrap gap-2">
          {project.stages.length ? <Link className={buttonVariants({ variant: 'secondary', size: 'sm' })} href={`/projects/${project.id}/explore`}>Explore the chain</Link> : null}
          <PdfDownloadButton href={`/api/projects/${project.id}/report`} filename={`anodyne-${project.name.replace(/[^A-Za-z0-9]+/g, '-').toLowerCase()}-report.pdf`} label="Design report (PDF)" />
          {canWrite && !project.archived ? (
            <SubmitForReviewButton projectId={project.id} status={project.status} disabledReason={project.stages.length === 0 ? 'Add a stage before submitting for review.' : null} />
          ) : null}
          {canWrite && !renaming && !project.archived ? <Button variant="secondary" size="sm" onClick={() => setRenaming(true)}>Rename</Button> : null}
          {canWrite ? (
            <Button variant={project.archived ? 'secondary' : 'danger'} size="sm" disabled={archive.isPending} onClick={() => archive.mutate(!project.archived)}>
              {project.archived ? 'Restore' : 'Archive'}
            </Button>
          ) : null}
        </div>
      </div>
      {notice ? <p role="status" className="text-sm text-muted">{notice}</p> : null}
      <Caution />

      <Card>
        <CardHeader
          title="Signal chain stages"
          actions={editable ? <Link className={buttonVariants({ size: 'sm' })} href={`/projects/${project.id}/stages/new`}>Add stage</Link> : null}
        />
        <CardBody className="p-0">
          <StagesTable project={project} />
          {project.stages.length ? (
            <p className="border-t border-rule px-4 py-2 text-xs text-muted">
              Results as saved, at each stage’s own assumed supply. The chain below re-analyses every stage at its solved node voltage.
            </p>
          ) : null}
        </CardBody>
      </Card>

      <ChainView project={project} />

      <ChainLinksEditor project={project} editable={editable} onSaved={setProject} />

      <SupplyCircuitEditor project={project} editable={editable} onSaved={setProject} />

      <ReviewSettings project={project} editable={editable} users={watcherOptions} onSaved={setProject} />
    </div>
  );
}

function StagesTable({ project }: { project: ProjectDetail }) {
  if (project.stages.length === 0) return <p className="p-4 text-sm text-muted">No stages yet. Add the first stage of the signal chain.</p>;
  return (
    <div className="overflow-x-auto">
      <table className="w-full text-sm" data-testid="stages-table">
        <thead className="border-b border-rule text-left text-xs text-muted">
          <tr>
            <th className="px-3 py-2 font-medium">#</th>
            <th className="px-3 py-2 font-medium">Stage</th>
            <th className="px-3 py-2 font-medium">Tube</th>
            <th className="px-3 py-2 font-medium">Node</th>
            <th className="px-3 py-2 text-right font-medium">Va–k</th>
            <th className="px-3 py-2 text-right font-medium">Ia</th>
            <th className="px-3 py-2 text-right font-medium">Pa</th>
            <th className="px-3 py-2 text-right font-medium">Gain</th>
            <th className="px-3 py-2 text-right font-medium">THD</th>
            <th className="px-3 py-2 font-medium">Ratings</th>
            <th className="px-3 py-2 font-medium">Curves (CSV)</th>
          </tr>
        </thead>
        <tbody className="divide-y divide-rule">
          {project.stages.map((s) => {
            const a = s.analysis;
            const worst = worstRating(s);
            return (
              <tr key={s.id} className="hover:bg-paper/60">
                <td className="num px-3 py-2 text-muted">{s.position}</td>
                <td className="px-3 py-2">
                  <Link href={`/projects/${project.id}/stages/${s.id}`} className="font-medium underline-offset-2 hover:underline">{s.name}</Link>
                  <div className="text-xs text-muted">{TOPOLOGY_LABELS[s.topology] ?? s.topology}</div>
                </td>
                <td className="px-3 py-2">{s.tubeDesignation}</td>
                <td className="num px-3 py-2 text-xs">{s.supplyNode ?? '–'}</td>
                {a ? (
                  <>
                    <td className="px-3 py-2 text-right"><Num v={a.operatingPoint.plateCathodeVoltage} unit="V" /></td>
                    <td className="px-3 py-2 text-right"><Num v={a.operatingPoint.plateCurrent} unit="A" /></td>
                    <td className="px-3 py-2 text-right"><Num v={a.operatingPoint.plateDissipation} unit="W" /></td>
                    <td className="px-3 py-2 text-right"><span className="num">{a.smallSignal.gain.toFixed(1)}</span></td>
                    <td className="px-3 py-2 text-right"><span className="num">{a.largeSignal.thdPercent.toFixed(2)} %</span></td>
                  </>
                ) : (
                  <td colSpan={5} className="px-3 py-2 text-sm text-over">Not analysed: {s.analysisError?.message ?? 'no analysis stored.'}</td>
                )}
                <td className="px-3 py-2">{worst ? <StatusBadge status={worst} /> : <StatusBadge status="over" className="opacity-80" />}</td>
                <td className="px-3 py-2 text-xs">
                  {a ? (
                    <span className="flex gap-2">
                      {(['plate', 'transfer', 'response', 'waveform'] as const).map((k) => (
                        <a key={k} className="text-dcline hover:underline" href={`/api/stages/${s.id}/curves?kind=${k}`} download>{k}</a>
                      ))}
                    </span>
                  ) : '–'}
                </td>
              </tr>
            );
          })}
        </tbody>
      </table>
    </div>
  );
}

function RenameForm({ project, onDone }: { project: ProjectDetail; onDone: (p: ProjectDetail | null) => void }) {
  const form = useForm<RenameProjectInput>({ resolver: zodResolver(renameProjectSchema), defaultValues: { name: project.name, description: project.description } });
  const { errors, isSubmitting } = form.formState;
  const [error, setError] = useState<string | null>(null);
  const onSubmit = form.handleSubmit(async (values) => {
    setError(null);
    try {
      const r = await fetchJson<{ project: ProjectDetail }>(`/api/projects/${project.id}`, { method: 'PATCH', body: { version: project.version, ...values } });
      onDone(r.project);
    } catch (err) {
      if (err instanceof ApiRequestError && err.fieldErrors) for (const [k, v] of Object.entries(err.fieldErrors)) form.setError(k as keyof RenameProjectInput, { message: v[0] });
      setError(err instanceof ApiRequestError && err.status === 409 ? `${err.message}` : err instanceof Error ? err.message : 'Could not rename.');
    }
  });
  return (
    <form onSubmit={onSubmit} className={cn('w-[min(40rem,90vw)] space-y-2')} noValidate>
      <Field label="Project name" htmlFor="rename-name" error={errors.name?.message}>
        <Input id="rename-name" autoFocus {...form.register('name')} />
      </Field>
      <Field label="Description" htmlFor="rename-description" error={errors.description?.message}>
        <Textarea id="rename-description" {...form.register('description')} />
      </Field>
      {error ? <p role="alert" className="text-sm text-over">{error}</p> : null}
      <div className="flex gap-2">
        <Button type="submit" size="sm" disabled={isSubmitting}>Save</Button>
        <Button type="button" size="sm" variant="ghost" onClick={() => onDone(null)}>Cancel</Button>
      </div>
    </form>
  );
}
