import type { StageInput } from './input';
import { CalcError } from './errors';
import { analyzeCathodeFollower } from './stages/cathode-follower';
import { analyzeCommonCathode } from './stages/common-cathode';
import { analyzePentodeAmplifier } from './stages/pentode-amplifier';
import { analyzePushPullOutput } from './stages/push-pull-output';
import { analyzeSingleEndedOutput } from './stages/single-ended-output';
import { analyzeLongTailedPair } from './stages/long-tailed-pair';
import { analyzeSplitLoad } from './stages/split-load';
import type { StageAnalysis } from './types';
import type { AnalyzeOptions } from './stages/single-tube';

export { CalcError } from './errors';
export type { CalcErrorCode } from './errors';
export type * from './types';
export type { StageInput, Tube } from './input';
export { plateCurveFamily, transferCurve, paMaxCurve } from './plot';
export type { CurveFamilyOptions, TransferOptions } from './plot';
export { tubeModel, tubeDerivatives } from './models/registry';
export type { TubeModel, SmallSignalParams } from './models/registry';
export { korenTriodeCurrent, korenPentodePlateCurrent, korenPentodeScreenCurrent } from './models/koren';
export type { KorenTriodeParams, KorenPentodeParams } from './models/koren';
export { childLangmuirDiodeCurrent, threeHalvesTriodeCurrent, planarPerveance } from './models/child-langmuir';
export { tubeSubcircuit, stageNetlist, SPICE_PRELUDE } from './spice';
export type { NetlistOptions, SpiceAnalysis } from './spice';
export * as formulas from './formulas';
export { analyzePushPullDriven, sineGridDrives } from './stages/push-pull-output';
export type { PushPullDrivenResult, PushPullGridDrives } from './stages/push-pull-output';
export type { AnalyzeOptions } from './stages/single-tube';

/** True when every number reachable from `value` is finite (no path strings built: this runs on every result). */
function allFinite(value: unknown): boolean {
  if (typeof value === 'number') return Number.isFinite(value);
  if (Array.isArray(value)) {
    for (let i = 0; i < value.length; i++) if (!allFinite(value[i])) return false;
    return true;
  }
  if (value && typeof value === 'object') {
    // results are plain object literals (no inherited enumerable keys): for-in walks them without allocating
    for (const k in value) if (!allFinite((value as Record<string, unknown>)[k])) return false;
  }
  return true;
}

function assertFinite(value: unknown, path: string): void {
  if (typeof value === 'number') {
    if (!Number.isFinite(value)) throw new CalcError('no-solution', `The calculation produced a non-finite ${path}.`);
  } else if (Array.isArray(value)) {
    value.forEach((v, i) => assertFinite(v, `${path}[${i}]`));
  } else if (value && typeof value === 'object') {
    for (const [k, v] of Object.entries(value)) assertFinite(v, path ? `${path}.${k}` : k);
  }
}

/** The one public entry: analyses a validated stage (the output of `stageInputSchema`). */
export function analyzeStage(input: StageInput, options?: AnalyzeOptions): StageAnalysis {
  let result: StageAnalysis;
  switch (input.topology) {
    case 'common-cathode':
      result = analyzeCommonCathode(input, options);
      break;
    case 'cathode-follower':
      result = analyzeCathodeFollower(input, options);
      break;
    case 'pentode-amplifier':
      result = analyzePentodeAmplifier(input, options);
      break;
    case 'single-ended-output':
      result = analyzeSingleEndedOutput(input, options);
      break;
    case 'push-pull-output':
      result = analyzePushPullOutput(input, options);
      break;
    case 'long-tailed-pair':
      result = analyzeLongTailedPair(input, options);
      break;
    case 'split-load':
      result = analyzeSplitLoad(input, options);
      break;
    default:
      throw new CalcError('invalid-input', `Unknown topology '${(input as { topology: string }).topology}'.`);
  }
  // the path-building walk only runs to name the offending field
  if (!allFinite(result)) assertFinite(result, '');
  return result;
}
