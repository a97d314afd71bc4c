// GET /api/tubes/options – every non-retired type with its models, for tube selects
import { NextResponse } from 'next/server';
import { withUser } from '@/lib/api/with-user';
import { listTubeOptions } from '@/lib/tubes/service';

export const GET = withUser('tubes:read', async () => NextResponse.json({ tubes: await listTubeOptions() }));
