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
  const { model } = net;
  const dc = means === null;
  const m = means ?? { ia: 0, ig2: 0, ik: 0 };
  const injP = net.output === 'plate' ? inject : 0;
  const injK = net.output === 'cathode' ? inject : 0;
  const rp = dc ? net.plateDc : net.plateAc;
  const vp0 = dc ? net.supply : net.supply - net.plateDc * m.ia + net.plateAc * (m.ia + injP);

  const inner = (vk: number, vg: number): SampleState => {
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
        ig2 = solveIncreasing((x) => x - model.screenCurrent(vgk, v0 - rs * x - vk), 0, hi, guess?.ig2, TOL_INNER);
        vg2 = v0 - rs * ig2;
      }
    }
    const vg2k = vg2 - vk;
    let ia: number;
    if (rp === 0) {
      ia = model.plateCurrent(vp0 - vk, vgk, vg2k);
    } else {
      const hi = Math.max(0, (vp0 - vk) / rp);
      ia = solveIncreasing((x) => x - model.plateCurrent(vp0 - rp * x - vk, vgk, vg2k), 0, hi, guess?.ia, TOL_INNER);
    }
    return { ia, ig2, ig, ik: ia + ig2 + ig, vp: vp0 - rp * ia, vk, vg, vg2 };
  };

  const rk = dc ? net.cathodeDc : net.cathodeAc;
  const vkOf = (ik: number) => (dc ? net.cathodeDc * ik : net.cathodeDc * m.ik + net.cathodeAc * (ik + injK - m.ik));
  const vgOf = (ik: number) => net.gridOffset + net.gridPerCathodeCurrent * (dc ? ik : m.ik) + vin;
  const coupled = rk !== 0 || (dc && net.gridPerCathodeCurrent !== 0);
  if (!coupled) return inner(vkOf(0), vgOf(0));

  const h = (ik: number) => ik - inner(vkOf(ik), vgOf(ik)).ik;
  const start = Math.max(2 * (guess?.ik ?? 0), 1e-4);
  const hi = expandUpper(h, start, 1e4) ?? start;
  const ik = solveIncreasing(h, 0, hi, guess?.ik, TOL_OUTER);
  return inner(vkOf(ik), vgOf(ik));
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
