// GET /api/attachments/{id} – download an attachment (datasheet PDF) from object storage
import { contentDisposition } from '@/lib/api/content-disposition';
import { parseParams, withUser } from '@/lib/api/with-user';
import { attachmentFile } from '@/lib/tubes/attachments';
import { tubeIdParamSchema } from '@/lib/validation/tube';

export const GET = withUser('tubes:read', async (_req, { params }) => {
  const { id } = parseParams(params, tubeIdParamSchema);
  const file = await attachmentFile(id);
  return new Response(new Uint8Array(file.body), {
    headers: {
      'content-type': file.contentType,
      'content-length': String(file.body.length),
      'content-disposition': contentDisposition('attachment', file.fileName),
    },
  });
});
