// POST /api/analyze-chain – solve a chain of stages and passive networks end to end (levels, response, level sweep)
import { NextResponse } from 'next/server';
import { parseBody, withUser } from '@/lib/api/with-user';
import { analyzeChain } from '@/lib/calc/chain/solve';
import { analyzeChainBodySchema } from '@/lib/validation/chain';

export const POST = withUser('app:use', async (req) => {
  const { options, ...chain } = await parseBody(req, analyzeChainBodySchema);
  return NextResponse.json({ chain: analyzeChain(chain, { sweep: options?.sweep ?? true }) });
});
