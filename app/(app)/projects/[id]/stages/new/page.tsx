import type { Metadata } from 'next';
import { notFound } from 'next/navigation';
import { pageId } from '@/lib/validation/ids';
import { StageEditor } from '@/components/stage-editor/stage-editor';
import { ApiError } from '@/lib/api/errors';
import { requirePageUser } from '@/lib/auth/session';
import { getProject } from '@/lib/projects/service';
import { listTubeOptions } from '@/lib/tubes/service';

export const metadata: Metadata = { title: 'New stage' };

export default async function NewStagePage({ params }: { params: Promise<{ id: string }> }) {
  await requirePageUser('projects:write');
  const { id } = await params;
  if (pageId(id) === null) notFound();
  const [project, tubes] = await Promise.all([getProject(Number(id)), listTubeOptions()]).catch((e: unknown) => {
    if (e instanceof ApiError && e.code === 'not_found') notFound();
    throw e;
  });
  return <StageEditor projectId={project.id} tubes={tubes} canEdit initialProject={project} />;
}
