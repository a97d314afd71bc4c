// POST /api/curve-sets/{id}/discard – discard a proposed fit (latest when no fitId)
import { NextResponse } from 'next/server';
import { parseBody, parseParams, withUser } from '@/lib/api/with-user';
import { discardFit } from '@/lib/curves/service';
import { discardFitBodySchema, tubeIdParamSchema } from '@/lib/validation/tube';

export const POST = withUser('tubes:write', async (req, { user, params }) => {
  const { id } = parseParams(params, tubeIdParamSchema);
  const body = await parseBody(req, discardFitBodySchema);
  return NextResponse.json(await discardFit(user, id, body));
});
