'use client';

import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import type { ExploreRunDTO } from '@/lib/explore/service';
import { fetchJson } from '@/lib/hooks/fetch-json';
import type { CreateExploreRunInput } from '@/lib/validation/explore';

export type RunListItem = Omit<ExploreRunDTO, 'result'>;

const ACTIVE = new Set(['queued', 'running']);

/** One run, polled while it is queued or running. */
export function useRun(id: number | null) {
  return useQuery<ExploreRunDTO>({
    queryKey: ['explore-run', id],
    enabled: id !== null,
    queryFn: ({ signal }) => fetchJson<{ run: ExploreRunDTO }>(`/api/explore/runs/${id}`, { signal }).then((r) => r.run),
    refetchInterval: (q) => (q.state.data && !ACTIVE.has(q.state.data.status) ? false : 700),
    retry: false,
  });
}

export function useRuns(target: { stageId?: number; projectId?: number }, kind: string) {
  const qs = target.stageId !== undefined ? `stageId=${target.stageId}` : `projectId=${target.projectId}`;
  return useQuery<RunListItem[]>({
    queryKey: ['explore-runs', qs, kind],
    queryFn: ({ signal }) => fetchJson<{ runs: RunListItem[] }>(`/api/explore/runs?${qs}&kind=${kind}`, { signal }).then((r) => r.runs),
  });
}

export function useCreateRun(onCreated: (run: ExploreRunDTO) => void) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (body: CreateExploreRunInput) => fetchJson<{ run: ExploreRunDTO }>('/api/explore/runs', { method: 'POST', body }).then((r) => r.run),
    onSuccess: (run) => {
      void qc.invalidateQueries({ queryKey: ['explore-runs'] });
      onCreated(run);
    },
  });
}

export function useCancelRun() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (id: number) => fetchJson<{ run: ExploreRunDTO }>(`/api/explore/runs/${id}/cancel`, { method: 'POST' }).then((r) => r.run),
    onSuccess: (run) => {
      void qc.invalidateQueries({ queryKey: ['explore-run', run.id] });
      void qc.invalidateQueries({ queryKey: ['explore-runs'] });
    },
  });
}
