import type { PentodeAmplifierInput, Screen } from '../input';
import { tubeModel } from '../models/registry';
import type { StageAnalysis } from '../types';
import { cathodeBiasParts, parallel } from './common-cathode';
import { analyzeSingleTube, type AnalyzeOptions } from './single-tube';

export function screenParts(screen: Screen, supply: number) {
  if (screen.kind === 'fixed') return { net: { supply: screen.supply ?? supply, dc: 0, ac: 0 }, bypass: null };
  const r = screen.resistor;
  return {
    net: { supply, dc: r, ac: screen.bypass ? 0 : r },
    bypass: screen.bypass ? { resistor: r, capacitor: screen.bypass } : null,
  };
}

export function analyzePentodeAmplifier(input: PentodeAmplifierInput, options?: AnalyzeOptions): StageAnalysis {
  const model = tubeModel(input.tube);
  const bias = cathodeBiasParts(input.bias);
  const screen = screenParts(input.screen, input.supply);
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
      screen: screen.net,
      output: 'plate',
    },
    biasKind: bias.biasKind,
    cathodeBypass: bias.bypass,
    screenBypass: screen.bypass,
    coupling: load ? { capacitor: load.couplingCapacitor, resistance: load.resistance } : null,
    outputShunt: ra,
    transformerLoad: null,
    warnings: [],
    options,
  });
}
