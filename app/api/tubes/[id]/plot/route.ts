// GET /api/tubes/{id}/plot?modelId=&vaMax=&screenVoltage= – plate curve family, Pa(max) hyperbola, transfer curve, model vs datasheet points
import { NextResponse } from 'next/server';
import { z } from 'zod';
import { parseParams, parseQuery, withUser } from '@/lib/api/with-user';
import { tubePlot } from '@/lib/tubes/service';
import { idText } from '@/lib/validation/ids';
import { quantity } from '@/lib/validation/quantity';
import { tubeIdParamSchema } from '@/lib/validation/tube';

const plotQuerySchema = z.object({
  modelId: idText().optional(),
  vaMax: quantity('V', { positive: true, max: 2000 }).optional(),
  screenVoltage: quantity('V', { positive: true, max: 1000 }).optional(),
});

export const GET = withUser('tubes:read', async (req, { params }) => {
  const { id } = parseParams(params, tubeIdParamSchema);
  return NextResponse.json(await tubePlot(id, parseQuery(req, plotQuerySchema)));
});
