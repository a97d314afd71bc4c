import type { Metadata } from 'next';
import { notFound } from 'next/navigation';
import { ExploreArea } from '@/components/explore/explore-area';
import { ApiError } from '@/lib/api/errors';
import { can } from '@/lib/auth/policy';
import { requirePageUser } from '@/lib/auth/session';
import { getProject } from '@/lib/projects/service';
import { pageId } from '@/lib/validation/ids';

export const metadata: Metadata = { title: 'Explore signal chain' };

export default async function ChainExplorePage({ params }: { params: Promise<{ id: string }> }) {
  const user = await requirePageUser('explore:read');
  const { id } = await params;
  const projectId = pageId(id);
  if (projectId === null) notFound();
  const project = await getProject(projectId).catch((e: unknown) => {
    if (e instanceof ApiError && e.code === 'not_found') notFound();
    throw e;
  });
  return <ExploreArea projectId={project.id} projectName={project.name} stage={null} canRun={can(user.role, 'explore:run')} />;
}
