import type { PushPullOutputInput } from '../input';
import { fivePoint, harmonicAmplitudes, thdFromAmplitudes, threePoint } from '../distortion';
import { CalcError } from '../errors';
import { tubeDerivatives, tubeModel, type TubeModel } from '../models/registry';
import { checkRatings } from '../ratings';
import { compileAc, cutoffAc, GROUND, responseCurveAc, SOURCE, tubeElements, type AcElement, type AcOutput, type AcRef, type AcSystem } from '../ac';
import { linearise } from './ac-networks';
import { expandUpper, solveIncreasing } from '../solve';
import type { HeadroomLimit, OperatingPoint, StageAnalysis } from '../types';
import { mean, nearestLimit, SAMPLES_PER_CYCLE as SAMPLES, sineDrive, steadyState } from './cycle';
import { solveNetwork } from './network';
import { modelEvaluations } from '../models/registry';
import { solveDenseInPlace } from './newton';
import { screenParts } from './pentode-amplifier';
import { checkIdle, EMPTY_PLOT, operatingPointAnalysis, operatingPointOf, QUICK_SAMPLES, stagePlot, type AnalyzeOptions } from './single-tube';
import { analyzeTransformer, turnsRatio } from '../transformer';

/*
 * Ideal centre-tapped output transformer, plate-to-plate load Raa, each half-primary N turns.
 * With v the voltage across each half (equal by tight coupling), Va1 = Vct − v and Va2 = Vct + v, so the
 * whole primary carries 2v. Power balance with the reflected load: (2v)²/Raa = vs·is, and ampere-turns
 * N·(i1 − i2) = Ns·is with vs = 2v·Ns/(2N), giving 2v = (i1 − i2)·Raa/2, i.e. v = (i1 − i2)·Raa/4.
 * With one tube cut off it sees Raa/4; with both conducting and i2 = 2I − i1 each sees Raa/2.
 * The DC of i1 − i2 is zero by symmetry, so the magnetising inductance carries nothing. Each half of the
 * winding resistance (Rdc/2) carries its tube's instantaneous current.
 */

type PPMeans = { ik: number; ig2: number };
type PPSample = { i1: number; i2: number; ig2a: number; ig2b: number; ig1: number; ig2: number; v: number; vk: number; vg2: number };

type PPNet = {
  model: TubeModel;
  supply: number;
  halfRdc: number;
  raa: number;
  gridBias: number;
  rk: number;
  rkAc: number;
  screen: null | { supply: number; dc: number; ac: number };
};

const TOL = 1e-15;

type PPCtx = { net: PPNet; vin: number; vin2: number; m: PPMeans; i1: number | undefined; i2: number | undefined; v: number | undefined; ig2: number | undefined };

function platePP(c: PPCtx, vp0: number, vgk: number, vg2k: number, vk: number, guess: number | undefined): number {
  const { model, halfRdc } = c.net;
  if (halfRdc === 0) return model.plateCurrent(vp0 - vk, vgk, vg2k);
  return solveIncreasing((x) => x - model.plateCurrent(vp0 - halfRdc * x - vk, vgk, vg2k), 0, Math.max(0, (vp0 - vk) / halfRdc), guess, TOL);
}

// Hot path: no named closures (see network.ts).
function innerPP(c: PPCtx, vk: number): PPSample {
  const { net, vin, m } = c;
  const { model } = net;
  const vgk1 = net.gridBias + vin - vk;
  const vgk2 = net.gridBias + c.vin2 - vk;
  let vg2 = vk;
  let ig2a = 0;
  let ig2b = 0;
  const s = net.screen;
  if (s && model.kind === 'pentode') {
    const v0 = s.supply - s.dc * m.ig2 + s.ac * m.ig2;
    if (s.ac === 0) {
      vg2 = v0;
    } else {
      const total = solveIncreasing(
        (x) => x - model.screenCurrent(vgk1, v0 - s.ac * x - vk) - model.screenCurrent(vgk2, v0 - s.ac * x - vk),
        0,
        Math.max(0, (v0 - vk) / s.ac),
        c.ig2,
        TOL,
      );
      c.ig2 = total;
      vg2 = v0 - s.ac * total;
    }
    ig2a = model.screenCurrent(vgk1, vg2 - vk);
    ig2b = model.screenCurrent(vgk2, vg2 - vk);
  }
  const vg2k = vg2 - vk;
  const span = net.supply * 1.01 + 1;
  const v = solveIncreasing(
    (x) => {
      c.i1 = platePP(c, net.supply - x, vgk1, vg2k, vk, c.i1);
      c.i2 = platePP(c, net.supply + x, vgk2, vg2k, vk, c.i2);
      return x - ((c.i1 - c.i2) * net.raa) / 4;
    },
    -span,
    span,
    c.v,
    1e-11,
  );
  c.v = v;
  const i1 = platePP(c, net.supply - v, vgk1, vg2k, vk, c.i1);
  const i2 = platePP(c, net.supply + v, vgk2, vg2k, vk, c.i2);
  return { i1, i2, ig2a, ig2b, ig1: model.gridCurrent(vgk1), ig2: model.gridCurrent(vgk2), v, vk, vg2 };
}

