import type { Metadata } from 'next';
import { notFound } from 'next/navigation';
import { TubeDetailView } from '@/components/tubes/tube-detail';
import { ApiError } from '@/lib/api/errors';
import { can } from '@/lib/auth/policy';
import { requirePageUser } from '@/lib/auth/session';
import { getTube, tubePlot, type TubeDetail, type TubePlot } from '@/lib/db/tubes';

export const metadata: Metadata = { title: 'Tube type' };

export default async function TubePage({ params }: { params: Promise<{ id: string }> }) {
  const user = await requirePageUser('tubes:read');
  const id = Number((await params).id);
  if (!Number.isInteger(id) || id <= 0) notFound();
  let tube: TubeDetail;
  try {
    tube = await getTube(id);
  } catch (err) {
    if (err instanceof ApiError && err.code === 'not_found') notFound();
    throw err;
  }
  let plot: TubePlot | null = null;
  if (tube.defaultModel) plot = await tubePlot(id).catch(() => null);
  return (
    <TubeDetailView
      initialTube={tube}
      initialPlot={plot}
      canWrite={can(user.role, 'tubes:write')}
      canEditPublished={can(user.role, 'tubes:edit-published')}
    />
  );
}
