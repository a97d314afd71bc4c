// GET /api/me – the signed-in user
import { NextResponse } from 'next/server';
import { withUser } from '@/lib/api/with-user';

export const GET = withUser('app:use', async (_req, { user }) => NextResponse.json({ user }));
