// GET /api/tubes/{id}/models/{modelId}/spice – the model as a SPICE subcircuit include file
import { contentDisposition } from '@/lib/api/content-disposition';
import { parseParams, withUser } from '@/lib/api/with-user';
import { spiceModelFile } from '@/lib/tubes/service';
import { tubeModelParamSchema } from '@/lib/validation/tube';

export const GET = withUser('tubes:read', async (_req, { params }) => {
  const { id, modelId } = parseParams(params, tubeModelParamSchema);
  const file = await spiceModelFile(id, modelId);
  return new Response(file.text, {
    headers: {
      'content-type': 'text/plain; charset=utf-8',
      'content-disposition': contentDisposition('attachment', file.fileName),
      'x-subcircuit-name': file.name,
    },
  });
});
