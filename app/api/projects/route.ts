// GET /api/projects – the team's projects (search, status, archived filters); POST – create a project
import { NextResponse } from 'next/server';
import { parseBody, parseQuery, withUser } from '@/lib/api/with-user';
import { createProject, listProjects } from '@/lib/projects/service';
import { createProjectSchema, listProjectsQuerySchema } from '@/lib/validation/project';

export const GET = withUser('projects:read', async (req) => {
  const query = parseQuery(req, listProjectsQuerySchema);
  return NextResponse.json({ projects: await listProjects(query) });
});

export const POST = withUser('projects:write', async (req, { user }) => {
  const input = await parseBody(req, createProjectSchema);
  return NextResponse.json({ project: await createProject(user.id, input) }, { status: 201 });
});
