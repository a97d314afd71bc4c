import type { TubeModel } from '../models/registry';
import { expandUpper, solveIncreasing } from '../solve';

/**
 * One tube in a linear network. DC paths use the *Dc resistances; signal deviations from the cycle means see
 * the *Ac resistances (coupling and bypass capacitors treated as short circuits at the signal frequency and
 * as charged to their steady-state voltages). With a bypassed element the Ac value is 0; with a capacitively
 * coupled load it is the parallel combination.
 */
export type SingleTubeNetwork = {
  model: TubeModel;
  supply: number;
  plateDc: number;
  plateAc: number;
  cathodeDc: number;
  cathodeAc: number;
  /** grid DC voltage to ground = gridOffset + gridPerCathodeCurrent·Ik (self-biased follower taps Rk) */
  gridOffset: number;
  gridPerCathodeCurrent: number;
  screen: null | { supply: number; dc: number; ac: number };
  output: 'plate' | 'cathode';
};

export type Means = { ia: number; ig2: number; ik: number };

/** Solved tube state; voltages are to ground. */
export type SampleState = {
  ia: number;
  ig2: number;
  ig: number;
  ik: number;
  vp: number;
  vk: number;
  vg: number;
  vg2: number;
};

const TOL_INNER = 1e-15;
const TOL_OUTER = 1e-14;

type Ctx = {
  net: SingleTubeNetwork;
  dc: boolean;
  m: Means;
  rp: number;
  vp0: number;
  vin: number;
  injK: number;
  lastIa: number | undefined;
  lastIg2: number | undefined;
};

// Hot path: plain functions and anonymous inline arrows only (named closures cost a defineProperty each
// under the tsx/esbuild keep-names transform used by the CLI and the benchmark).
function innerSolve(c: Ctx, vk: number, vg: number): SampleState {
  const { net, dc, m, rp, vp0 } = c;
  const model = net.model;
  const vgk = vg - vk;
  const ig = model.gridCurrent(vgk);
  let ig2 = 0;
  let vg2 = vk;
  const s = net.screen;
  if (s && model.kind === 'pentode') {
    const rs = dc ? s.dc : s.ac;
    const v0 = dc ? s.supply : s.supply - s.dc * m.ig2 + s.ac * m.ig2;
    if (rs === 0) {
      vg2 = v0;
      ig2 = model.screenCurrent(vgk, v0 - vk);
    } else {
      const hi = Math.max(0, (v0 - vk) / rs);
      ig2 = solveIncreasing((x) => x - model.screenCurrent(vgk, v0 - rs * x - vk), 0, hi, c.lastIg2, TOL_INNER);
      c.lastIg2 = ig2;
      vg2 = v0 - rs * ig2;
    }
  }
  const vg2k = vg2 - vk;
  let ia: number;
  if (rp === 0) {
    ia = model.plateCurrent(vp0 - vk, vgk, vg2k);
  } else {
    const hi = Math.max(0, (vp0 - vk) / rp);
    ia = solveIncreasing((x) => x - model.plateCurrent(vp0 - rp * x - vk, vgk, vg2k), 0, hi, c.lastIa, TOL_INNER);
    c.lastIa = ia;
  }
  return { ia, ig2, ig, ik: ia + ig2 + ig, vp: vp0 - rp * ia, vk, vg, vg2 };
}

function cathodeVoltage(c: Ctx, ik: number): number {
  const { net, m } = c;
  return c.dc ? net.cathodeDc * ik : net.cathodeDc * m.ik + net.cathodeAc * (ik + c.injK - m.ik);
}

function gridVoltage(c: Ctx, ik: number): number {
  return c.net.gridOffset + c.net.gridPerCathodeCurrent * (c.dc ? ik : c.m.ik) + c.vin;
}

/**
 * Solves the network for one instant. `means` null gives the DC operating point; otherwise capacitors hold the
 * voltages set by the mean currents. `inject` is a test current into the output node (for output impedance).
 */
export function solveNetwork(
  net: SingleTubeNetwork,
  vin: number,
  means: Means | null,
  inject = 0,
  guess?: SampleState,
): SampleState {
  const dc = means === null;
  const m = means ?? { ia: 0, ig2: 0, ik: 0 };
  const injP = net.output === 'plate' ? inject : 0;
  const c: Ctx = {
    net,
    dc,
    m,
    rp: dc ? net.plateDc : net.plateAc,
    vp0: dc ? net.supply : net.supply - net.plateDc * m.ia + net.plateAc * (m.ia + injP),
    vin,
    injK: net.output === 'cathode' ? inject : 0,
    lastIa: guess?.ia,
    lastIg2: guess?.ig2,
  };
  const rk = dc ? net.cathodeDc : net.cathodeAc;
  const coupled = rk !== 0 || (dc && net.gridPerCathodeCurrent !== 0);
  if (!coupled) return innerSolve(c, cathodeVoltage(c, 0), gridVoltage(c, 0));

  // With a guess, try a bracket of twice the guess first; expand only when the root is not inside it.
  let hi = Math.max(2 * (guess?.ik ?? 0), 1e-4);
  let ik = solveIncreasing((x) => x - innerSolve(c, cathodeVoltage(c, x), gridVoltage(c, x)).ik, 0, hi, guess?.ik, TOL_OUTER);
  if (ik >= hi * (1 - 1e-12)) {
    hi = expandUpper((x) => x - innerSolve(c, cathodeVoltage(c, x), gridVoltage(c, x)).ik, hi, 1e4) ?? hi;
    ik = solveIncreasing((x) => x - innerSolve(c, cathodeVoltage(c, x), gridVoltage(c, x)).ik, 0, hi, undefined, TOL_OUTER);
  }
  return innerSolve(c, cathodeVoltage(c, ik), gridVoltage(c, ik));
}

export function outputVoltage(net: SingleTubeNetwork, s: SampleState): number {
  return net.output === 'plate' ? s.vp : s.vk;
}

/** Which cycle means feed back into the bias (capacitor-held voltages). */
export function activeMeans(net: SingleTubeNetwork): Array<keyof Means> {
  const keys: Array<keyof Means> = [];
  if (net.plateAc !== net.plateDc) keys.push('ia');
  if (net.screen && net.model.kind === 'pentode' && net.screen.ac !== net.screen.dc) keys.push('ig2');
  if (net.cathodeAc !== net.cathodeDc || net.gridPerCathodeCurrent !== 0) keys.push('ik');
  return keys;
}

/** Quadratic extrapolation of the next sample from the last three (a guess for the root finders). */
export function extrapolate(p1: SampleState, p2?: SampleState, p3?: SampleState): SampleState {
  if (!p2) return p1;
  if (!p3) return { ...p1, ia: 2 * p1.ia - p2.ia, ig2: 2 * p1.ig2 - p2.ig2, ik: 2 * p1.ik - p2.ik };
  return {
    ...p1,
    ia: Math.max(0, 3 * p1.ia - 3 * p2.ia + p3.ia),
    ig2: Math.max(0, 3 * p1.ig2 - 3 * p2.ig2 + p3.ig2),
    ik: Math.max(0, 3 * p1.ik - 3 * p2.ik + p3.ik),
  };
}
