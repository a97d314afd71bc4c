// GET /api/curve-sets/{id} – a curve set with its measured points and the latest fit's curves
import { NextResponse } from 'next/server';
import { parseParams, withUser } from '@/lib/api/with-user';
import { getCurveSetDetail } from '@/lib/curves/service';
import { tubeIdParamSchema } from '@/lib/validation/tube';

export const GET = withUser('tubes:read', async (_req, { params }) => {
  const { id } = parseParams(params, tubeIdParamSchema);
  return NextResponse.json(await getCurveSetDetail(id));
});
