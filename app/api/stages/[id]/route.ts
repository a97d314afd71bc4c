// GET /api/stages/{id} – one stage; PATCH – edit with the version last read (stale → 409 with the current stage); DELETE ?version=N
import { NextResponse } from 'next/server';
import { parseBody, parseParams, parseQuery, withUser } from '@/lib/api/with-user';
import { deleteStage, getStage, updateStage } from '@/lib/stages/service';
import { idParamSchema } from '@/lib/validation/auth';
import { deleteStageQuerySchema, updateStageSchema } from '@/lib/validation/project';

export const GET = withUser('projects:read', async (_req, { params }) => {
  const { id } = parseParams(params, idParamSchema);
  return NextResponse.json({ stage: await getStage(id) });
});

export const PATCH = withUser('projects:write', async (req, { user, params }) => {
  const { id } = parseParams(params, idParamSchema);
  const patch = await parseBody(req, updateStageSchema);
  return NextResponse.json({ stage: await updateStage(user.id, id, patch) });
});

export const DELETE = withUser('projects:write', async (req, { user, params }) => {
  const { id } = parseParams(params, idParamSchema);
  const { version } = parseQuery(req, deleteStageQuerySchema);
  await deleteStage(user.id, id, version);
  return new NextResponse(null, { status: 204 });
});
