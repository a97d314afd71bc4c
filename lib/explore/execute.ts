// Runs one stored exploration request on the worker-thread pool. The request carries everything the engine needs
// (engine inputs with the library tubes in place), so a worker needs no access to the library or the stages.
import { prepareChainTolerance, prepareSearch, prepareTolerance, type SearchSpec, type SwapCandidate, type ToleranceOptions } from '../calc/explore';
import type { ChainStage, ChainSupply } from '../calc/chain';
import type { StageInput } from '../calc/input';
import type { ExplorePool, RunControl } from './threads';

export type ExploreSetup =
  | { kind: 'tolerance'; scope: 'stage'; input: StageInput; options: ToleranceOptions }
  | { kind: 'tolerance'; scope: 'chain'; stages: ChainStage[]; supply: ChainSupply; options: ToleranceOptions }
  | { kind: 'swap'; scope: 'stage'; input: StageInput; candidates: SwapCandidate[]; currentTubeId: number }
  | { kind: 'search'; scope: 'stage'; spec: SearchSpec };

export async function executeSetup(pool: ExplorePool, setup: ExploreSetup, control: RunControl): Promise<Record<string, unknown>> {
  switch (setup.kind) {
    case 'tolerance':
      if (setup.scope === 'chain') {
        return { summary: await pool.chainTolerance(prepareChainTolerance(setup.stages, setup.supply, setup.options), control) };
      }
      return { summary: await pool.tolerance(prepareTolerance(setup.input, setup.options), control) };
    case 'swap':
      return { rows: await pool.swap(setup.input, setup.candidates, setup.currentTubeId, control) };
    case 'search':
      return { search: await pool.search(prepareSearch(setup.spec), control) };
  }
}
