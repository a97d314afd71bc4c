// GET /api/projects/{id}/chain?input=100m – the signal chain and supply solution (stages re-analysed at their node voltages)
import { NextResponse } from 'next/server';
import { parseParams, parseQuery, withUser } from '@/lib/api/with-user';
import { runInCalcThread } from '@/lib/calc-worker/pool';
import { chainStagesFor, getProject } from '@/lib/projects/service';
import { idParamSchema } from '@/lib/validation/auth';
import { chainQuerySchema } from '@/lib/validation/project';

export const GET = withUser('projects:read', async (req, { params }) => {
  const { id } = parseParams(params, idParamSchema);
  const { input } = parseQuery(req, chainQuerySchema);
  const project = await getProject(id);
  // solved in the calc thread: a long chain takes seconds of CPU
  const chain = await runInCalcThread({
    kind: 'chain',
    stages: await chainStagesFor(project),
    supply: { ...project.supply, circuit: project.supplyCircuit },
    options: { inputRms: input, links: project.chainLinks },
  });
  return NextResponse.json({ chain });
});
