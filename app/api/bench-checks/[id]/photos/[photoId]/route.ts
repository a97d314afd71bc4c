// GET /api/bench-checks/{id}/photos/{photoId} – the photo itself, from object storage
import { contentDisposition } from '@/lib/api/content-disposition';
import { parseParams, withUser } from '@/lib/api/with-user';
import { benchPhotoFile } from '@/lib/bench/service';
import { photoParamSchema } from '@/lib/validation/bench';

export const GET = withUser('projects:read', async (_req, { params }) => {
  const { id, photoId } = parseParams(params, photoParamSchema);
  const file = await benchPhotoFile(id, photoId);
  return new Response(new Uint8Array(file.body), {
    headers: {
      'content-type': file.contentType,
      'content-disposition': contentDisposition('inline', file.fileName),
      'cache-control': 'private, max-age=3600',
      'x-content-type-options': 'nosniff',
    },
  });
});
