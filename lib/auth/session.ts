import 'server-only';
import { getToken } from 'next-auth/jwt';
import type { NextRequest } from 'next/server';
import { env } from '@/lib/env';
import { cookies, headers } from 'next/headers';
import { redirect } from 'next/navigation';
import type { Role } from '@/models';
import '@/lib/db';
import { can, type Permission } from './policy';
import { sessionUser } from './sessions';

export type CurrentUser = { id: number; email: string; displayName: string; role: Role };

// The token only says who signed in and which session (`sid`, a row of user_sessions) it belongs to; the session's
// state, the role and the active flag are read from the database on every request, so a sign-out, a deactivation
// or a role change takes effect at the user's next request.
async function activeUser(token: { uid?: unknown; sid?: unknown } | null): Promise<CurrentUser | null> {
  if (typeof token?.uid !== 'number' || typeof token.sid !== 'string') return null;
  const user = await sessionUser(token.uid, token.sid);
  return user ? { id: user.id, email: user.email, displayName: user.display_name, role: user.role as Role } : null;
}

export async function getCurrentUser(): Promise<CurrentUser | null> {
  const token = await getToken({ req: { headers: Object.fromEntries((await headers()).entries()), cookies: await cookies() } as never, secret: env.NEXTAUTH_SECRET });
  return activeUser(token);
}

// Route handlers read the session token from the request itself (no request-scoped globals needed).
export async function getRequestUser(req: NextRequest): Promise<CurrentUser | null> {
  return activeUser(await getToken({ req, secret: env.NEXTAUTH_SECRET }));
}

export async function requirePageUser(permission: Permission = 'app:use'): Promise<CurrentUser> {
  const user = await getCurrentUser();
  if (!user) redirect('/sign-in');
  if (!can(user.role, permission)) redirect('/forbidden');
  return user;
}
