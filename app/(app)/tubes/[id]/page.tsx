import type { Metadata } from 'next';
import { TubeDetailView } from '@/components/tubes/tube-detail';
import { can } from '@/lib/auth/policy';
import { requirePageUser } from '@/lib/auth/session';
import { tubePlot, type TubePlot } from '@/lib/tubes/service';
import { loadTubeOr404 } from './_lib/load-tube';

export const metadata: Metadata = { title: 'Tube type' };

export default async function TubePage({ params }: { params: Promise<{ id: string }> }) {
  const user = await requirePageUser('tubes:read');
  const tube = await loadTubeOr404(params);
  const id = tube.id;
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
