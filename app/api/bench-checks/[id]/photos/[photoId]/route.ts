// GET /api/bench-checks/{id}/photos/{photoId} – the photo itself, from object storage
import { parseParams, withUser } from '@/lib/api/with-user';
import { benchPhotoFile } from '@/lib/bench/service';
import { photoParamSchema } from '@/lib/validation/bench';

export const GET = withUser('projects:read', async (_req, { params }) => {
  const { id, photoId } = parseParams(params, photoParamSchema);
  const file = await benchPhotoFile(id, photoId);
  return new Response(new Uint8Array(file.body), {
    headers: {
      'content-type': file.contentType,
      'content-disposition': `inline; filename="${file.fileName.replace(/[^A-Za-z0-9._-]+/g, '_')}"`,
      'cache-control': 'private, max-age=3600',
      'x-content-type-options': 'nosniff',
    },
  });
});
