// Chain tolerance runs: with nothing varying, every build is the chain solver's own solution (the one-step supply
// correction lands on the converged node voltages); with the mains varying, the spread follows the mains.
import { readFileSync } from 'node:fs';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { solveChain, type ChainStage, type ChainSupply } from '@/lib/calc/chain';
import { prepareChainTolerance, runChainTrials, summarizeChainTolerance } from '@/lib/calc/explore';
import { stageInputSchema, type StageInput } from '@/lib/validation/stage';

const fixture = (name: string): StageInput =>
  stageInputSchema.parse(JSON.parse(readFileSync(path.resolve(__dirname, '../../fixtures/stages', `${name}.json`), 'utf8')));

const chain: ChainStage[] = [
  { id: 1, name: 'V1', position: 1, supplyNode: 'b2', input: fixture('cc-12ax7-bypassed') },
  { id: 2, name: 'V2', position: 2, supplyNode: 'b2', input: fixture('cc-12at7-bypassed') },
  { id: 3, name: 'V3', position: 3, supplyNode: 'b1', input: fixture('se-2a3-cathode') },
];
const supply: ChainSupply = {
  rawVoltage: 400,
  sourceResistance: 50,
  nodes: [
    { key: 'b1', name: 'B+1', droppingResistor: 0, filterCapacitor: 100e-6 },
    { key: 'b2', name: 'B+2', droppingResistor: 4700, filterCapacitor: 47e-6 },
  ],
};
const zero = { minus: 0, plus: 0 };

describe('chain tolerance run', () => {
  it('reproduces the chain solver when nothing varies', () => {
    const setup = prepareChainTolerance(chain, supply, { trials: 5, seed: 1, mains: zero, tubeSpread: 0, resistorTolerance: 0, capacitorTolerance: zero });
    const s = summarizeChainTolerance(setup, [runChainTrials(setup, 0, 5)]);
    const solved = solveChain(chain, supply, { inputRms: 0.1 });
    expect(s.failed).toBe(0);
    for (const st of solved.stages) {
      const ia = s.metrics.find((m) => m.key === (`${st.stageId}:plateCurrent` as never))!;
      const analysed = solveChain(chain, supply).stages.find((x) => x.stageId === st.stageId)!;
      expect(analysed.solvedSupply).not.toBeNull();
      // the same current the stage draws at its converged node voltage (the chain solver settles to 0.01 V)
      expect(Math.abs(ia.stats!.percentiles[2]!.value / ia.nominal! - 1)).toBeLessThan(1e-3);
      expect(ia.stats!.std).toBeLessThan(1e-9);
    }
    const gain = s.metrics.find((m) => m.key === ('chain:gain' as never))!;
    // the chain gain of a build is the product of the stage gains, each stage with its own entered load
    const product = solved.stages.reduce((p, st) => p * Math.abs(st.gain!), 1);
    expect(Math.abs(gain.stats!.percentiles[2]!.value / product - 1)).toBeLessThan(1e-3);
    expect(Math.abs(gain.nominal! / product - 1)).toBeLessThan(1e-3);
  });

  it('spreads with the mains, which then leads the sensitivity ranking of the output stage current', () => {
    const setup = prepareChainTolerance(chain, supply, { trials: 300, seed: 2, tubeSpread: 0, resistorTolerance: 0, capacitorTolerance: zero, mains: { minus: 0.1, plus: 0.1 } });
    const s = summarizeChainTolerance(setup, [runChainTrials(setup, 0, 300)]);
    const ia3 = s.sensitivity.find((x) => x.metric === ('3:plateCurrent' as never))!;
    expect(ia3.ranking[0]!.factor).toBe('mains');
    expect(ia3.ranking[0]!.rho).toBeGreaterThan(0.95);
  });
});