const totalPP = (s: PPSample) => s.i1 + s.i2 + s.ig2a + s.ig2b + s.ig1 + s.ig2;

/** Quadratic and quartic extrapolation one step ahead from the last 3 / 5 values (newest first). */
const q3 = (a: number, b: number, c: number) => 3 * a - 3 * b + c;
const q5 = (a: number, b: number, c: number, d: number, e: number) => 5 * a - 10 * b + 10 * c - 5 * d + e;

// Newton scratch (no allocation per sample)
const P1 = new Float64Array(4);
const P2 = new Float64Array(4);
const S1 = new Float64Array(3);
const S2 = new Float64Array(3);
const G1 = new Float64Array(2);
const G2 = new Float64Array(2);
const JPP = new Float64Array(16);
const RPP = new Float64Array(4);

/**
 * Newton on the whole push-pull circuit: unknowns (i1, i2, T = total screen current through a shared screen
 * resistor, Ik), with v = (i1 − i2)·Raa/4, Vk = Rk·m.ik + RkAc·(Ik − m.ik),
 *   F0 = i1 − Ia(Vct − v − Rdc/2·i1 − Vk, Vgk1, Vg2k),  F1 = i2 − Ia(Vct + v − Rdc/2·i2 − Vk, Vgk2, Vg2k),
 *   F2 = T − Ig2(Vgk1, Vg2k) − Ig2(Vgk2, Vg2k),         F3 = Ik − (all cathode currents),
 * unused unknowns held at 0 by identity rows. Analytic Jacobian, step halving; null if it does not converge.
 */
