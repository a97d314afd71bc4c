// GET /api/stages/{id}/curves?kind=plate|transfer|response|waveform – CSV of a plotted curve of the stage's stored analysis
import { ApiError } from '@/lib/api/errors';
import { parseParams, parseQuery, withUser } from '@/lib/api/with-user';
import { getStage } from '@/lib/stages/service';
import { curvesCsv } from '@/lib/report/curves-csv';
import { idParamSchema } from '@/lib/validation/auth';
import { curvesQuerySchema } from '@/lib/validation/project';

export const GET = withUser('projects:read', async (req, { params }) => {
  const { id } = parseParams(params, idParamSchema);
  const { kind } = parseQuery(req, curvesQuerySchema);
  const stage = await getStage(id);
  if (!stage.analysis) throw new ApiError('conflict', stage.analysisError ? `This stage has no analysis: ${stage.analysisError.message}` : 'This stage has no analysis yet.');
  const slug = stage.name.toLowerCase().replace(/[^a-z0-9]+/g, '-').replace(/^-|-$/g, '') || `stage-${stage.id}`;
  return new Response(curvesCsv(stage.analysis, kind), {
    headers: {
      'content-type': 'text/csv; charset=utf-8',
      'content-disposition': `attachment; filename="${slug}-${kind}.csv"`,
    },
  });
});
