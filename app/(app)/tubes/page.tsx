import type { Metadata } from 'next';
import Link from 'next/link';
import { TubeLibrary } from '@/components/tubes/tube-library';
import { buttonVariants } from '@/components/ui/button';
import { PageHeader } from '@/components/ui/card';
import { can } from '@/lib/auth/policy';
import { requirePageUser } from '@/lib/auth/session';
import { listTubes } from '@/lib/tubes/service';

export const metadata: Metadata = { title: 'Tube library' };

export default async function TubesPage() {
  const user = await requirePageUser('tubes:read');
  const canWrite = can(user.role, 'tubes:write');
  // retired types come along for the "show retired" switch; the list hides them by default
  const { tubes } = await listTubes({ pageSize: 200, includeRetired: true });
  return (
    <>
      <PageHeader
        title="Tube library"
        subtitle="The team's tube types with their maximum ratings, models and measured curves. Every value says where it comes from."
        actions={
          <>
            <Link href="/tubes/compare" className={buttonVariants({ variant: 'secondary' })}>Compare types</Link>
            {canWrite ? <Link href="/tubes/new" className={buttonVariants()}>Add a type</Link> : null}
          </>
        }
      />
      <TubeLibrary tubes={tubes} />
    </>
  );
}