function newtonPP(net: PPNet, vin: number, m: PPMeans, guess: PPSample, vin2 = -vin): PPSample | null {
  const { model } = net;
  const pD = model.plateCurrentD;
  const gD = model.gridCurrentD;
  const sD = model.screenCurrentD;
  if (!pD || !gD) return null;
  const s = net.screen;
  const pent = s !== null && model.kind === 'pentode';
  if (pent && !sD) return null;
  const sac = pent ? s.ac : 0;
  const v0 = pent ? s.supply - s.dc * m.ig2 + s.ac * m.ig2 : 0;
  const useT = pent && sac !== 0;
  const R = net.rkAc;
  const useK = R !== 0;
  const kc = net.rk * m.ik - R * m.ik;
  const r = net.raa / 4;
  const h = net.halfRdc;
  const vct = net.supply;
  let i1 = Math.max(0, guess.i1);
  let i2 = Math.max(0, guess.i2);
  let t = useT ? Math.max(0, guess.ig2a + guess.ig2b) : 0;
  let ik = useK ? Math.max(0, totalPP(guess)) : 0;
  let norm = Infinity;
  let lambda = 1;
  let p1 = i1;
  let p2 = i2;
  let pt = t;
  let pk = ik;
  let d1 = 0;
  let d2 = 0;
  let dt = 0;
  let dk = 0;
  let ig2a = 0;
  let ig2b = 0;
  let ig1 = 0;
  let ig2 = 0;
  for (let iter = 0; iter < 40; iter++) {
    const vk = kc + R * ik;
    const vgk1 = net.gridBias + vin - vk;
    const vgk2 = net.gridBias + vin2 - vk;
    const vg2k = pent ? v0 - sac * t - vk : 0;
    const v = (i1 - i2) * r;
    const a1 = pD(vct - v - h * i1 - vk, vgk1, vg2k, P1);
    const a2 = pD(vct + v - h * i2 - vk, vgk2, vg2k, P2);
    ig2a = pent && sD ? sD(vgk1, vg2k, S1) : 0;
    ig2b = pent && sD ? sD(vgk2, vg2k, S2) : 0;
    // grid current is exactly 0 for Vgk ≤ 0: skip the call
    ig1 = vgk1 > 0 ? gD(vgk1, G1) : ((G1[1] = 0), 0);
    ig2 = vgk2 > 0 ? gD(vgk2, G2) : ((G2[1] = 0), 0);
    const n0 = i1 - a1;
    const n1 = i2 - a2;
    const n2 = useT ? t - ig2a - ig2b : 0;
    const n3 = useK ? ik - i1 - i2 - ig2a - ig2b - ig1 - ig2 : 0;
    const nNorm = Math.abs(n0) + Math.abs(n1) + Math.abs(n2) + Math.abs(n3);
    if (!Number.isFinite(nNorm)) return null;
    if (iter > 0 && nNorm > norm && lambda > 1 / 256) {
      lambda *= 0.5;
      i1 = Math.max(0, p1 + lambda * d1);
      i2 = Math.max(0, p2 + lambda * d2);
      t = useT ? Math.max(0, pt + lambda * dt) : 0;
      ik = useK ? Math.max(0, pk + lambda * dk) : 0;
      continue;
    }
    norm = nNorm;
    if (norm === 0) break;
    const ss1 = pent ? (S1[2] as number) : 0;
    const ss2 = pent ? (S2[2] as number) : 0;
    const sk = pent ? (S1[1] as number) + ss1 + (S2[1] as number) + ss2 : 0;
    const pk1 = (P1[1] as number) + (P1[2] as number) + (pent ? (P1[3] as number) : 0);
    const pk2 = (P2[1] as number) + (P2[2] as number) + (pent ? (P2[3] as number) : 0);
    // row 0
    JPP[0] = 1 + (P1[1] as number) * (r + h);
    JPP[1] = -(P1[1] as number) * r;
    JPP[2] = useT ? (P1[3] as number) * sac : 0;
    JPP[3] = useK ? R * pk1 : 0;
    // row 1
    JPP[4] = -(P2[1] as number) * r;
    JPP[5] = 1 + (P2[1] as number) * (r + h);
    JPP[6] = useT ? (P2[3] as number) * sac : 0;
    JPP[7] = useK ? R * pk2 : 0;
    // row 2
    JPP[8] = 0;
    JPP[9] = 0;
    JPP[10] = useT ? 1 + sac * (ss1 + ss2) : 1;
    JPP[11] = useT && useK ? R * sk : 0;
    // row 3
    JPP[12] = useK ? -1 : 0;
    JPP[13] = useK ? -1 : 0;
    JPP[14] = useK && useT ? sac * (ss1 + ss2) : 0;
    JPP[15] = useK ? 1 + R * sk + R * ((G1[1] as number) + (G2[1] as number)) : 1;
    RPP[0] = -n0;
    RPP[1] = -n1;
    RPP[2] = -n2;
    RPP[3] = -n3;
    // Structured elimination: the plate block (rows 0–1) is diagonally dominant and row 2 has no plate terms,
    // so no pivoting is needed; pivoted elimination only if that degenerates.
    {
      const j00 = JPP[0] as number, j01 = JPP[1] as number, j02 = JPP[2] as number, j03 = JPP[3] as number;
      const m10 = (JPP[4] as number) / j00;
      const a11 = (JPP[5] as number) - m10 * j01;
      const a12 = (JPP[6] as number) - m10 * j02;
      const a13 = (JPP[7] as number) - m10 * j03;
      const b1 = -n1 + m10 * n0;
      const m30 = (JPP[12] as number) / j00;
      const a31 = (JPP[13] as number) - m30 * j01;
      const m31 = a31 / a11;
      const a32 = (JPP[14] as number) - m30 * j02 - m31 * a12;
      const a33 = (JPP[15] as number) - m30 * j03 - m31 * a13;
      const b3 = -n3 + m30 * n0 - m31 * b1;
      const j22 = JPP[10] as number, j23 = JPP[11] as number;
      const det = j22 * a33 - j23 * a32;
      const x2 = (-n2 * a33 - j23 * b3) / det;
      const x3 = (j22 * b3 + a32 * n2) / det;
      const x1 = (b1 - a12 * x2 - a13 * x3) / a11;
      const x0 = (-n0 - j01 * x1 - j02 * x2 - j03 * x3) / j00;
      if (Number.isFinite(x0) && Number.isFinite(x1) && Number.isFinite(x2) && Number.isFinite(x3)) {
        RPP[0] = x0;
        RPP[1] = x1;
        RPP[2] = x2;
        RPP[3] = x3;
      } else if (!solveDenseInPlace(4, JPP, RPP)) return null;
    }
    d1 = RPP[0] as number;
    d2 = RPP[1] as number;
    dt = useT ? (RPP[2] as number) : 0;
    dk = useK ? (RPP[3] as number) : 0;
    p1 = i1;
    p2 = i2;
    pt = t;
    pk = ik;
    lambda = 1;
    i1 = Math.max(0, i1 + d1);
    i2 = Math.max(0, i2 + d2);
    t = useT ? Math.max(0, t + dt) : 0;
    ik = useK ? Math.max(0, ik + dk) : 0;
    const tol = 1e-7;
    if (
      Math.abs(i1 - p1) <= tol * i1 + 1e-20 &&
      Math.abs(i2 - p2) <= tol * i2 + 1e-20 &&
      Math.abs(t - pt) <= tol * t + 1e-20 &&
      Math.abs(ik - pk) <= tol * ik + 1e-20
    ) {
      break;
    }
    if (iter === 39) return null;
  }
  const vk = kc + R * ik;
  const vg2 = pent ? v0 - sac * t : vk;
  return { i1, i2, ig2a, ig2b, ig1, ig2, v: (i1 - i2) * r, vk, vg2 };
}

/** One instant of the push-pull circuit; grid 2's drive is the antiphase of grid 1's unless given. */
function solvePP(net: PPNet, vin: number, m: PPMeans, guess?: PPSample, vin2 = -vin): PPSample {
  if (guess) {
    const r = newtonPP(net, vin, m, guess, vin2);
    if (r) return r;
    modelEvaluations.newtonFallbacks++;
  }
  return solvePPBracketed(net, vin, m, guess, vin2);
}

