import type { Metadata } from 'next';
import { notFound } from 'next/navigation';
import { ExploreArea } from '@/components/explore/explore-area';
import { ApiError } from '@/lib/api/errors';
import { can } from '@/lib/auth/policy';
import { requirePageUser } from '@/lib/auth/session';
import { getProject } from '@/lib/projects/service';
import { getStage } from '@/lib/stages/service';
import { pageId } from '@/lib/validation/ids';

export const metadata: Metadata = { title: 'Explore stage' };

export default async function StageExplorePage({ params }: { params: Promise<{ id: string; stageId: string }> }) {
  const user = await requirePageUser('explore:read');
  const { id, stageId } = await params;
  const projectId = pageId(id);
  const stageNo = pageId(stageId);
  if (projectId === null || stageNo === null) notFound();
  const [project, stage] = await Promise.all([getProject(projectId), getStage(stageNo)]).catch((e: unknown) => {
    if (e instanceof ApiError && e.code === 'not_found') notFound();
    throw e;
  });
  if (stage.projectId !== project.id) notFound();
  return <ExploreArea projectId={project.id} projectName={project.name} stage={stage} canRun={can(user.role, 'explore:run')} />;
}
