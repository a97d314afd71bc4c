import type { SingleEndedOutputInput } from '../input';
import { CalcError } from '../errors';
import { tubeModel } from '../models/registry';
import type { StageAnalysis } from '../types';
import { cathodeBiasParts } from './common-cathode';
import { screenParts } from './pentode-amplifier';
import { analyzeSingleTube, type AnalyzeOptions } from './single-tube';
import { analyzeTransformer, turnsRatio } from '../transformer';

/**
 * Ideal output transformer: the primary's DC resistance carries the whole plate current, the reflected load
 * (primaryImpedance) only its signal part, so the plate sees Rdc at DC and Rdc + Zp for the signal.
 */
export function analyzeSingleEndedOutput(input: SingleEndedOutputInput, options?: AnalyzeOptions): StageAnalysis {
  const model = tubeModel(input.tube);
  if (model.kind === 'pentode' && !input.screen) {
    throw new CalcError('invalid-input', 'A pentode or beam tetrode needs a screen supply.');
  }
  const bias = cathodeBiasParts(input.bias);
  const screen = model.kind === 'pentode' && input.screen ? screenParts(input.screen, input.supply) : null;
  const rdc = input.primaryResistance;
  const xf = input.transformer;
  // the secondary's resistance, referred to the primary, is in series with the reflected speaker load
  const rsecReferred = xf ? turnsRatio({ primaryImpedance: input.primaryImpedance, speakerLoad: xf.speakerLoad }) ** 2 * (xf.secondaryResistance ?? 0) : 0;
  const result = analyzeSingleTube({
    topology: input.topology,
    tube: input.tube,
    model,
    input,
    net: {
      model,
      supply: input.supply,
      plateDc: rdc,
      plateAc: rdc + input.primaryImpedance + rsecReferred,
      cathodeDc: bias.cathodeDc,
      cathodeAc: bias.cathodeAc,
      gridOffset: bias.gridOffset,
      gridPerCathodeCurrent: 0,
      screen: screen?.net ?? null,
      output: 'plate',
    },
    biasKind: bias.biasKind,
    cathodeBypass: bias.bypass,
    screenBypass: screen?.bypass ?? null,
    coupling: null,
    outputShunt: null,
    transformerLoad: input.primaryImpedance,
    warnings: [],
    options,
  });
  if (xf) {
    const plateAc = rdc + input.primaryImpedance + rsecReferred;
    const current = input.drive.amplitude > 0 ? result.largeSignal.outputAmplitude / plateAc : null;
    result.transformer = analyzeTransformer(
      { primaryImpedance: input.primaryImpedance, primaryResistance: rdc, ...xf },
      result.smallSignal.outputImpedance,
      current,
    );
  }
  return result;
}
