import type { Metadata } from 'next';
import { TubeForm } from '@/components/tubes/tube-form';
import { PageHeader } from '@/components/ui/card';
import { requirePageUser } from '@/lib/auth/session';

export const metadata: Metadata = { title: 'Add a tube type' };

export default async function NewTubePage() {
  await requirePageUser('tubes:write');
  return (
    <>
      <PageHeader title="Add a tube type" subtitle="Ratings with their sources now; models come from a measured curve set (fit) or by hand on the type's page." />
      <TubeForm />
    </>
  );
}
