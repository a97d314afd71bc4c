// GET /api/tubes/{id} – a type with ratings, models, curve sets and attachments; PATCH edits or retires it
import { NextResponse } from 'next/server';
import { parseBody, parseParams, withUser } from '@/lib/api/with-user';
import { getTube, updateTube } from '@/lib/tubes/service';
import { tubeIdParamSchema, updateTubeSchema } from '@/lib/validation/tube';

export const GET = withUser('tubes:read', async (_req, { params }) => {
  const { id } = parseParams(params, tubeIdParamSchema);
  return NextResponse.json({ tube: await getTube(id) });
});

export const PATCH = withUser('tubes:write', async (req, { user, params }) => {
  const { id } = parseParams(params, tubeIdParamSchema);
  const patch = await parseBody(req, updateTubeSchema);
  return NextResponse.json({ tube: await updateTube(user, id, patch) });
});
