// POST /api/curve-sets/{id}/accept – accept a proposed fit (latest when no fitId) as a new model of the type
import { NextResponse } from 'next/server';
import { parseBody, parseParams, withUser } from '@/lib/api/with-user';
import { acceptFit } from '@/lib/curves/service';
import { acceptFitBodySchema, tubeIdParamSchema } from '@/lib/validation/tube';

export const POST = withUser('tubes:write', async (req, { user, params }) => {
  const { id } = parseParams(params, tubeIdParamSchema);
  const body = await parseBody(req, acceptFitBodySchema);
  return NextResponse.json(await acceptFit(user, id, body), { status: 201 });
});
