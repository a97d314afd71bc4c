import type { Metadata } from 'next';
import { notFound } from 'next/navigation';
import { ProjectView } from '@/components/projects/project-view';
import { ApiError } from '@/lib/api/errors';
import { can } from '@/lib/auth/policy';
import { requirePageUser } from '@/lib/auth/session';
import { pageId } from '@/lib/validation/ids';
import { getProject, listWatcherOptions, type ProjectDetail } from '@/lib/projects/service';

export const metadata: Metadata = { title: 'Project' };

export default async function ProjectPage({ params }: { params: Promise<{ id: string }> }) {
  const user = await requirePageUser('projects:read');
  const id = pageId((await params).id);
  if (id === null) notFound();
  let project: ProjectDetail;
  try {
    project = await getProject(id);
  } catch (err) {
    if (err instanceof ApiError && err.code === 'not_found') notFound();
    throw err;
  }
  const canWrite = can(user.role, 'projects:write');
  return <ProjectView initialProject={project} canWrite={canWrite} watcherOptions={canWrite ? await listWatcherOptions() : []} />;
}
