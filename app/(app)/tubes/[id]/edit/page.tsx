import type { Metadata } from 'next';
import { notFound, redirect } from 'next/navigation';
import { TubeForm } from '@/components/tubes/tube-form';
import { PageHeader } from '@/components/ui/card';
import { ApiError } from '@/lib/api/errors';
import { can } from '@/lib/auth/policy';
import { requirePageUser } from '@/lib/auth/session';
import { getTube, type TubeDetail } from '@/lib/db/tubes';

export const metadata: Metadata = { title: 'Edit tube type' };

export default async function EditTubePage({ params }: { params: Promise<{ id: string }> }) {
  const user = await requirePageUser('tubes:write');
  const id = Number((await params).id);
  if (!Number.isInteger(id) || id <= 0) notFound();
  let tube: TubeDetail;
  try {
    tube = await getTube(id);
  } catch (err) {
    if (err instanceof ApiError && err.code === 'not_found') notFound();
    throw err;
  }
  // Published entries are the admins' to change; the API says so too (403).
  if (tube.published && !can(user.role, 'tubes:edit-published')) redirect(`/tubes/${id}`);
  return (
    <>
      <PageHeader title={`Edit ${tube.designation}`} subtitle="Every change is written to the audit log." />
      <TubeForm tube={tube} />
    </>
  );
}
