'use client';

// The stage editor: inputs | plots | results and ratings. Every edit re-runs the analysis on the server
// (debounced, stale requests aborted); the last good result stays on screen, marked, until a new one arrives.
import { useQuery } from '@tanstack/react-query';
import Link from 'next/link';
import { useRouter } from 'next/navigation';
import { useEffect, useMemo, useState } from 'react';
import { useForm } from 'react-hook-form';
import { Caution } from '@/components/shell/caution';
import { Badge, StatusBadge } from '@/components/ui/badge';
import { Button } from '@/components/ui/button';
import { Card, CardHeader } from '@/components/ui/card';
import type { TubeOption } from '@/lib/tubes/service';
import { ApiRequestError, fetchJson } from '@/lib/hooks/fetch-json';
import {
  conflictCurrent,
  projectQueryOptions,
  stageQueryOptions,
  useSaveStage,
  type AnalyzeBody,
  type LiveAnalysisState,
  type ProjectDetail,
  type StageDTO,
} from '@/lib/hooks/stages';
import { fromStageInputs, newStageDefaults, parseStageForm, switchTopology, topologyLabel, type FieldErrorMap, type StageFormValues } from '@/components/stage-editor/form';
import { stageMetaSchema } from '@/lib/validation/project';
import type { Topology } from '@/lib/validation/stage';
import { cn } from '@/lib/utils';
import { PlotPanel } from './plot-panel';
import { RatingsPanel, ResultsPanel } from './results-panel';
import { StageInputs } from './stage-inputs';
import { suitableTube, suitsTopology } from './tube-choice';
import { useLiveAnalysis } from './use-live-analysis';

type Props = { projectId: number; stageId?: number; tubes: TubeOption[]; canEdit: boolean; initialProject?: ProjectDetail; initialStage?: StageDTO };

export function StageEditor({ projectId, stageId, tubes, canEdit, initialProject, initialStage }: Props) {
  const project = useQuery({ ...projectQueryOptions(projectId), initialData: initialProject });
  const stage = useQuery({ ...stageQueryOptions(stageId ?? 0), enabled: stageId !== undefined, staleTime: Infinity, initialData: initialStage });
  const error = project.error ?? stage.error;
  if (error) {
    return (
      <Card className="p-6" role="alert">
        <p className="font-medium">This {stage.error ? 'stage' : 'project'} could not be opened.</p>
        <p className="mt-1 text-sm text-muted">{error.message}</p>
        <Link href={`/projects/${projectId}`} className="mt-3 inline-block text-sm text-dcline underline">
          Back to the project
        </Link>
      </Card>
    );
  }
  if (!project.data || (stageId !== undefined && !stage.data)) return <StageEditorSkeleton />;
  return <StageEditorForm key={stage.data?.id ?? 'new'} project={project.data} stage={stage.data ?? null} tubes={tubes} canEdit={canEdit} />;
}


const STATE_TEXT: Record<LiveAnalysisState, string> = {
  current: 'Up to date',
  updating: 'Updating…',
  invalid: 'Stale: fix the marked value',
  failed: 'Stale: the calculation failed',
  none: 'No result yet',
};

