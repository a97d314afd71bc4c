// GET /api/projects/{id}/revisions – the project's revisions, newest first
// POST /api/projects/{id}/revisions – submit the project for review: freezes a hash-stamped revision
import { NextResponse } from 'next/server';
import { parseOptionalBody, parseParams, withUser } from '@/lib/api/with-user';
import { assertProjectExists } from '@/lib/bench/service';
import { listRevisions, submitRevision } from '@/lib/review/service';
import { idParamSchema } from '@/lib/validation/auth';
import { submitRevisionSchema } from '@/lib/validation/review';

export const GET = withUser('reviews:read', async (_req, { params }) => {
  const { id } = parseParams(params, idParamSchema);
  await assertProjectExists(id);
  return NextResponse.json({ revisions: await listRevisions({ projectId: id }) });
});

export const POST = withUser('revisions:submit', async (req, { user, params }) => {
  const { id } = parseParams(params, idParamSchema);
  const body = await parseOptionalBody(req, submitRevisionSchema);
  return NextResponse.json({ revision: await submitRevision(user, id, body) }, { status: 201 });
});
