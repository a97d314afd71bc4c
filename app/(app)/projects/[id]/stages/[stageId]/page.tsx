import type { Metadata } from 'next';
import { notFound } from 'next/navigation';
import { StageEditor } from '@/components/stage-editor/stage-editor';
import { can } from '@/lib/auth/policy';
import { requirePageUser } from '@/lib/auth/session';
import { listTubeOptions } from '@/lib/db/tubes';

export const metadata: Metadata = { title: 'Stage editor' };

const positiveInt = (s: string) => (/^[1-9]\d{0,9}$/.test(s) ? Number(s) : null);

export default async function StagePage({ params }: { params: Promise<{ id: string; stageId: string }> }) {
  const user = await requirePageUser('projects:read');
  const { id, stageId } = await params;
  const projectId = positiveInt(id);
  const stage = positiveInt(stageId);
  if (projectId === null || stage === null) notFound();
  const tubes = await listTubeOptions();
  return <StageEditor projectId={projectId} stageId={stage} tubes={tubes} canEdit={can(user.role, 'projects:write')} />;
}
