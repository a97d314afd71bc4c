// POST /api/revisions/{id}/decision – approve or request changes; mails the designer and the watchers the summary and PDF
import { NextResponse } from 'next/server';
import { parseBody, parseParams, withUser } from '@/lib/api/with-user';
import { decideRevision } from '@/lib/review/service';
import { idParamSchema } from '@/lib/validation/auth';
import { decisionSchema } from '@/lib/validation/review';

export const POST = withUser('revisions:decide', async (req, { user, params }) => {
  const { id } = parseParams(params, idParamSchema);
  const body = await parseBody(req, decisionSchema);
  return NextResponse.json({ revision: await decideRevision(user, id, body) }, { status: 201 });
});