/** Quadratic extrapolation of the next push-pull sample (a Newton start). */
function extrapolatePP(a: PPSample, b?: PPSample, c?: PPSample): PPSample {
  if (!b) return a;
  if (!c) return { ...a, i1: 2 * a.i1 - b.i1, i2: 2 * a.i2 - b.i2, ig2a: 2 * a.ig2a - b.ig2a, ig2b: 2 * a.ig2b - b.ig2b, ig1: 2 * a.ig1 - b.ig1, ig2: 2 * a.ig2 - b.ig2 };
  const q = (x: number, y: number, z: number) => Math.max(0, 3 * x - 3 * y + z);
  return {
    ...a,
    i1: q(a.i1, b.i1, c.i1),
    i2: q(a.i2, b.i2, c.i2),
    ig2a: q(a.ig2a, b.ig2a, c.ig2a),
    ig2b: q(a.ig2b, b.ig2b, c.ig2b),
    ig1: q(a.ig1, b.ig1, c.ig1),
    ig2: q(a.ig2, b.ig2, c.ig2),
  };
}

/** The same instant half a period later: the drive is negated, so the two tubes swap roles. */
function mirrorPP(s: PPSample): PPSample {
  return { i1: s.i2, i2: s.i1, ig2a: s.ig2b, ig2b: s.ig2a, ig1: s.ig2, ig2: s.ig1, v: -s.v, vk: s.vk, vg2: s.vg2 };
}

function solvePPBracketed(net: PPNet, vin: number, m: PPMeans, guess?: PPSample, vin2 = -vin): PPSample {
  const c: PPCtx = { net, vin, vin2, m, i1: guess?.i1, i2: guess?.i2, v: guess?.v, ig2: guess ? guess.ig2a + guess.ig2b : undefined };
  const vkBase = net.rk * m.ik;
  if (net.rkAc === 0) return innerPP(c, vkBase);
  const g = guess ? totalPP(guess) : undefined;
  let hi = Math.max(2 * (g ?? 0), 1e-3);
  let ik = solveIncreasing((x) => x - totalPP(innerPP(c, vkBase + net.rkAc * (x - m.ik))), 0, hi, g, 1e-14);
  if (ik >= hi * (1 - 1e-12)) {
    hi = expandUpper((x) => x - totalPP(innerPP(c, vkBase + net.rkAc * (x - m.ik))), hi, 1e4) ?? hi;
    ik = solveIncreasing((x) => x - totalPP(innerPP(c, vkBase + net.rkAc * (x - m.ik))), 0, hi, undefined, 1e-14);
  }
  return innerPP(c, vkBase + net.rkAc * (ik - m.ik));
}

const dbOf = (ratio: number) => (ratio > 0 ? Math.max(-200, 20 * Math.log10(ratio)) : -200);

