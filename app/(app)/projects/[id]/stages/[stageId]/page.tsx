import type { Metadata } from 'next';
import { notFound } from 'next/navigation';
import { pageId } from '@/lib/validation/ids';
import { StageEditor } from '@/components/stage-editor/stage-editor';
import { ApiError } from '@/lib/api/errors';
import { can } from '@/lib/auth/policy';
import { requirePageUser } from '@/lib/auth/session';
import { getProject } from '@/lib/projects/service';
import { getStage } from '@/lib/stages/service';
import { listTubeOptions } from '@/lib/tubes/service';

export const metadata: Metadata = { title: 'Stage editor' };

const positiveInt = pageId;

export default async function StagePage({ params }: { params: Promise<{ id: string; stageId: string }> }) {
  const user = await requirePageUser('projects:read');
  const { id, stageId } = await params;
  const projectId = positiveInt(id);
  const stageNo = positiveInt(stageId);
  if (projectId === null || stageNo === null) notFound();
  const [project, stage, tubes] = await Promise.all([getProject(projectId), getStage(stageNo), listTubeOptions()]).catch((e: unknown) => {
    if (e instanceof ApiError && e.code === 'not_found') notFound();
    throw e;
  });
  if (stage.projectId !== project.id) notFound();
  return <StageEditor projectId={project.id} stageId={stage.id} tubes={tubes} canEdit={can(user.role, 'projects:write')} initialProject={project} initialStage={stage} />;
}
