// POST /api/analyze-supply – solve a supply circuit with explicit load currents per node, without saving it
import { NextResponse } from 'next/server';
import { parseBody, withUser } from '@/lib/api/with-user';
import { solveSupply } from '@/lib/calc/supply';
import { analyzeSupplySchema } from '@/lib/validation/supply';

export const POST = withUser('app:use', async (req) => {
  const { options, ...circuit } = await parseBody(req, analyzeSupplySchema);
  return NextResponse.json({ supply: solveSupply(circuit, options ?? {}) });
});