export function analyzePushPullOutput(input: PushPullOutputInput, options?: AnalyzeOptions): StageAnalysis {
  const quick = options?.quick === true;
  const model = tubeModel(input.tube);
  if (model.kind === 'pentode' && !input.screen) {
    throw new CalcError('invalid-input', 'A pentode or beam tetrode needs a screen supply.');
  }
  const warnings: string[] = [];
  const halfRdc = input.primaryResistance / 2;
  const xf = input.transformer;
  const nominalRaa = input.plateToPlateImpedance;
  // the secondary's resistance, referred to the primary, is in series with the reflected speaker load
  const raa = nominalRaa + (xf ? turnsRatio({ primaryImpedance: nominalRaa, speakerLoad: xf.speakerLoad }) ** 2 * (xf.secondaryResistance ?? 0) : 0);
  const fixed = input.bias.kind === 'fixed';
  const rk = input.bias.kind === 'cathode' ? input.bias.cathodeResistor : 0;
  const bypassed = input.bias.kind === 'cathode' && input.bias.cathodeBypass !== null;
  const screen = model.kind === 'pentode' && input.screen ? screenParts(input.screen, input.supply).net : null;
  const gridBias = input.bias.kind === 'fixed' ? input.bias.fixedBias : 0;

  // Idle: v = 0 by symmetry, and a resistor shared by two equal tubes acts as twice its value on one.
  const op = solveNetwork(
    {
      model,
      supply: input.supply,
      plateDc: halfRdc,
      plateAc: halfRdc,
      cathodeDc: 2 * rk,
      cathodeAc: 2 * rk,
      gridOffset: gridBias,
      gridPerCathodeCurrent: 0,
      screen: screen ? { supply: screen.supply, dc: 2 * screen.dc, ac: 2 * screen.dc } : null,
      output: 'plate',
    },
    0,
    null,
  );
  checkIdle(op, input.supply);
  const opPoint = operatingPointOf(op, model);
  if (options?.operatingPointOnly) return operatingPointAnalysis(input.topology, opPoint, [opPoint, { ...opPoint }]);
  const net: PPNet = { model, supply: input.supply, halfRdc, raa, gridBias, rk, rkAc: bypassed ? 0 : rk, screen };
  const m0: PPMeans = { ik: 2 * op.ik, ig2: 2 * op.ig2 };
  // idle push-pull state: both tubes at the single-tube idle point (a Newton start)
  const idle: PPSample = { i1: op.ia, i2: op.ia, ig2a: op.ig2, ig2b: op.ig2, ig1: 0, ig2: 0, v: 0, vk: op.vk, vg2: op.vg2 };
  const seed = solvePP(net, 0, m0, idle);
  const vak0 = opPoint.plateCathodeVoltage;
  const d = tubeDerivatives(model, vak0, opPoint.gridCathodeVoltage, op.vg2 - op.vk);

  const h = 1e-3;
  const up = solvePP(net, h, m0, seed);
  const dn = solvePP(net, -h, m0, seed);
  const gain = (2 * up.v - 2 * dn.v) / (2 * h);
  const plate1 = (s: PPSample) => input.supply - halfRdc * s.i1 - s.v;
  const aPlate = (plate1(up) - plate1(dn)) / (2 * h);
  const aCathode = (up.vk - dn.vk) / (2 * h);
  const caps = model.capacitances;
  const cin = Math.max(0, caps.cga * (1 - aPlate) + caps.cgk * (1 - aCathode));
  const zOut = 2 * d.ra + input.primaryResistance;
  // response: the antisymmetric half circuit solved as a network (cathode and screen at AC ground)
  const ac = pushPullHalfAc(model, op, input.sourceResistance, input.gridResistor, halfRdc, raa);

  const keys: Array<keyof PPMeans> = [];
  if (bypassed) keys.push('ik');
  if (screen && screen.ac !== screen.dc) keys.push('ig2');
  const cycleAt = (amp: number, count = SAMPLES, from?: PPMeans) => {
    const drive = sineDrive(amp, count);
    const coarseDrive = new Map<number, number[]>();
    // last solved cycle per sample count: warm start for the next (see single-tube.ts)
    const lastCycle = new Map<number, PPSample[]>();
    const guess: PPSample = { ...seed };
    return steadyState<PPMeans, PPSample[]>(keys, m0, (m, n) => {
      // Half-wave symmetry: the drive at k + N/2 is the negated drive at k, and the circuit is symmetric, so the
      // second half-cycle is the first with the tubes swapped; only N/2 samples are solved.
      let wave = drive;
      if (n) {
        wave = coarseDrive.get(n) ?? sineDrive(amp, n);
        coarseDrive.set(n, wave);
      }
      const count = wave.length;
      const half = count / 2;
      const old = lastCycle.get(count);
      const samples: PPSample[] = new Array<PPSample>(count);
      let ik = 0;
      let ig2 = 0;
      for (let k = 0; k < half; k++) {
        let start: PPSample;
        if (old) {
          const o = old[k] as PPSample;
          if (k === 0) start = o;
          else {
            // previous cycle + the (extrapolated) change since it
            const a = samples[k - 1] as PPSample;
            const b = old[k - 1] as PPSample;
            if (k >= 3) {
              const a2 = samples[k - 2] as PPSample;
              const b2 = old[k - 2] as PPSample;
              const a3 = samples[k - 3] as PPSample;
              const b3 = old[k - 3] as PPSample;
              guess.i1 = o.i1 + q3(a.i1 - b.i1, a2.i1 - b2.i1, a3.i1 - b3.i1);
              guess.i2 = o.i2 + q3(a.i2 - b.i2, a2.i2 - b2.i2, a3.i2 - b3.i2);
              guess.ig2a = o.ig2a + q3(a.ig2a - b.ig2a, a2.ig2a - b2.ig2a, a3.ig2a - b3.ig2a);
              guess.ig2b = o.ig2b + q3(a.ig2b - b.ig2b, a2.ig2b - b2.ig2b, a3.ig2b - b3.ig2b);
              guess.ig1 = o.ig1 + q3(a.ig1 - b.ig1, a2.ig1 - b2.ig1, a3.ig1 - b3.ig1);
              guess.ig2 = o.ig2 + q3(a.ig2 - b.ig2, a2.ig2 - b2.ig2, a3.ig2 - b3.ig2);
            } else {
              guess.i1 = o.i1 + a.i1 - b.i1;
              guess.i2 = o.i2 + a.i2 - b.i2;
              guess.ig2a = o.ig2a + a.ig2a - b.ig2a;
              guess.ig2b = o.ig2b + a.ig2b - b.ig2b;
              guess.ig1 = o.ig1 + a.ig1 - b.ig1;
              guess.ig2 = o.ig2 + a.ig2 - b.ig2;
            }
            start = guess;
          }
        } else if (k >= 5) {
          const a1 = samples[k - 1] as PPSample;
          const a2 = samples[k - 2] as PPSample;
          const a3 = samples[k - 3] as PPSample;
          const a4 = samples[k - 4] as PPSample;
          const a5 = samples[k - 5] as PPSample;
          guess.i1 = Math.max(0, q5(a1.i1, a2.i1, a3.i1, a4.i1, a5.i1));
          guess.i2 = Math.max(0, q5(a1.i2, a2.i2, a3.i2, a4.i2, a5.i2));
          guess.ig2a = Math.max(0, q5(a1.ig2a, a2.ig2a, a3.ig2a, a4.ig2a, a5.ig2a));
          guess.ig2b = Math.max(0, q5(a1.ig2b, a2.ig2b, a3.ig2b, a4.ig2b, a5.ig2b));
          guess.ig1 = Math.max(0, q5(a1.ig1, a2.ig1, a3.ig1, a4.ig1, a5.ig1));
          guess.ig2 = Math.max(0, q5(a1.ig2, a2.ig2, a3.ig2, a4.ig2, a5.ig2));
          start = guess;
        } else start = k === 0 ? seed : extrapolatePP(samples[k - 1] as PPSample, samples[k - 2], samples[k - 3]);
        const sk = solvePP(net, wave[k] ?? 0, m, start);
        samples[k] = sk;
        samples[k + half] = mirrorPP(sk);
        ik += totalPP(sk);
        ig2 += sk.ig2a + sk.ig2b;
      }
      lastCycle.set(count, samples);
      return { means: { ik: ik / half, ig2: ig2 / half }, result: samples };
    }, from, Math.max(16, count / 8));
  };
  const amp = input.drive.amplitude;
  const steady = cycleAt(amp, quick ? QUICK_SAMPLES : SAMPLES);
  const samples = steady.result;
  const out = samples.map((s) => 2 * s.v);
  const amps = harmonicAmplitudes(out, 10);
  const h1 = amps[1] ?? 0;
  const at = (vin: number) => 2 * solvePP(net, vin, m0, seed).v;
  const p5 = amp > 0 ? fivePoint(at(amp), at(amp / 2), 2 * seed.v, at(-amp / 2), at(-amp)) : null;
  const p3 = p5 ? threePoint(at(amp), 2 * seed.v, at(-amp)) : null;

  let last = seed;
  const scale = Math.max(0.5 * Math.abs(opPoint.gridCathodeVoltage), 0.05);
  const solve = (a: number) => (last = solvePP(net, a, m0, last));
  const criteria: Array<[HeadroomLimit, (a: number) => number]> = [
    ['grid-conduction', (a) => gridBias + a - solve(a).vk],
    ['plate-saturation', (a) => { const s = solve(a); return 0.15 * vak0 - (plate1(s) - s.vk); }],
  ];
  if (input.class === 'A') criteria.push(['cutoff', (a) => 0.01 * op.ia - solve(a).i2]);
  const best = nearestLimit<HeadroomLimit>(criteria, input.supply, scale);
  const swing = Math.abs(at(best[1]) - at(-best[1])) / 2;

  // dissipation is an average: a 64-sample cycle is ample
  // the means at the working drive are a closer start than the idle ones
  const full = best[1] > 0 ? cycleAt(best[1], 64, steady.means).result : samples;
  const fullDissipation = mean(full.map((s) => (plate1(s) - s.vk) * s.i1));
  if (input.class === 'A' && amp > 0 && Math.min(...samples.map((s) => s.i2)) < 0.01 * op.ia) {
    warnings.push('Declared class A, but each tube cuts off for part of the cycle at this drive (class AB operation).');
  }
  const maxVgk = Math.max(...samples.map((s) => gridBias + amp - s.vk));
  if (amp > 0 && maxVgk > 0) warnings.push(`The grids go ${maxVgk.toFixed(2)} V positive on peaks: grid current flows.`);
  if (amp > best[1] && best[0] !== 'none') {
    warnings.push(`The drive (${amp.toPrecision(3)} V) is beyond the headroom limit of ${best[1].toPrecision(3)} V (${best[0]}).`);
  }

  const ratings = checkRatings({
    ratings: model.ratings,
    derating: input.derating,
    plateCathodeVoltage: vak0,
    plateDissipation: opPoint.plateDissipation,
    fullDrivePlateDissipation: fullDissipation,
    screenCathodeVoltage: model.kind === 'pentode' ? op.vg2 - op.vk : null,
    screenDissipation: opPoint.screenDissipation,
    cathodeCurrent: Math.max(op.ik, steady.means.ik / 2),
    heaterCathodeVoltage: Math.abs(op.vk - input.heaterElevation),
    gridResistance: input.gridResistor,
    biasKind: fixed ? 'fixed' : 'cathode',
  });
  for (const r of ratings) if (r.status === 'over') warnings.push(`${r.label} exceeds the tube's rating.`);

  const stride = out.length / Math.min(128, out.length);
  const period = 1 / input.drive.frequency;
  const drive = sineDrive(amp, out.length);
  const waveform = { t: [] as number[], input: [] as number[], output: [] as number[] };
  for (let k = 0; k < out.length; k += stride) {
    waveform.t.push((k / out.length) * period);
    waveform.input.push(drive[k] ?? 0);
    waveform.output.push(out[k] ?? 0);
  }
  const transformer = xf
    ? analyzeTransformer(
        { primaryImpedance: nominalRaa, primaryResistance: input.primaryResistance, ...xf },
        zOut - input.primaryResistance,
        amp > 0 ? h1 / raa : null,
      )
    : undefined;
  return {
    ...(transformer ? { transformer } : {}),
    topology: input.topology,
    operatingPoint: opPoint,
    perTube: [opPoint, { ...opPoint }],
    smallSignal: {
      gm: d.gm,
      ra: d.ra,
      mu: d.mu,
      gain,
      gainDb: dbOf(Math.abs(gain)),
      outputImpedance: zOut,
      inputCapacitance: cin,
      lowCutoff: cutoffAc(ac.sys, ac.out, 'low'),
      highCutoff: cutoffAc(ac.sys, ac.out, 'high'),
      response: quick ? [] : responseCurveAc(ac.sys, ac.out),
    },
    largeSignal: {
      drive: amp,
      outputAmplitude: h1,
      harmonics: Array.from({ length: 9 }, (_, i) => {
        const a = amps[i + 2] ?? 0;
        return { order: i + 2, amplitude: a, db: dbOf(h1 > 0 ? a / h1 : 0) };
      }),
      thdPercent: amp > 0 ? 100 * thdFromAmplitudes(amps, 10) : 0,
      thd3PointPercent: p3 ? 100 * p3.thd : 0,
      thd5PointPercent: p5 ? 100 * p5.thd : 0,
      dcShift: mean(samples.map((s) => s.i1 + s.i2)) - 2 * op.ia,
      // into the speaker: the reflected secondary resistance takes its share
      outputPower: (h1 * h1 * nominalRaa) / (2 * raa * raa),
      headroom: { maxDrive: best[1], limitedBy: best[0], outputSwing: swing },
      waveform,
    },
    ratings,
    plot: quick ? { ...EMPTY_PLOT, operatingPoint: { va: opPoint.plateCathodeVoltage, ia: opPoint.plateCurrent } } : stagePlot(model, opPoint, halfRdc + 2 * rk, raa / 4, input.supply, input.tube),
    warnings,
  };
}

