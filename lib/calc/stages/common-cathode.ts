import type { CommonCathodeInput } from '../input';
import { CalcError } from '../errors';
import { tubeModel } from '../models/registry';
import type { StageAnalysis } from '../types';
import { analyzeSingleTube, type AnalyzeOptions } from './single-tube';

export const parallel = (a: number, b: number) => (a * b) / (a + b);

export function cathodeBiasParts(bias: CommonCathodeInput['bias']) {
  if (bias.kind === 'fixed') {
    return { cathodeDc: 0, cathodeAc: 0, gridOffset: bias.fixedBias, bypass: null, biasKind: 'fixed' as const };
  }
  const rk = bias.cathodeResistor;
  const c = bias.cathodeBypass;
  return {
    cathodeDc: rk,
    cathodeAc: c ? 0 : rk,
    gridOffset: 0,
    bypass: c ? { resistor: rk, capacitor: c } : null,
    biasKind: 'cathode' as const,
  };
}

export function analyzeCommonCathode(input: CommonCathodeInput, options?: AnalyzeOptions): StageAnalysis {
  if (input.tube.model === 'koren-pentode') {
    throw new CalcError('invalid-input', 'This tube is a pentode: use the pentode amplifier topology, which sets its screen.');
  }
  const model = tubeModel(input.tube);
  const bias = cathodeBiasParts(input.bias);
  const ra = input.plateResistor;
  const load = input.load;
  return analyzeSingleTube({
    topology: input.topology,
    tube: input.tube,
    model,
    input,
    net: {
      model,
      supply: input.supply,
      plateDc: ra,
      plateAc: load ? parallel(ra, load.resistance) : ra,
      cathodeDc: bias.cathodeDc,
      cathodeAc: bias.cathodeAc,
      gridOffset: bias.gridOffset,
      gridPerCathodeCurrent: 0,
      screen: null,
      output: 'plate',
    },
    biasKind: bias.biasKind,
    cathodeBypass: bias.bypass,
    screenBypass: null,
    coupling: load ? { capacitor: load.couplingCapacitor, resistance: load.resistance } : null,
    outputShunt: ra,
    transformerLoad: null,
    warnings: [],
    options,
  });
}
