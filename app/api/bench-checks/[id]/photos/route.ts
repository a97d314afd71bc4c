// POST /api/bench-checks/{id}/photos – attach a photo of the build (multipart field `file`; JPEG, PNG or WebP)
import { NextResponse } from 'next/server';
import { ApiError } from '@/lib/api/errors';
import { parseParams, readFormCapped, withUser } from '@/lib/api/with-user';
import { addBenchPhoto } from '@/lib/bench/service';
import { idParamSchema } from '@/lib/validation/auth';
import { MAX_PHOTO_BYTES } from '@/lib/validation/bench';
import { isSafeText, UNSAFE_TEXT_MESSAGE } from '@/lib/validation/text';

export const POST = withUser('bench:write', async (req, { user, params }) => {
  const { id } = parseParams(params, idParamSchema);
  const form = await readFormCapped(req, MAX_PHOTO_BYTES, 'The photo', 'Send the photo as multipart form data in the field "file".');
  const file = form.get('file');
  if (!(file instanceof File)) throw new ApiError('unprocessable_entity', 'Choose a photo to upload.', { fieldErrors: { file: ['Choose a photo to upload.'] } });
  if (!isSafeText(file.name)) throw new ApiError('unprocessable_entity', `The file name: ${UNSAFE_TEXT_MESSAGE}`, { fieldErrors: { file: [UNSAFE_TEXT_MESSAGE] } });
  return NextResponse.json({ photo: await addBenchPhoto(user, id, file) }, { status: 201 });
});
