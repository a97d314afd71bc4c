// POST /api/curve-sets/{id}/fit – fit Koren parameters (Levenberg–Marquardt) and store the result as a proposed fit
import { NextResponse } from 'next/server';
import { parseBody, parseParams, withUser } from '@/lib/api/with-user';
import { runFit } from '@/lib/curves/service';
import { fitRequestSchema } from '@/lib/validation/curve-set';
import { tubeIdParamSchema } from '@/lib/validation/tube';

export const POST = withUser('tubes:write', async (req, { user, params }) => {
  const { id } = parseParams(params, tubeIdParamSchema);
  const { model } = await parseBody(req, fitRequestSchema);
  return NextResponse.json(await runFit(user, id, model));
});
