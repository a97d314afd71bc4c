// POST /api/tubes/{id}/curve-sets – upload a measured curve set (multipart: file, currentUnit mA|A, name?, notes?); GET lists them
import { NextResponse } from 'next/server';
import { parseParams, withUser } from '@/lib/api/with-user';
import { readUpload, uploadCurveSet } from '@/lib/curves/service';
import { getTube } from '@/lib/tubes/service';
import { tubeIdParamSchema } from '@/lib/validation/tube';

export const GET = withUser('tubes:read', async (_req, { params }) => {
  const { id } = parseParams(params, tubeIdParamSchema);
  return NextResponse.json({ curveSets: (await getTube(id)).curveSets });
});

export const POST = withUser('tubes:write', async (req, { user, params }) => {
  const { id } = parseParams(params, tubeIdParamSchema);
  const { file, fields } = await readUpload(req);
  const curveSet = await uploadCurveSet(user, id, file, fields);
  return NextResponse.json({ curveSet, id: curveSet.id, pointCount: curveSet.pointCount }, { status: 201 });
});