function StageEditorForm({ project, stage, tubes, canEdit }: { project: ProjectDetail; stage: StageDTO | null; tubes: TubeOption[]; canEdit: boolean }) {
  const router = useRouter();
  const isNew = stage === null;
  const readOnly = !canEdit || project.archived;
  const initial = useMemo(
    () =>
      stage
        ? fromStageInputs(stage.inputs, stage)
        : newStageDefaults('common-cathode', { tubeId: suitableTube('common-cathode', tubes), name: `Stage ${project.stages.length + 1}` }),
    // the form owns its values after the first render
    // eslint-disable-next-line react-hooks/exhaustive-deps
    [],
  );
  const form = useForm<StageFormValues>({ defaultValues: initial });
  const values = form.watch();
  const valuesKey = JSON.stringify(values);
  const tube = tubes.find((t) => String(t.id) === values.tubeId);
  const tubeIsPentode = !!tube && tube.family !== 'triode';

  const parsed = useMemo(() => parseStageForm(JSON.parse(valuesKey) as StageFormValues, { tubeIsPentode }), [valuesKey, tubeIsPentode]);
  const nameCheck = stageMetaSchema.shape.name.safeParse(values.name);
  const analyzeBody: AnalyzeBody | null = useMemo(
    () => (parsed.ok ? { ...parsed.body, ...(/^\d+$/.test(values.tubeModelId) ? { tubeModelId: Number(values.tubeModelId) } : {}) } : null),
    [parsed, values.tubeModelId],
  );
  const live = useLiveAnalysis(analyzeBody, stage?.analysis ?? null);

  const [version, setVersion] = useState(stage?.version ?? 0);
  const [conflict, setConflict] = useState<StageDTO | null>(null);
  const [serverErrors, setServerErrors] = useState<{ key: string; errors: FieldErrorMap } | null>(null);
  const [saveError, setSaveError] = useState<string | null>(null);
  const [savedNote, setSavedNote] = useState<string | null>(null);
  const save = useSaveStage();
  const dirty = form.formState.isDirty;

  useEffect(() => {
    if (!dirty || readOnly) return;
    const warn = (e: BeforeUnloadEvent) => e.preventDefault();
    window.addEventListener('beforeunload', warn);
    return () => window.removeEventListener('beforeunload', warn);
  }, [dirty, readOnly]);

  const errors: FieldErrorMap = {
    ...(serverErrors && serverErrors.key === valuesKey ? serverErrors.errors : {}),
    ...(live.error?.fieldErrors && live.state === 'failed' ? firstMessages(live.error.fieldErrors) : {}),
    ...(parsed.ok ? {} : parsed.errors),
    ...(nameCheck.success ? {} : { name: nameCheck.error.issues[0]?.message ?? 'Name the stage.' }),
  };

  async function submit(baseVersion = version) {
    setSaveError(null);
    setSavedNote(null);
    if (!parsed.ok || !nameCheck.success) {
      setSaveError('Not saved: fix the marked values first.');
      return;
    }
    const v = form.getValues();
    const tubeModelId = /^\d+$/.test(v.tubeModelId) ? Number(v.tubeModelId) : null;
    try {
      if (isNew) {
        const created = await save.mutateAsync({
          kind: 'create',
          projectId: project.id,
          body: { ...parsed.body, name: nameCheck.data, supplyNode: v.supplyNode || null, ...(tubeModelId ? { tubeModelId } : {}) },
        });
        form.reset(v);
        router.push(`/projects/${project.id}/stages/${created.id}`);
        return;
      }
      const saved = await save.mutateAsync({
        kind: 'update',
        stageId: stage.id,
        version: baseVersion,
        name: nameCheck.data,
        supplyNode: v.supplyNode || null,
        tubeModelId,
        inputs: parsed.body,
      });
      setVersion(saved.version);
      setConflict(null);
      form.reset(v);
      setSavedNote(`Saved as version ${saved.version}.`);
    } catch (e) {
      if (e instanceof ApiRequestError && e.status === 409) {
        const theirs = conflictCurrent(e) ?? (stage ? await fetchJson<{ stage: StageDTO }>(`/api/stages/${stage.id}`).then((r) => r.stage).catch(() => null) : null);
        if (theirs) {
          setConflict(theirs);
          return;
        }
      }
      if (e instanceof ApiRequestError && e.fieldErrors) {
        const mapped: FieldErrorMap = {};
        for (const [k, msgs] of Object.entries(e.fieldErrors)) mapped[k.replace(/^inputs\./, '')] = msgs[0] ?? 'is not valid';
        setServerErrors({ key: valuesKey, errors: mapped });
      }
      setSaveError(`Not saved: ${e instanceof Error ? e.message : 'the server did not answer.'} Your values are still in the form.`);
    }
  }

  function reloadTheirs() {
    if (!conflict) return;
    form.reset(fromStageInputs(conflict.inputs, conflict));
    setVersion(conflict.version);
    setConflict(null);
    setSaveError(null);
    setSavedNote(`Loaded version ${conflict.version}.`);
  }

  function keepMine() {
    if (!conflict) return;
    const theirs = conflict.version;
    setVersion(theirs);
    void submit(theirs);
  }

  function onTopologyChange(t: Topology) {
    if (!isNew) return;
    const next = switchTopology(form.getValues(), t);
    // each topology starts from one of its usual types (an output stage does not keep the preamp's 12AX7)
    const current = tubes.find((x) => String(x.id) === next.tubeId);
    if (!suitsTopology(t, current)) {
      next.tubeId = suitableTube(t, tubes);
      next.tubeModelId = '';
    }
    form.reset(next, { keepDefaultValues: true });
  }

  const analysis = live.analysis;
  const fileStem = `${project.name}-${values.name || 'stage'}`.replace(/[^A-Za-z0-9+_.-]+/g, '-').toLowerCase();
  const status = live.state;

  return (
    <form
      noValidate
      onSubmit={(e) => {
        e.preventDefault();
        if (!readOnly) void submit();
      }}
      data-testid="stage-editor"
      data-analysis-source={live.source}
    >
      <div className="mb-4 flex flex-wrap items-end justify-between gap-3">
        <div className="min-w-0">
          <nav aria-label="Breadcrumb" className="text-xs text-muted">
            <Link href="/projects" className="hover:text-ink hover:underline">
              Projects
            </Link>
            <span aria-hidden> / </span>
            <Link href={`/projects/${project.id}`} className="hover:text-ink hover:underline">
              {project.name}
            </Link>
          </nav>
          <h1 className="mt-0.5 truncate text-xl font-semibold tracking-tight">{isNew ? 'New stage' : values.name || stage.name}</h1>
          <p className="mt-0.5 flex flex-wrap items-center gap-2 text-sm text-muted">
            <span>{topologyLabel(values.topology)}</span>
            {tube ? (
              <>
                <span aria-hidden>·</span>
                <span className="num">{tube.designation}</span>
              </>
            ) : null}
            {!isNew ? (
              <>
                <span aria-hidden>·</span>
                <span className="num" data-testid="stage-version">
                  version {version}
                </span>
              </>
            ) : null}
            <StatusBadge status={project.status} />
            {project.archived ? <Badge>archived</Badge> : null}
          </p>
        </div>
        <div className="flex flex-wrap items-center gap-3">
          <span className="inline-flex items-center gap-1.5 text-xs text-muted" data-testid="analysis-state" data-state={status} aria-live="polite">
            <span
              aria-hidden
              className={cn('h-2 w-2 rounded-full', status === 'current' ? 'bg-ok' : status === 'updating' ? 'animate-pulse bg-heater' : status === 'none' ? 'bg-rule' : 'bg-near')}
            />
            {STATE_TEXT[status]}
          </span>
          {!isNew ? (
            <Link href={`/projects/${project.id}/stages/${stage.id}/explore`} className="text-sm text-dcline underline" data-testid="explore-link">
              Explore
            </Link>
          ) : null}
          {readOnly ? (
            <Badge tone="neutral">Read only</Badge>
          ) : (
            <>
              {dirty ? <Badge tone="accent">Unsaved changes</Badge> : savedNote ? <span className="text-xs text-ok" role="status">{savedNote}</span> : null}
              <Button type="submit" disabled={save.isPending || !!conflict}>
                {save.isPending ? 'Saving…' : isNew ? 'Save stage' : 'Save'}
              </Button>
            </>
          )}
        </div>
      </div>

      {!readOnly && project.status !== 'draft' ? (
        <p className="mb-3 text-xs text-muted">This project is {project.status.replace('-', ' ')}; saving a change starts a new draft.</p>
      ) : null}
      {readOnly ? (
        <p className="mb-3 text-xs text-muted">{project.archived ? 'This project is archived; its stages are read only.' : 'Your role can study this stage and try values, but not save them.'}</p>
      ) : null}

      {conflict ? (
        <div role="alert" className="mb-3 flex flex-wrap items-center gap-3 rounded-md border border-near/50 bg-near/10 px-3 py-2 text-sm" data-testid="conflict">
          <p className="min-w-0 flex-1">
            <b>Someone else saved this stage (version {conflict.version})</b> while you were editing. Your values are still in the form.
          </p>
          <Button type="button" variant="secondary" size="sm" onClick={reloadTheirs}>
            Reload their version
          </Button>
          <Button type="button" size="sm" onClick={keepMine} disabled={save.isPending}>
            Keep mine
          </Button>
        </div>
      ) : null}
      {saveError ? (
        <p role="alert" className="mb-3 rounded-md border border-over/40 bg-over/10 px-3 py-2 text-sm text-over" data-testid="save-error">
          {saveError}
        </p>
      ) : null}

      <Caution className="mb-4" compact />

      <div className="grid grid-cols-1 gap-4 lg:grid-cols-[320px_minmax(0,1fr)] xl:grid-cols-[300px_minmax(0,1fr)_300px] 2xl:grid-cols-[340px_minmax(0,1fr)_340px]">
        <Card className="self-start">
          <CardHeader title="Inputs" />
          <StageInputs form={form} errors={errors} tubes={tubes} supplyNodes={project.supply.nodes ?? []} isNew={isNew} readOnly={readOnly} onTopologyChange={onTopologyChange} />
        </Card>

        <Card className="min-w-0 self-start">
          <CardHeader title="Plate curves and load lines" />
          <div className="p-4">
            {status === 'failed' && live.error ? (
              <div role="alert" className="mb-3 rounded-md border border-over/40 bg-over/10 px-3 py-2 text-sm" data-testid="calc-error">
                <b className="text-over">The calculation could not finish.</b> {live.error.message}
                {analysis ? <span className="text-muted"> The plots show the last good result.</span> : null}
              </div>
            ) : null}
            {analysis ? (
              <PlotPanel analysis={analysis} stale={live.stale} fileStem={fileStem} />
            ) : (
              <div className="flex h-[440px] items-center justify-center rounded-md border border-dashed border-rule text-sm text-muted">
                {status === 'updating' ? 'Calculating…' : 'Choose a tube and enter values to see the plate curves.'}
              </div>
            )}
          </div>
        </Card>

        <div className="space-y-4 lg:col-span-2 lg:grid lg:grid-cols-2 lg:gap-4 lg:space-y-0 xl:col-span-1 xl:block xl:space-y-4">
          <Card className="self-start">
            <CardHeader title="Results" />
            {analysis ? <ResultsPanel analysis={analysis} stale={live.stale} /> : <p className="p-4 text-sm text-muted">No result yet.</p>}
          </Card>
          <Card className="self-start">
            <CardHeader title="Ratings" actions={<span className="text-xs text-muted">value · limit · %</span>} />
            {analysis ? <RatingsPanel ratings={analysis.ratings} stale={live.stale} /> : <p className="p-4 text-sm text-muted">No result yet.</p>}
          </Card>
        </div>
      </div>
    </form>
  );
}

function firstMessages(fieldErrors: Record<string, string[]>): FieldErrorMap {
  const out: FieldErrorMap = {};
  for (const [k, v] of Object.entries(fieldErrors)) if (v[0]) out[k] = v[0];
  return out;
}

export function StageEditorSkeleton() {
  return (
    <div aria-busy="true" aria-label="Loading the stage editor" className="space-y-4">
      <div className="h-4 w-40 animate-pulse rounded bg-rule/50" />
      <div className="h-7 w-72 animate-pulse rounded bg-rule/60" />
      <div className="h-10 animate-pulse rounded bg-rule/30" />
      <div className="grid grid-cols-1 gap-4 lg:grid-cols-[320px_minmax(0,1fr)] xl:grid-cols-[300px_minmax(0,1fr)_300px] 2xl:grid-cols-[340px_minmax(0,1fr)_340px]">
        <div className="h-[640px] animate-pulse rounded-lg bg-rule/30" />
        <div className="h-[640px] animate-pulse rounded-lg bg-rule/30" />
        <div className="hidden h-[640px] animate-pulse rounded-lg bg-rule/30 xl:block" />
      </div>
    </div>
  );
}
