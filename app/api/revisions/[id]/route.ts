// GET /api/revisions/{id} – a frozen revision with its diff since the last approved revision
// DELETE /api/revisions/{id} – withdraw a revision nobody has decided on yet (approved ones are permanent)
import { NextResponse } from 'next/server';
import { parseParams, withUser } from '@/lib/api/with-user';
import { decisionBlocker, getRevision, withdrawRevision } from '@/lib/review/service';
import { idParamSchema } from '@/lib/validation/auth';

export const GET = withUser('reviews:read', async (_req, { user, params }) => {
  const { id } = parseParams(params, idParamSchema);
  const revision = await getRevision(id);
  const blocker = decisionBlocker(user, revision);
  return NextResponse.json({ revision, canDecide: blocker === null, cannotDecideReason: blocker });
});

export const DELETE = withUser('revisions:submit', async (_req, { user, params }) => {
  const { id } = parseParams(params, idParamSchema);
  await withdrawRevision(user, id);
  return new Response(null, { status: 204 });
});
