'use client';

// React Query options and hooks for the stage editor: live analysis, the stage and its project, saving.
import { queryOptions, useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import type { StageAnalysis, Tube } from '@/lib/calc';
import type { StageBody } from '@/lib/validation/stage';
import { ApiRequestError, fetchJson } from './fetch-json';

// Types only: erased at build time, so the server-only data layer is not pulled into the browser.
import type { ProjectDetail, StageDTO } from '@/lib/projects/service';

export type { ProjectDetail, StageDTO };

export type AnalyzeBody = StageBody & { tubeModelId?: number };

export const stageKeys = {
  stage: (id: number) => ['stage', id] as const,
  project: (id: number) => ['project', id] as const,
  analyze: (body: AnalyzeBody | null) => ['analyze', body] as const,
};

export function stageQueryOptions(id: number) {
  return queryOptions({
    queryKey: stageKeys.stage(id),
    queryFn: ({ signal }) => fetchJson<{ stage: StageDTO }>(`/api/stages/${id}`, { signal }).then((r) => r.stage),
  });
}

export function projectQueryOptions(id: number) {
  return queryOptions({
    queryKey: stageKeys.project(id),
    queryFn: ({ signal }) => fetchJson<{ project: ProjectDetail }>(`/api/projects/${id}`, { signal }).then((r) => r.project),
  });
}

/** The server's analysis and the engine tube it used (so the browser's worker can take over the next edits). */
export type AnalyzeAnswer = { analysis: StageAnalysis; tube?: Tube };

export function analyzeQueryOptions(body: AnalyzeBody | null) {
  return queryOptions({
    queryKey: stageKeys.analyze(body),
    // the signal aborts the request when a newer edit replaces this key
    queryFn: ({ signal }) => fetchJson<AnalyzeAnswer>('/api/analyze', { method: 'POST', body, signal }),
    enabled: body !== null,
    staleTime: Infinity,
    gcTime: 60_000,
    retry: false,
  });
}

export type LiveAnalysisState = 'current' | 'updating' | 'invalid' | 'failed' | 'none';

export type SaveStageVars =
  | { kind: 'create'; projectId: number; body: AnalyzeBody & { name: string; supplyNode?: string | null } }
  | { kind: 'update'; stageId: number; version: number; name: string; supplyNode: string | null; tubeModelId: number | null; inputs: StageBody };

export function useSaveStage() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: async (vars: SaveStageVars): Promise<StageDTO> => {
      if (vars.kind === 'create') {
        const r = await fetchJson<{ stage: StageDTO }>(`/api/projects/${vars.projectId}/stages`, { method: 'POST', body: vars.body });
        return r.stage;
      }
      const r = await fetchJson<{ stage: StageDTO }>(`/api/stages/${vars.stageId}`, {
        method: 'PATCH',
        body: { version: vars.version, name: vars.name, supplyNode: vars.supplyNode, tubeModelId: vars.tubeModelId, inputs: vars.inputs },
      });
      return r.stage;
    },
    onSuccess: (stage) => {
      qc.setQueryData(stageKeys.stage(stage.id), stage);
      void qc.invalidateQueries({ queryKey: stageKeys.project(stage.projectId) });
    },
  });
}

/** The other person's stage from a 409 answer, when the server sent it. */
export function conflictCurrent(error: unknown): StageDTO | null {
  if (!(error instanceof ApiRequestError) || error.status !== 409) return null;
  const details = error.details as { current?: StageDTO } | undefined;
  return details?.current ?? null;
}
