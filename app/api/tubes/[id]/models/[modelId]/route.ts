// PATCH /api/tubes/{id}/models/{modelId} – rename a model, correct its source, or make it the type's default
import { NextResponse } from 'next/server';
import { parseBody, parseParams, withUser } from '@/lib/api/with-user';
import { updateModel } from '@/lib/tubes/service';
import { tubeModelParamSchema, updateModelSchema } from '@/lib/validation/tube';

export const PATCH = withUser('tubes:write', async (req, { user, params }) => {
  const { id, modelId } = parseParams(params, tubeModelParamSchema);
  const patch = await parseBody(req, updateModelSchema);
  return NextResponse.json({ model: await updateModel(user, id, modelId, patch) });
});
