import { modelEvaluations, type TubeModel } from '../models/registry';
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

// Newton scratch (module-level: the engine is synchronous, and no allocation in the per-sample path)
const PD = new Float64Array(4);
const SD = new Float64Array(3);
const GD = new Float64Array(2);
const RHS = new Float64Array(3);

/** Relative Newton step below which the iterate is taken as converged (the next error is ~ its square). */
const NEWTON_STEP_TOL = 1e-7;
const NEWTON_MAX_ITER = 24;

function networkState(
  ia: number,
  ig2: number,
  ig: number,
  vp0: number,
  rp: number,
  kc: number,
  rk: number,
  ik: number,
  g0: number,
  gk: number,
  pent: boolean,
  v0s: number,
  rs: number,
): SampleState {
  const vk = kc + rk * ik;
  return { ia, ig2, ig, ik: ia + ig2 + ig, vp: vp0 - rp * ia, vk, vg: g0 + gk * ik, vg2: pent ? v0s - rs * ig2 : vk };
}

/** Keeps an electrode current in [0, v/r]: beyond it the electrode would sit below the cathode and draw nothing. */
function clampPlate(i: number, v: number, r: number): number {
  if (!(i > 0)) return 0;
  if (r > 0) {
    const hi = Math.max(0, v / r);
    if (i > hi) return hi;
  }
  return i;
}

/**
 * Newton on the whole network at once: unknowns (Ia, Ig2, Ik), residuals
 *   F0 = Ia − Ia(Vak, Vgk, Vg2k),  F1 = Ig2 − Ig2(Vgk, Vg2k),  F2 = Ik − Ia − Ig2 − Ig(Vgk)
 * with Vk = kc + rk·Ik, Vgk = g0 − kc + (gk − rk)·Ik, Vg2k = v0s − rs·Ig2 − Vk, Vak = vp0 − rp·Ia − Vk,
 * analytic Jacobian, step halving on the residual norm. Returns null when the model has no derivatives or the
 * iteration does not converge (the caller then uses the bracketing solver).
 */
function newtonNetwork(
  net: SingleTubeNetwork,
  dc: boolean,
  m: Means,
  vin: number,
  injP: number,
  injK: number,
  start: SampleState,
): SampleState | null {
  const model = net.model;
  const pD = model.plateCurrentD;
  const gD = model.gridCurrentD;
  if (!pD || !gD) return null;
  const sc = net.screen;
  const pent = sc !== null && model.kind === 'pentode';
  const sD = model.screenCurrentD;
  if (pent && !sD) return null;
  const rp = dc ? net.plateDc : net.plateAc;
  const vp0 = dc ? net.supply : net.supply - net.plateDc * m.ia + net.plateAc * (m.ia + injP);
  const rk = dc ? net.cathodeDc : net.cathodeAc;
  const kc = dc ? 0 : net.cathodeDc * m.ik + net.cathodeAc * (injK - m.ik);
  const gk = dc ? net.gridPerCathodeCurrent : 0;
  const g0 = net.gridOffset + (dc ? 0 : net.gridPerCathodeCurrent * m.ik) + vin;
  const rs = pent ? (dc ? sc.dc : sc.ac) : 0;
  const v0s = pent ? (dc ? sc.supply : sc.supply - sc.dc * m.ig2 + sc.ac * m.ig2) : 0;
  const q = gk - rk;
  const coupled = q !== 0 || rk !== 0;

  let ia = Math.max(0, start.ia);
  let ig2 = pent ? Math.max(0, start.ig2) : 0;
  let ik = coupled ? Math.max(0, start.ik) : 0;
  let f0 = 0;
  let f1 = 0;
  let f2 = 0;
  let ig = 0;
  let norm = Infinity;
  let lambda = 1;
  let pia = ia;
  let pig2 = ig2;
  let pik = ik;
  let dia = 0;
  let dig2 = 0;
  let dik = 0;
  for (let iter = 0; iter < NEWTON_MAX_ITER; iter++) {
    // residual and Jacobian at (ia, ig2, ik)
    const vk = kc + rk * ik;
    const vgk = g0 - kc + q * ik;
    const vg2k = pent ? v0s - rs * ig2 - vk : 0;
    const vak = vp0 - rp * ia - vk;
    const iaM = pD(vak, vgk, vg2k, PD);
    let ig2M = 0;
    if (pent && sD) ig2M = sD(vgk, vg2k, SD);
    if (vgk > 0) ig = gD(vgk, GD);
    else {
      ig = 0;
      GD[1] = 0;
    }
    const n0 = ia - iaM;
    const n1 = pent ? ig2 - ig2M : 0;
    const n2 = ik - ia - ig2 - ig;
    const nNorm = Math.abs(n0) + Math.abs(n1) + (coupled ? Math.abs(n2) : 0);
    if (!Number.isFinite(nNorm)) return null;
    if (iter > 0 && nNorm > norm && lambda > 1 / 256) {
      // reject: halve the step from the last accepted point
      lambda *= 0.5;
      ik = coupled ? Math.max(0, pik + lambda * dik) : 0;
      ia = clampPlate(pia + lambda * dia, vp0 - kc - rk * ik, rp);
      ig2 = pent ? clampPlate(pig2 + lambda * dig2, v0s - kc - rk * ik, rs) : 0;
      continue;
    }
    f0 = n0;
    f1 = n1;
    f2 = n2;
    norm = nNorm;
    if (norm === 0) return networkState(ia, ig2, ig, vp0, rp, kc, rk, ik, g0, gk, pent, v0s, rs);
    const pa = PD[1] as number;
    const pg = PD[2] as number;
    const ps = PD[3] as number;
    // J = [[A0 A1 A2] [0 B1 B2] [-1 -1 C2]]; A0, B1 ≥ 1, so elimination needs no pivoting
    const a0 = 1 + pa * rp;
    const a1 = pent ? ps * rs : 0;
    const a2 = pa * rk - pg * q + ps * rk;
    const b1 = pent ? 1 + (SD[2] as number) * rs : 1;
    const b2 = pent ? -(SD[1] as number) * q + (SD[2] as number) * rk : 0;
    const c2 = 1 - (GD[1] as number) * q;
    const e1 = -1 + a1 / a0;
    const e2 = c2 + a2 / a0;
    const e = -f2 - f0 / a0;
    const fr = e1 / b1;
    const x2 = (e + fr * f1) / (e2 - fr * b2);
    const x1 = (-f1 - b2 * x2) / b1;
    const x0 = (-f0 - a1 * x1 - a2 * x2) / a0;
    if (!Number.isFinite(x0) || !Number.isFinite(x1) || !Number.isFinite(x2)) return null;
    RHS[0] = x0;
    RHS[1] = x1;
    RHS[2] = x2;
    dia = RHS[0] as number;
    dig2 = RHS[1] as number;
    dik = coupled ? (RHS[2] as number) : 0;
    pia = ia;
    pig2 = ig2;
    pik = ik;
    lambda = 1;
    ik = coupled ? Math.max(0, ik + dik) : 0;
    ia = clampPlate(ia + dia, vp0 - kc - rk * ik, rp);
    ig2 = pent ? clampPlate(ig2 + dig2, v0s - kc - rk * ik, rs) : 0;
    const small =
      Math.abs(ia - pia) <= NEWTON_STEP_TOL * ia + 1e-20 &&
      Math.abs(ig2 - pig2) <= NEWTON_STEP_TOL * ig2 + 1e-20 &&
      Math.abs(ik - pik) <= NEWTON_STEP_TOL * ik + 1e-20;
    if (small) return networkState(ia, ig2, ig + (GD[1] as number) * q * (ik - pik), vp0, rp, kc, rk, ik, g0, gk, pent, v0s, rs);
  }
  return null;
}