/**
 * The linearised push-pull pair for the response: with antiphase drive the shared cathode and screen nodes carry
 * no signal, so one tube with Rdc/2 and Raa/2 to AC ground stands for the pair; the plate-to-plate output is
 * −2× the voltage across that Raa/2.
 */
export function pushPullHalfAc(
  model: TubeModel,
  op: { vp: number; vk: number; vg: number; vg2: number },
  sourceResistance: number,
  gridResistor: number,
  halfRdc: number,
  raa: number,
): { sys: AcSystem; out: AcOutput } {
  let n = 0;
  const el: AcElement[] = [];
  const grid: AcRef = sourceResistance > 0 ? n++ : SOURCE;
  if (sourceResistance > 0) el.push({ kind: 'r', a: SOURCE, b: grid, r: sourceResistance }, { kind: 'r', a: grid, b: GROUND, r: gridResistor });
  const plate = n++;
  const half: AcRef = halfRdc > 0 ? n++ : plate;
  if (halfRdc > 0) el.push({ kind: 'r', a: plate, b: half, r: halfRdc });
  el.push({ kind: 'r', a: half, b: GROUND, r: raa / 2 });
  const d = linearise(model, op.vp - op.vk, op.vg - op.vk, op.vg2 - op.vk);
  el.push(...tubeElements({ p: plate, g: grid, k: GROUND, s: model.kind === 'pentode' ? GROUND : undefined }, d, model.capacitances));
  return { sys: compileAc({ n, elements: el }), out: { node: half, scale: -2 } };
}

