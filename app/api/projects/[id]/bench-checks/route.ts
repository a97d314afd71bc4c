// GET /api/projects/{id}/bench-checks – the project's bench checks, newest first (?failing=1, ?verdict=, ?stageId=)
import { NextResponse } from 'next/server';
import { parseParams, parseQuery, withUser } from '@/lib/api/with-user';
import { assertProjectExists, listBenchChecks } from '@/lib/bench/service';
import { idParamSchema } from '@/lib/validation/auth';
import { benchListQuerySchema } from '@/lib/validation/bench';

export const GET = withUser('projects:read', async (req, { params }) => {
  const { id } = parseParams(params, idParamSchema);
  const query = parseQuery(req, benchListQuerySchema);
  await assertProjectExists(id);
  return NextResponse.json({ checks: await listBenchChecks({ ...query, projectId: id }) });
});
