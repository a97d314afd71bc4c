// POST /api/explore/runs – queue a tolerance run, tube swap or part search; GET – runs of a stage or a project's chain
import { NextResponse } from 'next/server';
import { parseBody, parseQuery, withUser } from '@/lib/api/with-user';
import { createRun, listRuns } from '@/lib/explore/service';
import { createExploreRunSchema, exploreRunListQuerySchema } from '@/lib/validation/explore';

export const POST = withUser('explore:run', async (req, { user }) => {
  const body = await parseBody(req, createExploreRunSchema);
  return NextResponse.json({ run: await createRun(user.id, body) }, { status: 201 });
});

export const GET = withUser('explore:read', async (req) => {
  const q = parseQuery(req, exploreRunListQuerySchema);
  return NextResponse.json({ runs: await listRuns(q) });
});