/** Drive of each grid over one cycle (V relative to the grid bias), equal lengths, a power of two ≥ 16. */
export type PushPullGridDrives = { grid1: ArrayLike<number>; grid2: ArrayLike<number> };

/** Two sine drives given by amplitude (V peak) and phase (degrees) per grid, sampled over one cycle. */
export function sineGridDrives(
  grid1: { amplitude: number; phaseDeg: number },
  grid2: { amplitude: number; phaseDeg: number },
  samples = SAMPLES,
): PushPullGridDrives {
  const wave = (d: { amplitude: number; phaseDeg: number }) =>
    Float64Array.from({ length: samples }, (_, k) => d.amplitude * Math.sin((2 * Math.PI * k) / samples + (d.phaseDeg * Math.PI) / 180));
  return { grid1: wave(grid1), grid2: wave(grid2) };
}

export type PushPullDrivenResult = {
  /** plate-to-plate voltage (the reflected load's) per sample, its fundamental and THD */
  output: number[];
  outputAmplitude: number;
  thdPercent: number;
  harmonics: { order: number; amplitude: number; db: number }[];
  /** power into the plate-to-plate load (the reflected speaker load), W */
  outputPower: number;
  /** per sample: plate currents and grid currents of each tube (A), cathode voltage (V) */
  plateCurrent1: number[];
  plateCurrent2: number[];
  gridCurrent1: number[];
  gridCurrent2: number[];
  cathodeVoltage: number[];
  /** cycle means the bypass capacitors settled at (total cathode current, total screen current), A */
  means: { cathodeCurrent: number; screenCurrent: number };
  /** change of the average plate current of both tubes from idle, A */
  dcShift: number;
  /** largest grid-to-cathode voltage of either tube over the cycle, V (positive: grid current flows) */
  maxGridCathodeVoltage: number;
  /** idle operating point of each tube */
  idle: OperatingPoint;
};

/**
 * The push-pull pair driven by two separate grid waveforms (a phase splitter's real outputs, with their imbalance
 * and distortion), instead of the ideal antiphase drive of `analyzePushPullOutput`. The whole cycle is solved (no
 * half-wave symmetry) with the bypass capacitors at their steady state. `input.drive` is ignored.
 */
