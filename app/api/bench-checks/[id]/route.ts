// GET /api/bench-checks/{id} – one bench check with its readings, comparisons, verdict and photos
import { NextResponse } from 'next/server';
import { parseParams, withUser } from '@/lib/api/with-user';
import { getBenchCheck } from '@/lib/bench/service';
import { idParamSchema } from '@/lib/validation/auth';

export const GET = withUser('projects:read', async (_req, { params }) => {
  const { id } = parseParams(params, idParamSchema);
  return NextResponse.json({ benchCheck: await getBenchCheck(id) });
});
