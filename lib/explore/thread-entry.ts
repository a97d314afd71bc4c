// Worker-thread entry of the exploration pool (piscina): runs one block of a tolerance run or of a part search.
// Pure engine calls only; the setup arrives prepared (plain data) so every thread analyses the same builds.
import { evaluateBatch, evaluateRange, runChainTrials, runToleranceTrials, tubeSwap, type ChainToleranceSetup, type SearchSetup, type SwapCandidate, type ToleranceSetup } from '../calc/explore';
import type { StageInput } from '../calc/input';

export type ThreadTask =
  | { kind: 'tolerance'; setup: ToleranceSetup; from: number; to: number }
  | { kind: 'chain-tolerance'; setup: ChainToleranceSetup; from: number; to: number }
  | { kind: 'search-range'; setup: SearchSetup; from: number; to: number; sampleEvery: number }
  | { kind: 'search-batch'; setup: SearchSetup; batch: number[][] }
  | { kind: 'swap'; input: StageInput; candidates: SwapCandidate[]; currentTubeId?: number };

export default function run(task: ThreadTask) {
  switch (task.kind) {
    case 'tolerance':
      return runToleranceTrials(task.setup, task.from, task.to);
    case 'chain-tolerance':
      return runChainTrials(task.setup, task.from, task.to);
    case 'search-range':
      return evaluateRange(task.setup, task.from, task.to, task.sampleEvery);
    case 'search-batch':
      return evaluateBatch(task.setup, task.batch);
    case 'swap':
      return tubeSwap(task.input, task.candidates, task.currentTubeId);
  }
}
