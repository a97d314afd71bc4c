// GET /api/curve-sets/{id}/file – the uploaded CSV exactly as stored
import { contentDisposition } from '@/lib/api/content-disposition';
import { parseParams, withUser } from '@/lib/api/with-user';
import { curveSetFile } from '@/lib/curves/service';
import { tubeIdParamSchema } from '@/lib/validation/tube';

export const GET = withUser('tubes:read', async (_req, { params }) => {
  const { id } = parseParams(params, tubeIdParamSchema);
  const file = await curveSetFile(id);
  return new Response(new Uint8Array(file.body), {
    headers: { 'content-type': 'text/csv; charset=utf-8', 'content-disposition': contentDisposition('attachment', file.fileName) },
  });
});
