// GET /api/revisions/{id}/report – the revision's PDF report, rendered from its frozen snapshot
import { contentDisposition } from '@/lib/api/content-disposition';
import { parseParams, withUser } from '@/lib/api/with-user';
import { ReportError, reportErrorResponse } from '@/lib/report/pdf';
import { revisionPdf } from '@/lib/review/service';
import { idParamSchema } from '@/lib/validation/auth';

export const runtime = 'nodejs';

export const GET = withUser('reviews:read', async (_req, { params }) => {
  const { id } = parseParams(params, idParamSchema);
  let pdf: Awaited<ReturnType<typeof revisionPdf>>;
  try {
    pdf = await revisionPdf(id);
  } catch (err) {
    if (err instanceof ReportError) return reportErrorResponse(err);
    throw err;
  }
  return new Response(new Uint8Array(pdf.body), {
    headers: { 'content-type': 'application/pdf', 'content-disposition': contentDisposition('inline', pdf.fileName), 'cache-control': 'no-store' },
  });
});
