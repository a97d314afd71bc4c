import type { Tube } from '../input';
import { threeHalvesTriodeCurrent, threeHalvesTriodeCurrentD } from './child-langmuir';
import { gridCurrent, gridCurrentD } from './grid-current';
import {
  korenPentodePlateCurrent,
  korenPentodePlateCurrentD,
  korenPentodeScreenCurrent,
  korenPentodeScreenCurrentD,
  korenTriodeCurrent,
  korenTriodeCurrentD,
} from './koren';

export type TubeCapacitances = { cgk: number; cga: number; cak: number };
export type TubeRatings = NonNullable<Tube['ratings']>;

/** What the solvers need from any tube model; voltages are relative to the cathode. */
export interface TubeModel {
  kind: 'triode' | 'pentode';
  plateCurrent(vak: number, vgk: number, vg2k: number): number;
  screenCurrent(vgk: number, vg2k: number): number;
  gridCurrent(vgk: number): number;
  /**
   * Optional analytic derivatives for the Newton solvers (the plain functions are the fallback).
   * plate: out = [Ia, ∂Ia/∂Vak, ∂Ia/∂Vgk, ∂Ia/∂Vg2k]; screen: out = [Ig2, ∂/∂Vgk, ∂/∂Vg2k]; grid: out = [Ig, dIg/dVgk].
   * Each returns the current, bit-identical to the plain function.
   */
  plateCurrentD?(vak: number, vgk: number, vg2k: number, out: Float64Array): number;
  screenCurrentD?(vgk: number, vg2k: number, out: Float64Array): number;
  gridCurrentD?(vgk: number, out: Float64Array): number;
  rgi: number;
  capacitances: TubeCapacitances;
  ratings: TubeRatings;
}

/**
 * Count of tube-model evaluations (plate, screen or grid current, with or without derivatives) since the last
 * reset: a load-independent cost measure used by the benchmark. One integer increment per call.
 */
export const modelEvaluations = { count: 0, newtonFallbacks: 0 };

// Model functions bound once: calls then skip the module-namespace property read that CommonJS-transpiled
// builds insert on every call of an imported function (measurable in the per-sample loops).
const triodeD = korenTriodeCurrentD;
const pentodeD = korenPentodePlateCurrentD;
const screenD = korenPentodeScreenCurrentD;
const gridD = gridCurrentD;
const threeHalvesD = threeHalvesTriodeCurrentD;

const ZERO_CAPS: TubeCapacitances = { cgk: 0, cga: 0, cak: 0 };

export function defaultRgi(tube: Tube): number {
  if (tube.rgi !== undefined) return tube.rgi;
  const power = tube.model === 'koren-pentode' || (tube.ratings?.plateDissipation ?? 0) >= 5;
  return power ? 1000 : 2000;
}

type Builder<M extends Tube['model']> = (tube: Extract<Tube, { model: M }>) => TubeModel;

function common(tube: Tube) {
  const rgi = defaultRgi(tube);
  return {
    rgi,
    gridCurrent: (vgk: number) => (modelEvaluations.count++, gridCurrent(vgk, rgi)),
    gridCurrentD: (vgk: number, out: Float64Array) => (modelEvaluations.count++, gridD(vgk, rgi, out)),
    capacitances: tube.capacitances ?? ZERO_CAPS,
    ratings: tube.ratings ?? {},
  };
}

const registry: { [M in Tube['model']]: Builder<M> } = {
  'koren-triode': (tube) => ({
    kind: 'triode',
    ...common(tube),
    plateCurrent: (vak, vgk) => (modelEvaluations.count++, korenTriodeCurrent(tube, vak, vgk)),
    plateCurrentD: (vak, vgk, _vg2k, out) => {
      modelEvaluations.count++;
      out[3] = 0;
      return triodeD(tube, vak, vgk, out);
    },
    screenCurrent: () => 0,
  }),
  'koren-pentode': (tube) => ({
    kind: 'pentode',
    ...common(tube),
    plateCurrent: (vak, vgk, vg2k) => (modelEvaluations.count++, korenPentodePlateCurrent(tube, vak, vgk, vg2k)),
    screenCurrent: (vgk, vg2k) => (modelEvaluations.count++, korenPentodeScreenCurrent(tube, vgk, vg2k)),
    plateCurrentD: (vak, vgk, vg2k, out) => (modelEvaluations.count++, pentodeD(tube, vak, vgk, vg2k, out)),
    screenCurrentD: (vgk, vg2k, out) => (modelEvaluations.count++, screenD(tube, vgk, vg2k, out)),
  }),
  'child-langmuir': (tube) => ({
    kind: 'triode',
    ...common(tube),
    plateCurrent: (vak, vgk) => (modelEvaluations.count++, threeHalvesTriodeCurrent(tube, vak, vgk)),
    plateCurrentD: (vak, vgk, _vg2k, out) => {
      modelEvaluations.count++;
      out[3] = 0;
      return threeHalvesD(tube, vak, vgk, out);
    },
    screenCurrent: () => 0,
  }),
};

export function tubeModel(tube: Tube): TubeModel {
  const build = registry[tube.model] as Builder<Tube['model']> | undefined;
  if (!build) throw new Error(`unknown tube model '${(tube as { model: string }).model}'`);
  return build(tube);
}

export type SmallSignalParams = { gm: number; ra: number; mu: number };

/** Local gm, ra and µ by central differences at a bias point (screen held fixed for pentodes). */
export function tubeDerivatives(model: TubeModel, vak: number, vgk: number, vg2k = 0): SmallSignalParams {
  const hg = 1e-4 * Math.max(1, Math.abs(vgk));
  const ha = 1e-4 * Math.max(1, Math.abs(vak));
  const gm = (model.plateCurrent(vak, vgk + hg, vg2k) - model.plateCurrent(vak, vgk - hg, vg2k)) / (2 * hg);
  const ga = (model.plateCurrent(vak + ha, vgk, vg2k) - model.plateCurrent(vak - ha, vgk, vg2k)) / (2 * ha);
  const ra = ga > 1e-15 ? 1 / ga : 1e12;
  return { gm, ra, mu: gm * ra };
}
