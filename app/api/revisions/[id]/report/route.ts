// GET /api/revisions/{id}/report – the revision's PDF report, rendered from its frozen snapshot
import { parseParams, withUser } from '@/lib/api/with-user';
import { revisionPdf } from '@/lib/review/service';
import { idParamSchema } from '@/lib/validation/auth';

export const GET = withUser('reviews:read', async (_req, { params }) => {
  const { id } = parseParams(params, idParamSchema);
  const pdf = await revisionPdf(id);
  return new Response(new Uint8Array(pdf.body), {
    headers: { 'content-type': 'application/pdf', 'content-disposition': `inline; filename="${pdf.fileName}"` },
  });
});
