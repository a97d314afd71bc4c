// POST /api/tubes/{id}/attachments – attach a datasheet PDF (multipart: file, kind?)
import { NextResponse } from 'next/server';
import { parseParams, withUser } from '@/lib/api/with-user';
import { attachDatasheet } from '@/lib/tubes/attachments';
import { readUpload } from '@/lib/curves/service';
import { MAX_ATTACHMENT_BYTES, tubeIdParamSchema } from '@/lib/validation/tube';

export const POST = withUser('tubes:write', async (req, { user, params }) => {
  const { id } = parseParams(params, tubeIdParamSchema);
  const { file, fields } = await readUpload(req, MAX_ATTACHMENT_BYTES);
  return NextResponse.json({ attachment: await attachDatasheet(user, id, file, fields) }, { status: 201 });
});
