import type { Metadata } from 'next';
import { CompareView } from '@/components/tubes/compare-view';
import { PageHeader } from '@/components/ui/card';
import { requirePageUser } from '@/lib/auth/session';
import { listTubeOptions } from '@/lib/tubes/service';

export const metadata: Metadata = { title: 'Compare tube types' };

export default async function ComparePage({ searchParams }: { searchParams: Promise<{ ids?: string | string[] }> }) {
  await requirePageUser('tubes:read');
  const options = (await listTubeOptions()).filter((o) => o.models.length > 0);
  // ?ids=1,2 or ?ids=1&ids=2 (a repeated parameter arrives as an array)
  const raw = (await searchParams).ids ?? '';
  const wanted = (Array.isArray(raw) ? raw.join(',') : raw)
    .split(',')
    .map(Number)
    .filter((id) => options.some((o) => o.id === id))
    .slice(0, 3);
  return (
    <>
      <PageHeader title="Compare tube types" subtitle="Two or three types on one chart, each drawn from its default model." />
      <CompareView options={options} initialIds={wanted} />
    </>
  );
}
