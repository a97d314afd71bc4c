// GET /api/projects/{id} – the project with its stages and their latest analyses; PATCH – edit (with version); DELETE – archive
import { NextResponse } from 'next/server';
import { parseBody, parseParams, withUser } from '@/lib/api/with-user';
import { archiveProject, getProject, updateProject } from '@/lib/projects/service';
import { idParamSchema } from '@/lib/validation/auth';
import { updateProjectSchema } from '@/lib/validation/project';

export const GET = withUser('projects:read', async (_req, { params }) => {
  const { id } = parseParams(params, idParamSchema);
  return NextResponse.json({ project: await getProject(id) });
});

export const PATCH = withUser('projects:write', async (req, { user, params }) => {
  const { id } = parseParams(params, idParamSchema);
  const patch = await parseBody(req, updateProjectSchema);
  return NextResponse.json({ project: await updateProject(user.id, id, patch) });
});

export const DELETE = withUser('projects:write', async (_req, { user, params }) => {
  const { id } = parseParams(params, idParamSchema);
  await archiveProject(user.id, id);
  return new NextResponse(null, { status: 204 });
});
