// GET /api/projects/{id}/feedback?input=100m&resistor=4k7&capacitor=none – the project's global feedback loop: margins, figures with and without it
import { NextResponse } from 'next/server';
import { parseParams, parseQuery, withUser } from '@/lib/api/with-user';
import { projectFeedback } from '@/lib/projects/feedback';
import { getProject } from '@/lib/projects/service';
import { idParamSchema } from '@/lib/validation/auth';
import { feedbackQuerySchema } from '@/lib/validation/feedback';

export const GET = withUser('projects:read', async (req, { params }) => {
  const { id } = parseParams(params, idParamSchema);
  const query = parseQuery(req, feedbackQuerySchema);
  const project = await getProject(id);
  return NextResponse.json({ loop: await projectFeedback(project, query) });
});
