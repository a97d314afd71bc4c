// POST /api/analyze – analyse a stage without saving it (inline tube, or a library tubeId + optional tubeModelId)
import { NextResponse } from 'next/server';
import { z } from 'zod';
import { ApiError } from '@/lib/api/errors';
import { parseBody, withUser } from '@/lib/api/with-user';
import { analyzeStage } from '@/lib/calc';
import { engineInputFor } from '@/lib/stages/service';
import { idNumber } from '@/lib/validation/ids';
import { stageBodySchema, stageInputSchema } from '@/lib/validation/stage';

const tubeModelIdSchema = z.object({ tubeModelId: idNumber().nullable().optional() });

export const POST = withUser('app:use', async (req) => {
  const raw = await parseBody(req, z.record(z.string(), z.unknown(), { message: 'Send the stage inputs as a JSON object.' }));
  if ('tube' in raw) {
    return NextResponse.json({ analysis: analyzeStage(stageInputSchema.parse(raw)) });
  }
  if (!('tubeId' in raw)) throw new ApiError('unprocessable_entity', 'Give either an inline tube or a library tubeId.', { fieldErrors: { tubeId: ['Choose a tube.'] } });
  const body = stageBodySchema.parse(raw);
  const { tubeModelId } = tubeModelIdSchema.parse(raw);
  const input = await engineInputFor(body, tubeModelId);
  // the engine tube comes back too: the stage editor's browser worker analyses the next edits with it
  return NextResponse.json({ analysis: analyzeStage(input), tube: input.tube });
});
