import type { PushPullOutputInput } from '../../validation/stage';
import { fivePoint, harmonicAmplitudes, thdFromAmplitudes, threePoint } from '../distortion';
import { CalcError } from '../errors';
import { tubeDerivatives, tubeModel, type TubeModel } from '../models/registry';
import { checkRatings } from '../ratings';
import { cutoff, firstOrderLowPass, responseCurve, type ResponseFactor } from '../response';
import { expandUpper, solveIncreasing } from '../solve';
import type { HeadroomLimit, StageAnalysis } from '../types';
import { firstCrossing, mean, SAMPLES_PER_CYCLE as SAMPLES, sineDrive, steadyState } from './cycle';
import { solveNetwork } from './network';
import { screenParts } from './pentode-amplifier';
import { checkIdle, operatingPointOf, stagePlot } from './single-tube';

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

type PPCtx = { net: PPNet; vin: number; m: PPMeans; i1: number | undefined; i2: number | undefined; v: number | undefined; ig2: number | undefined };

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
  const vgk2 = net.gridBias - vin - vk;
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

function solvePP(net: PPNet, vin: number, m: PPMeans, guess?: PPSample): PPSample {
  const c: PPCtx = { net, vin, m, i1: guess?.i1, i2: guess?.i2, v: guess?.v, ig2: guess ? guess.ig2a + guess.ig2b : undefined };
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

export function analyzePushPullOutput(input: PushPullOutputInput): StageAnalysis {
  const model = tubeModel(input.tube);
  if (model.kind === 'pentode' && !input.screen) {
    throw new CalcError('invalid-input', 'A pentode or beam tetrode needs a screen supply.');
  }
  const warnings: string[] = [];
  const halfRdc = input.primaryResistance / 2;
  const raa = input.plateToPlateImpedance;
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
  const net: PPNet = { model, supply: input.supply, halfRdc, raa, gridBias, rk, rkAc: bypassed ? 0 : rk, screen };
  const m0: PPMeans = { ik: 2 * op.ik, ig2: 2 * op.ig2 };
  const seed = solvePP(net, 0, m0);
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
  const factors: ResponseFactor[] = [];
  const rs = input.sourceResistance > 0 ? (input.sourceResistance * input.gridResistor) / (input.sourceResistance + input.gridResistor) : 0;
  if (rs > 0 && cin > 0) factors.push(firstOrderLowPass(rs * cin));
  const cout = (caps.cak + caps.cga) / 2;
  if (cout > 0) factors.push(firstOrderLowPass(((zOut * raa) / (zOut + raa)) * cout));

  const keys: Array<keyof PPMeans> = [];
  if (bypassed) keys.push('ik');
  if (screen && screen.ac !== screen.dc) keys.push('ig2');
  const cycleAt = (amp: number, count = SAMPLES) => {
    const drive = sineDrive(amp, count);
    return steadyState<PPMeans, PPSample[]>(keys, m0, (m, n) => {
      const samples: PPSample[] = [];
      let prev = seed;
      for (const vin of n ? sineDrive(amp, n) : drive) {
        prev = solvePP(net, vin, m, prev);
        samples.push(prev);
      }
      return {
        means: {
          ik: mean(samples.map((s) => s.i1 + s.i2 + s.ig2a + s.ig2b + s.ig1 + s.ig2)),
          ig2: mean(samples.map((s) => s.ig2a + s.ig2b)),
        },
        result: samples,
      };
    });
  };
  const amp = input.drive.amplitude;
  const steady = cycleAt(amp);
  const samples = steady.result;
  const out = samples.map((s) => 2 * s.v);
  const amps = harmonicAmplitudes(out, 10);
  const h1 = amps[1] ?? 0;
  const at = (vin: number) => 2 * solvePP(net, vin, m0, seed).v;
  const p5 = amp > 0 ? fivePoint(at(amp), at(amp / 2), 2 * seed.v, at(-amp / 2), at(-amp)) : null;
  const p3 = p5 ? threePoint(at(amp), 2 * seed.v, at(-amp)) : null;

  let last = seed;
  const solve = (a: number) => (last = solvePP(net, a, m0, last));
  const candidates: Array<[HeadroomLimit, number | null]> = [
    ['grid-conduction', firstCrossing((a) => gridBias + a - solve(a).vk, input.supply)],
    ['plate-saturation', firstCrossing((a) => { const s = solve(a); return 0.15 * vak0 - (plate1(s) - s.vk); }, input.supply)],
  ];
  if (input.class === 'A') candidates.push(['cutoff', firstCrossing((a) => 0.01 * op.ia - solve(a).i2, input.supply)]);
  let best: [HeadroomLimit, number] = ['none', input.supply];
  for (const [name, value] of candidates) if (value !== null && value < best[1]) best = [name, value];
  const swing = Math.abs(at(best[1]) - at(-best[1])) / 2;

  // dissipation is an average: a 64-sample cycle is ample
  const full = best[1] > 0 ? cycleAt(best[1], 64).result : samples;
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

  const stride = out.length / 128;
  const period = 1 / input.drive.frequency;
  const drive = sineDrive(amp);
  const waveform = { t: [] as number[], input: [] as number[], output: [] as number[] };
  for (let k = 0; k < out.length; k += stride) {
    waveform.t.push((k / out.length) * period);
    waveform.input.push(drive[k] ?? 0);
    waveform.output.push(out[k] ?? 0);
  }
  return {
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
      lowCutoff: cutoff(factors, 'low'),
      highCutoff: cutoff(factors, 'high'),
      response: responseCurve(gain, factors),
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
      outputPower: (h1 * h1) / (2 * raa),
      headroom: { maxDrive: best[1], limitedBy: best[0], outputSwing: swing },
      waveform,
    },
    ratings,
    plot: stagePlot(model, opPoint, halfRdc + 2 * rk, raa / 4, input.supply, input.tube),
    warnings,
  };
}
