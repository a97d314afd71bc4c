// POST /api/projects/{id}/stages – add a stage (analysed with its library tube; an engine error is stored, not refused)
import { NextResponse } from 'next/server';
import { parseBody, parseParams, withUser } from '@/lib/api/with-user';
import { createStage } from '@/lib/stages/service';
import { idParamSchema } from '@/lib/validation/auth';
import { createStageSchema } from '@/lib/validation/project';

export const POST = withUser('projects:write', async (req, { user, params }) => {
  const { id } = parseParams(params, idParamSchema);
  const input = await parseBody(req, createStageSchema);
  return NextResponse.json({ stage: await createStage(user.id, id, input) }, { status: 201 });
});
