'use client';

import { setPath } from '@/lib/calc/explore/parts';
import { fetchJson } from '@/lib/hooks/fetch-json';
import type { StageDTO } from '@/lib/stages/service';

/** Saves a copy of the stage with other values (a tube swap or a searched candidate) as a new stage of the project. */
export async function openAsDraft(stage: Pick<StageDTO, 'projectId' | 'name' | 'inputs' | 'supplyNode' | 'tubeTypeId' | 'tubeModelId'>, name: string, patch: { tubeId?: number; parts?: Record<string, number> }): Promise<string> {
  let inputs: Record<string, unknown> = { ...(stage.inputs as unknown as Record<string, unknown>) };
  for (const [path, value] of Object.entries(patch.parts ?? {})) inputs = setPath(inputs, path, value);
  const tubeId = patch.tubeId ?? stage.tubeTypeId;
  const body = { ...inputs, tubeId, tubeModelId: tubeId === stage.tubeTypeId ? stage.tubeModelId : null, name: name.slice(0, 120), supplyNode: stage.supplyNode };
  const r = await fetchJson<{ stage: { id: number } }>(`/api/projects/${stage.projectId}/stages`, { method: 'POST', body });
  return `/projects/${stage.projectId}/stages/${r.stage.id}`;
}
