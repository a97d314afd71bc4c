import 'server-only';
import { getServerSession } from 'next-auth';
import { getToken } from 'next-auth/jwt';
import type { NextRequest } from 'next/server';
import { env } from '@/lib/env';
import { redirect } from 'next/navigation';
import { User, type Role } from '@/models';
import '@/lib/db';
import { authOptions } from './options';
import { can, type Permission } from './policy';

export type CurrentUser = { id: number; email: string; displayName: string; role: Role };

// The token only says who signed in; the role and the active flag are read from the database on every
// request, so a deactivation or a role change takes effect at the user's next request.
async function activeUser(id: number | undefined): Promise<CurrentUser | null> {
  if (!id) return null;
  const user = await User.findByPk(id);
  if (!user || !user.active) return null;
  return { id: user.id, email: user.email, displayName: user.displayName, role: user.role };
}

export async function getCurrentUser(): Promise<CurrentUser | null> {
  const session = await getServerSession(authOptions);
  return activeUser(session?.user?.id);
}

// Route handlers read the session token from the request itself (no request-scoped globals needed).
export async function getRequestUser(req: NextRequest): Promise<CurrentUser | null> {
  const token = await getToken({ req, secret: env.NEXTAUTH_SECRET });
  return activeUser(typeof token?.uid === 'number' ? token.uid : undefined);
}

export async function requirePageUser(permission: Permission = 'app:use'): Promise<CurrentUser> {
  const user = await getCurrentUser();
  if (!user) redirect('/sign-in');
  if (!can(user.role, permission)) redirect('/forbidden');
  return user;
}
