import type { Metadata } from 'next';
import { redirect } from 'next/navigation';
import { TubeForm } from '@/components/tubes/tube-form';
import { PageHeader } from '@/components/ui/card';
import { can } from '@/lib/auth/policy';
import { requirePageUser } from '@/lib/auth/session';
import { loadTubeOr404 } from '../_lib/load-tube';

export const metadata: Metadata = { title: 'Edit tube type' };

export default async function EditTubePage({ params }: { params: Promise<{ id: string }> }) {
  const user = await requirePageUser('tubes:write');
  const tube = await loadTubeOr404(params);
  const id = tube.id;
  // Published entries are the admins' to change; the API says so too (403).
  if (tube.published && !can(user.role, 'tubes:edit-published')) redirect(`/tubes/${id}`);
  return (
    <>
      <PageHeader title={`Edit ${tube.designation}`} subtitle="Every change is written to the audit log." />
      <TubeForm tube={tube} />
    </>
  );
}
