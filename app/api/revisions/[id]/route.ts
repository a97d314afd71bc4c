// GET /api/revisions/{id}?compare=N – a frozen revision with its diff against an earlier revision (the previous one by default)
// DELETE /api/revisions/{id} – withdraw a revision nobody has decided on yet (approved ones are permanent)
import { NextResponse } from 'next/server';
import { parseParams, parseQuery, withUser } from '@/lib/api/with-user';
import { decisionBlocker, getRevision, withdrawRevision } from '@/lib/review/service';
import { idParamSchema } from '@/lib/validation/auth';
import { revisionViewQuerySchema } from '@/lib/validation/review';

export const GET = withUser('reviews:read', async (req, { user, params }) => {
  const { id } = parseParams(params, idParamSchema);
  const { compare } = parseQuery(req, revisionViewQuerySchema);
  const revision = await getRevision(id, { compareWith: compare });
  const blocker = decisionBlocker(user, revision);
  return NextResponse.json({ revision, canDecide: blocker === null, cannotDecideReason: blocker });
});

export const DELETE = withUser('revisions:submit', async (_req, { user, params }) => {
  const { id } = parseParams(params, idParamSchema);
  await withdrawRevision(user, id);
  return new Response(null, { status: 204 });
});
