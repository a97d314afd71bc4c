// GET /api/stages/{id}/bench-checks – the stage's expected values for the bench and its check history
// POST /api/stages/{id}/bench-checks – record bench readings; answers the verdict and each quantity's comparison
import { NextResponse } from 'next/server';
import { parseBody, parseParams, parseQuery, withUser } from '@/lib/api/with-user';
import { benchContext, listBenchChecks, recordBenchCheck } from '@/lib/bench/service';
import { idParamSchema } from '@/lib/validation/auth';
import { benchCheckSchema, benchListQuerySchema } from '@/lib/validation/bench';

export const GET = withUser('projects:read', async (req, { params }) => {
  const { id } = parseParams(params, idParamSchema);
  const query = parseQuery(req, benchListQuerySchema);
  const context = await benchContext(id);
  return NextResponse.json({ context, checks: await listBenchChecks({ ...query, stageId: id }) });
});

export const POST = withUser('bench:write', async (req, { user, params }) => {
  const { id } = parseParams(params, idParamSchema);
  const body = await parseBody(req, benchCheckSchema);
  return NextResponse.json({ benchCheck: await recordBenchCheck(user, id, body) }, { status: 201 });
});
