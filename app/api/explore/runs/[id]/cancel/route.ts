// POST /api/explore/runs/{id}/cancel – cancel a queued or running run (a running one stops within about a second)
import { NextResponse } from 'next/server';
import { parseParams, withUser } from '@/lib/api/with-user';
import { cancelRun } from '@/lib/explore/service';
import { exploreRunParamsSchema } from '@/lib/validation/explore';

export const POST = withUser('explore:run', async (_req, { user, params }) => {
  const { id } = parseParams(params, exploreRunParamsSchema);
  return NextResponse.json({ run: await cancelRun(user.id, id) });
});
