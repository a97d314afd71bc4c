import type { Metadata } from 'next';
import { notFound } from 'next/navigation';
import { StageEditor } from '@/components/stage-editor/stage-editor';
import { requirePageUser } from '@/lib/auth/session';
import { listTubeOptions } from '@/lib/db/tubes';

export const metadata: Metadata = { title: 'New stage' };

export default async function NewStagePage({ params }: { params: Promise<{ id: string }> }) {
  await requirePageUser('projects:write');
  const { id } = await params;
  if (!/^[1-9]\d{0,9}$/.test(id)) notFound();
  const tubes = await listTubeOptions();
  return <StageEditor projectId={Number(id)} tubes={tubes} canEdit />;
}
