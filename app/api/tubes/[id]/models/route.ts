// POST /api/tubes/{id}/models – add a model entered by hand (Koren triode or pentode parameters with their source)
import { NextResponse } from 'next/server';
import { parseBody, parseParams, withUser } from '@/lib/api/with-user';
import { addModel } from '@/lib/tubes/service';
import { modelInputSchema, tubeIdParamSchema } from '@/lib/validation/tube';

export const POST = withUser('tubes:write', async (req, { user, params }) => {
  const { id } = parseParams(params, tubeIdParamSchema);
  const input = await parseBody(req, modelInputSchema);
  return NextResponse.json({ model: await addModel(user, id, input) }, { status: 201 });
});
