import type { Metadata } from 'next';
import { UsersAdmin } from '@/components/admin/users-admin';
import { PageHeader } from '@/components/ui/card';
import { requirePageUser } from '@/lib/auth/session';
import { listUsers } from '@/lib/users/service';

export const metadata: Metadata = { title: 'Users' };

export default async function UsersPage() {
  const me = await requirePageUser('users:manage');
  const users = await listUsers();
  return (
    <>
      <PageHeader title="Users" subtitle="Invite people, set their role, deactivate accounts that should no longer sign in." />
      <UsersAdmin initialUsers={users} meId={me.id} />
    </>
  );
}
