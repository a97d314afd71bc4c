import type { CathodeFollowerInput } from '../input';
import { CalcError } from '../errors';
import { tubeModel } from '../models/registry';
import type { StageAnalysis } from '../types';
import { parallel } from './common-cathode';
import { analyzeSingleTube, type AnalyzeOptions } from './single-tube';

export function analyzeCathodeFollower(input: CathodeFollowerInput, options?: AnalyzeOptions): StageAnalysis {
  if (input.tube.model === 'koren-pentode') {
    throw new CalcError('unsupported', 'The cathode follower is calculated for triodes only.');
  }
  const model = tubeModel(input.tube);
  const rk = input.cathodeResistor;
  const load = input.load;
  const self = input.bias.kind === 'self';
  if (input.bias.kind === 'self' && !(input.bias.biasResistor < rk)) {
    throw new CalcError('invalid-input', 'The bias resistor must be smaller than the total cathode resistor.');
  }
  if (input.bias.kind === 'dc-coupled' && input.bias.gridVoltage >= input.supply) {
    throw new CalcError('over-supply', 'The grid voltage is at or above the supply voltage.');
  }
  return analyzeSingleTube({
    topology: input.topology,
    tube: input.tube,
    model,
    input,
    net: {
      model,
      supply: input.supply,
      plateDc: input.plateResistor,
      plateAc: input.plateResistor,
      cathodeDc: rk,
      cathodeAc: load ? parallel(rk, load.resistance) : rk,
      gridOffset: input.bias.kind === 'dc-coupled' ? input.bias.gridVoltage : 0,
      // the grid leak returns to the tap between the bias resistor and the rest of Rk
      gridPerCathodeCurrent: input.bias.kind === 'self' ? rk - input.bias.biasResistor : 0,
      screen: null,
      output: 'cathode',
    },
    biasKind: self ? 'cathode' : 'fixed',
    cathodeBypass: null,
    screenBypass: null,
    coupling: load ? { capacitor: load.couplingCapacitor, resistance: load.resistance } : null,
    outputShunt: rk,
    transformerLoad: null,
    warnings: self ? [] : ['DC-coupled grid: the grid-circuit resistance is checked against the fixed-bias limit.'],
    options,
  });
}
