// GET /api/admin/users – every account with role and status
import { NextResponse } from 'next/server';
import { withUser } from '@/lib/api/with-user';
import { listUsers } from '@/lib/users/service';

export const GET = withUser('users:manage', async () => NextResponse.json({ users: await listUsers() }));
