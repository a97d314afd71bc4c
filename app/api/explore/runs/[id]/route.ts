// GET /api/explore/runs/{id} – a run with its progress, and its result once completed
import { NextResponse } from 'next/server';
import { parseParams, withUser } from '@/lib/api/with-user';
import { getRun } from '@/lib/explore/service';
import { exploreRunParamsSchema } from '@/lib/validation/explore';

export const GET = withUser('explore:read', async (_req, { params }) => {
  const { id } = parseParams(params, exploreRunParamsSchema);
  return NextResponse.json({ run: await getRun(id) });
});
