// GET /api/projects/{id}/chain?input=100m – the signal chain and supply solution (stages re-analysed at their node voltages)
import { NextResponse } from 'next/server';
import { parseParams, parseQuery, withUser } from '@/lib/api/with-user';
import { solveChain } from '@/lib/calc/chain';
import { chainStagesFor, getProject } from '@/lib/projects/service';
import { idParamSchema } from '@/lib/validation/auth';
import { chainQuerySchema } from '@/lib/validation/project';

export const GET = withUser('projects:read', async (req, { params }) => {
  const { id } = parseParams(params, idParamSchema);
  const { input } = parseQuery(req, chainQuerySchema);
  const project = await getProject(id);
  const chain = solveChain(await chainStagesFor(project), { ...project.supply, circuit: project.supplyCircuit }, { inputRms: input, links: project.chainLinks });
  return NextResponse.json({ chain });
});
