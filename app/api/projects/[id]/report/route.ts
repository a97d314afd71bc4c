// GET /api/projects/{id}/report – the design report PDF (stages, inputs, results, ratings, plots, chain and supply)
import { parseParams, withUser } from '@/lib/api/with-user';
import { toleranceDigests } from '@/lib/explore/service';
import { chainStagesFor, getProject } from '@/lib/projects/service';
import { renderReportPdf, ReportError, reportErrorResponse } from '@/lib/report/pdf';
import { idParamSchema } from '@/lib/validation/auth';

export const runtime = 'nodejs';

export const GET = withUser('projects:read', async (_req, { params }) => {
  const { id } = parseParams(params, idParamSchema);
  const project = await getProject(id);
  // The chain is solved in the drawing thread with the report: for many stages it takes seconds of CPU.
  const chainInput = { stages: await chainStagesFor(project), supply: { ...project.supply, circuit: project.supplyCircuit }, options: { inputRms: 0.1, links: project.chainLinks } };
  let pdf: Buffer;
  try {
    const tolerance = await toleranceDigests(project.stages.map((st) => ({ id: st.id, version: st.version })));
    pdf = await renderReportPdf(project, { tolerance }, chainInput);
  } catch (err) {
    if (err instanceof ReportError) return reportErrorResponse(err);
    throw err;
  }
  const slug = project.name.toLowerCase().replace(/[^a-z0-9]+/g, '-').replace(/^-|-$/g, '').slice(0, 60) || `project-${project.id}`;
  return new Response(new Uint8Array(pdf), {
    headers: {
      'content-type': 'application/pdf',
      'content-disposition': `attachment; filename="${slug}-report.pdf"`,
      'cache-control': 'no-store',
    },
  });
});
