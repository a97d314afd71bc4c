import type { Metadata } from 'next';
import { ProjectsList } from '@/components/projects/projects-list';
import { PageHeader } from '@/components/ui/card';
import { can } from '@/lib/auth/policy';
import { requirePageUser } from '@/lib/auth/session';
import { listProjects } from '@/lib/projects/service';

export const metadata: Metadata = { title: 'Projects' };

export default async function ProjectsPage() {
  const user = await requirePageUser('projects:read');
  const projects = await listProjects({ archived: 'all' });
  return (
    <>
      <PageHeader title="Projects" subtitle="The team’s designs: each a signal chain of stages and the supply that feeds them." />
      <ProjectsList initialProjects={projects} canWrite={can(user.role, 'projects:write')} />
    </>
  );
}