export function analyzePushPullDriven(input: PushPullOutputInput, drives: PushPullGridDrives): PushPullDrivenResult {
  const n = drives.grid1.length;
  if (n !== drives.grid2.length || n < 16 || (n & (n - 1)) !== 0) {
    throw new CalcError('invalid-input', 'The two grid drives must have the same length, a power of two of at least 16 samples.');
  }
  const model = tubeModel(input.tube);
  if (model.kind === 'pentode' && !input.screen) throw new CalcError('invalid-input', 'A pentode or beam tetrode needs a screen supply.');
  const halfRdc = input.primaryResistance / 2;
  const xf = input.transformer;
  const nominalRaa = input.plateToPlateImpedance;
  const raa = nominalRaa + (xf ? turnsRatio({ primaryImpedance: nominalRaa, speakerLoad: xf.speakerLoad }) ** 2 * (xf.secondaryResistance ?? 0) : 0);
  const rk = input.bias.kind === 'cathode' ? input.bias.cathodeResistor : 0;
  const bypassed = input.bias.kind === 'cathode' && input.bias.cathodeBypass !== null;
  const screen = model.kind === 'pentode' && input.screen ? screenParts(input.screen, input.supply).net : null;
  const gridBias = input.bias.kind === 'fixed' ? input.bias.fixedBias : 0;
  const op = solveNetwork(
    {
      model,
      supply: input.supply,
      plateDc: halfRdc,
      plateAc: halfRdc,
      cathodeDc: 2 * rk,
      cathodeAc: 2 * rk,
      gridOffset: gridBias,
      gridPerCathodeCurrent: 0,
      screen: screen ? { supply: screen.supply, dc: 2 * screen.dc, ac: 2 * screen.dc } : null,
      output: 'plate',
    },
    0,
    null,
  );
  checkIdle(op, input.supply);
  const net: PPNet = { model, supply: input.supply, halfRdc, raa, gridBias, rk, rkAc: bypassed ? 0 : rk, screen };
  const m0: PPMeans = { ik: 2 * op.ik, ig2: 2 * op.ig2 };
  const idleState: PPSample = { i1: op.ia, i2: op.ia, ig2a: op.ig2, ig2b: op.ig2, ig1: 0, ig2: 0, v: 0, vk: op.vk, vg2: op.vg2 };
  const seed = solvePP(net, 0, m0, idleState);
  const keys: Array<keyof PPMeans> = [];
  if (bypassed) keys.push('ik');
  if (screen && screen.ac !== screen.dc) keys.push('ig2');
  const g1 = Array.from(drives.grid1);
  const g2 = Array.from(drives.grid2);
  // coarse cycles take every k-th sample of the given drives
  const sub = (w: number[], count: number) => Array.from({ length: count }, (_, k) => w[(k * w.length) / count] as number);
  const lastCycle = new Map<number, PPSample[]>();
  const steady = steadyState<PPMeans, PPSample[]>(
    keys,
    m0,
    (m, count) => {
      const c = count ?? n;
      const w1 = c === n ? g1 : sub(g1, c);
      const w2 = c === n ? g2 : sub(g2, c);
      const old = lastCycle.get(c);
      const samples = new Array<PPSample>(c);
      let ik = 0;
      let ig2 = 0;
      for (let k = 0; k < c; k++) {
        const start = old ? (old[k] as PPSample) : k === 0 ? seed : extrapolatePP(samples[k - 1] as PPSample, samples[k - 2], samples[k - 3]);
        const sk = solvePP(net, w1[k] ?? 0, m, start, w2[k] ?? 0);
        samples[k] = sk;
        ik += totalPP(sk);
        ig2 += sk.ig2a + sk.ig2b;
      }
      lastCycle.set(c, samples);
      return { means: { ik: ik / c, ig2: ig2 / c }, result: samples };
    },
    undefined,
    Math.max(16, n / 8),
  );
  const samples = steady.result;
  const output = samples.map((s) => 2 * s.v);
  const amps = harmonicAmplitudes(output, 10);
  const h1 = amps[1] ?? 0;
  return {
    output,
    outputAmplitude: h1,
    thdPercent: 100 * thdFromAmplitudes(amps, 10),
    harmonics: Array.from({ length: 9 }, (_, i) => {
      const a = amps[i + 2] ?? 0;
      return { order: i + 2, amplitude: a, db: dbOf(h1 > 0 ? a / h1 : 0) };
    }),
    outputPower: (h1 * h1) / (2 * raa),
    plateCurrent1: samples.map((s) => s.i1),
    plateCurrent2: samples.map((s) => s.i2),
    gridCurrent1: samples.map((s) => s.ig1),
    gridCurrent2: samples.map((s) => s.ig2),
    cathodeVoltage: samples.map((s) => s.vk),
    means: { cathodeCurrent: steady.means.ik, screenCurrent: steady.means.ig2 },
    dcShift: mean(samples.map((s) => s.i1 + s.i2)) - 2 * op.ia,
    maxGridCathodeVoltage: Math.max(...samples.map((s, k) => Math.max(gridBias + (g1[k] ?? 0) - s.vk, gridBias + (g2[k] ?? 0) - s.vk))),
    idle: operatingPointOf(op, model),
  };
}