/**
 * Solves the network for one instant. `means` null gives the DC operating point; otherwise capacitors hold the
 * voltages set by the mean currents. `inject` is a test current into the output node (for output impedance).
 * With a guess (a nearby solved state) it runs Newton on the whole network; without one, or if Newton fails,
 * nested bracketed 1-D solves.
 */
export function solveNetwork(
  net: SingleTubeNetwork,
  vin: number,
  means: Means | null,
  inject = 0,
  guess?: SampleState,
): SampleState {
  const start = guess ?? (means === null && inject === 0 && vin === 0 ? dcStart(net) : undefined);
  if (start) {
    const injP = net.output === 'plate' ? inject : 0;
    const injK = net.output === 'cathode' ? inject : 0;
    const r = newtonNetwork(net, means === null, means ?? ZERO_MEANS, vin, injP, injK, start);
    if (r) return r;
    modelEvaluations.newtonFallbacks++;
  }
  return solveNetworkBracketed(net, vin, means, inject, guess);
}

/**
 * A Newton start for the DC point: half the supply across the DC resistances, capped by the tube's own current
 * near the supply at the grid offset (or 0 V); the screen takes a fifth of it.
 */
function dcStart(net: SingleTubeNetwork): SampleState {
  const r = net.plateDc + net.cathodeDc;
  const vg2k = net.screen && net.model.kind === 'pentode' ? net.screen.supply : 0;
  const cap = net.model.plateCurrent(0.9 * net.supply, Math.min(net.gridOffset, 0), vg2k);
  const ia = Math.max(1e-9, r > 0 ? Math.min(0.5 * net.supply / r, cap) : cap);
  const ig2 = vg2k > 0 ? 0.2 * ia : 0;
  return { ia, ig2, ig: 0, ik: ia + ig2, vp: net.supply, vk: 0, vg: 0, vg2: 0 };
}

const ZERO_MEANS: Means = { ia: 0, ig2: 0, ik: 0 };

/** The nested-bracketing solver: one 1-D root solve per unknown current (robust; the fallback). */
export function solveNetworkBracketed(
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
