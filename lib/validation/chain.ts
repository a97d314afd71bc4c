// The chain vocabulary belongs to the engine (lib/calc/chain/input.ts); the route and the forms parse with the same schemas.
import { z } from 'zod';
import { chainInputSchema } from '../calc/chain/input';

export { chainInputSchema, chainLinkSchema, chainStageSchema, couplingSchema, passiveSchema, rcBranchSchema, rcNetworkSchema, volumeControlSchema } from '../calc/chain/input';
export type { ChainElement, ChainInput, ChainInputRaw, ChainLink, PassiveInput } from '../calc/chain/input';

/** HTTP body of POST /api/analyze-chain: the chain plus what to compute besides the levels at the input. */
export const analyzeChainBodySchema = chainInputSchema.and(
  z.object({ options: z.object({ sweep: z.boolean().default(true) }).optional() }),
);
