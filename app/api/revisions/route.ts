// GET /api/revisions – revisions waiting for a decision and past decisions (?state=, ?projectId=)
import { NextResponse } from 'next/server';
import { parseQuery, withUser } from '@/lib/api/with-user';
import { listRevisions } from '@/lib/review/service';
import { revisionListQuerySchema } from '@/lib/validation/review';

export const GET = withUser('reviews:read', async (req) => {
  const query = parseQuery(req, revisionListQuerySchema);
  return NextResponse.json({ revisions: await listRevisions(query) });
});
