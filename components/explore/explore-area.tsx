'use client';

import Link from 'next/link';
import { useEffect, useMemo, useState } from 'react';
import { Segmented, tabPanelProps } from '@/components/stage-editor/segmented';
import { Caution } from '@/components/shell/caution';
import { Card, CardBody, CardHeader } from '@/components/ui/card';
import type { SearchResult } from '@/lib/calc/explore/search';
import type { SwapRow } from '@/lib/calc/explore/swap';
import type { ToleranceSummary } from '@/lib/calc/explore/tolerance';
import { ApiRequestError } from '@/lib/hooks/fetch-json';
import type { StageDTO } from '@/lib/stages/service';
import { PART_WORDS } from './format';
import { RunStatus } from './run-status';
import { SearchForm, SearchResults } from './search-tool';
import { SwapResults } from './swap-tool';
import { ToleranceForm, ToleranceResults, type PartRow } from './tolerance-tool';
import { useCreateRun, useRun, useRuns } from './use-run';
import { Button } from '@/components/ui/button';

type Tool = 'tolerance' | 'swap' | 'search';
const TOOL_NAMES: Record<Tool, string> = { tolerance: 'Tolerance run', swap: 'Tube swap', search: 'Part search' };

const CAPACITOR_PATHS = new Set(['bias.cathodeBypass', 'screen.bypass', 'load.couplingCapacitor', 'secondGridBypass']);

function partsOf(inputs: Record<string, unknown>): PartRow[] {
  const out: PartRow[] = [];
  for (const [path, label] of Object.entries(PART_WORDS)) {
    let v: unknown = inputs;
    for (const k of path.split('.')) v = v && typeof v === 'object' ? (v as Record<string, unknown>)[k] : undefined;
    if (typeof v === 'number' && v > 0 && !out.some((p) => p.path === path)) {
      const cap = CAPACITOR_PATHS.has(path);
      out.push({ path, label, kind: cap ? 'capacitor' : 'resistor', nominal: v, unit: cap ? 'F' : 'Ω' });
    }
  }
  return out;
}

function ToolPanel({ tool, target, stage, parts, canRun, fileBase }: { tool: Tool; target: { stageId?: number; projectId?: number }; stage: StageDTO | null; parts: PartRow[]; canRun: boolean; fileBase: string }) {
  const runs = useRuns(target, tool);
  const [selected, setSelected] = useState<number | null>(null);
  useEffect(() => {
    if (selected === null && runs.data?.[0]) setSelected(runs.data[0].id);
  }, [runs.data, selected]);
  const create = useCreateRun((run) => setSelected(run.id));
  const run = useRun(selected);
  const apiError = create.error instanceof ApiRequestError ? create.error : null;
  const r = run.data;
  const result = r?.status === 'completed' ? r.result : null;

  return (
    <div className="space-y-5">
      {canRun ? (
        tool === 'tolerance' ? (
          <ToleranceForm target={target} parts={parts} onSubmit={(b) => create.mutate(b)} pending={create.isPending} error={create.error?.message ?? null} fieldErrors={apiError?.fieldErrors} />
        ) : tool === 'swap' ? (
          <div className="space-y-2">
            <p className="text-sm text-muted">Every library type with a model of the same family, heater voltage and number of sections, analysed in this stage&apos;s place, with the parts it would need changed.</p>
            <Button type="button" disabled={create.isPending} onClick={() => create.mutate({ kind: 'swap', target: { stageId: target.stageId } })}>{create.isPending ? 'Queueing…' : 'Compare tubes'}</Button>
            {create.error ? <p role="alert" className="text-sm text-over">{create.error.message}</p> : null}
          </div>
        ) : (
          <SearchForm target={{ stageId: target.stageId! }} parts={parts} onSubmit={(b) => create.mutate(b)} pending={create.isPending} error={create.error?.message ?? null} fieldErrors={apiError?.fieldErrors} />
        )
      ) : (
        <p className="text-sm text-muted">Designers start runs; here are the runs made so far.</p>
      )}
      {runs.data && runs.data.length > 0 ? (
        <label className="flex flex-wrap items-center gap-2 text-xs text-muted">
          Run
          <select className="h-8 rounded-md border border-rule bg-sheet px-2 text-sm text-ink" value={selected ?? ''} onChange={(e) => setSelected(Number(e.target.value))}>
            {runs.data.map((x) => (
              <option key={x.id} value={x.id}>
                #{x.id} · {new Date(x.createdAt).toLocaleString()} · {x.status} · version {x.designVersion}
              </option>
            ))}
          </select>
        </label>
      ) : runs.isSuccess ? <p className="text-sm text-muted">No {TOOL_NAMES[tool].toLowerCase()} yet.</p> : null}
      {r ? <RunStatus run={r} canRun={canRun} /> : null}
      {result && tool === 'tolerance' ? <ToleranceResults summary={(result as { summary: ToleranceSummary }).summary} fileBase={`${fileBase}-run-${r!.id}`} /> : null}
      {result && tool === 'swap' && stage ? <SwapResults rows={(result as { rows: SwapRow[] }).rows} stage={stage} canEdit={canRun} /> : null}
      {result && tool === 'search' && stage ? <SearchResults result={(result as { search: SearchResult }).search} stage={stage} canEdit={canRun} /> : null}
    </div>
  );
}

/** The Explore area of a stage (three tools) or of a project's chain (tolerance run of the whole chain). */
export function ExploreArea({ projectId, projectName, stage, canRun }: { projectId: number; projectName: string; stage: StageDTO | null; canRun: boolean }) {
  const tools: Tool[] = stage ? ['tolerance', 'swap', 'search'] : ['tolerance'];
  const [tool, setTool] = useState<Tool>('tolerance');
  const parts = useMemo(() => (stage ? partsOf(stage.inputs as unknown as Record<string, unknown>) : []), [stage]);
  const target = stage ? { stageId: stage.id } : { projectId };
  const fileBase = stage ? `stage-${stage.id}` : `project-${projectId}-chain`;
  return (
    <div className="space-y-4" data-testid="explore-area">
      <div>
        <nav aria-label="Breadcrumb" className="text-xs text-muted">
          <Link href="/projects" className="hover:text-ink hover:underline">Projects</Link>
          <span aria-hidden> / </span>
          <Link href={`/projects/${projectId}`} className="hover:text-ink hover:underline">{projectName}</Link>
          {stage ? (
            <>
              <span aria-hidden> / </span>
              <Link href={`/projects/${projectId}/stages/${stage.id}`} className="hover:text-ink hover:underline">{stage.name}</Link>
            </>
          ) : null}
        </nav>
        <h1 className="mt-0.5 text-xl font-semibold tracking-tight">Explore{stage ? `: ${stage.name}` : ': signal chain'}</h1>
        <p className="text-sm text-muted">
          {stage ? <>Stage version <span className="num">{stage.version}</span> · {stage.tubeDesignation}</> : 'Every stage and the supply ladder together; tube swaps and part searches are made per stage.'}
        </p>
      </div>
      <Caution />
      <Card>
        <CardHeader title={TOOL_NAMES[tool]} actions={tools.length > 1 ? <Segmented idBase="explore-tool" label="Explore tool" value={tool} onChange={setTool} options={tools.map((t) => ({ value: t, label: TOOL_NAMES[t] }))} /> : null} />
        <CardBody {...(tools.length > 1 ? tabPanelProps('explore-tool', tool) : {})}>
          <ToolPanel key={tool} tool={tool} target={target} stage={stage} parts={parts} canRun={canRun} fileBase={fileBase} />
        </CardBody>
      </Card>
    </div>
  );
}
