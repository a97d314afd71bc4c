import type { Tube } from '../input';
import { harmonicAmplitudes, fivePoint, thdFromAmplitudes, threePoint } from '../distortion';
import { CalcError } from '../errors';
import { tubeDerivatives, type TubeModel } from '../models/registry';
import { loadLine, paMaxCurve, plateCurveFamily, transferCurve } from '../plot';
import { checkRatings } from '../ratings';
import { cutoffAc, responseCurveAc } from '../ac';
import { singleTubeAc } from './ac-networks';
import type { HeadroomLimit, LargeSignal, OperatingPoint, StageAnalysis, StagePlot } from '../types';
import { mean, nearestLimit, SAMPLES_PER_CYCLE, sineDrive, steadyState } from './cycle';
import { activeMeans, extrapolate, outputVoltage, solveNetwork, type Means, type SampleState, type SingleTubeNetwork } from './network';

export type CommonStageFields = {
  supply: number;
  gridResistor: number;
  sourceResistance: number;
  heaterElevation: number;
  drive: { amplitude: number; frequency: number };
  derating: number;
};

export type SingleTubeSpec = {
  topology: string;
  tube: Tube;
  model: TubeModel;
  net: SingleTubeNetwork;
  input: CommonStageFields;
  biasKind: 'fixed' | 'cathode';
  cathodeBypass: { resistor: number; capacitor: number } | null;
  screenBypass: { resistor: number; capacitor: number } | null;
  coupling: { capacitor: number; resistance: number } | null;
  /** resistance across the output besides the tube and the external load (Ra, or Rk for a follower) */
  outputShunt: number | null;
  /** reflected load of an output transformer (power is delivered into it) */
  transformerLoad: number | null;
  warnings: string[];
  options?: AnalyzeOptions;
};

/**
 * Cheaper analysis for many-trial runs (tolerance runs, part searches): `quick` skips the plot data and the
 * frequency response (no response curve; the cut-off frequencies of single-tube stages are null) and solves the
 * drive cycle on 32 samples instead of 256 (harmonics 2–10 stay below the 16th-harmonic Nyquist limit).
 */
export type AnalyzeOptions = {
  quick?: boolean;
  /** only the idle operating point (for supply solutions that need the stages' currents): every other result is zero or empty */
  operatingPointOnly?: boolean;
};

/** The analysis shape with only the operating point filled in (`operatingPointOnly`). */
export function operatingPointAnalysis(topology: string, op: OperatingPoint, perTube: OperatingPoint[]): StageAnalysis {
  return {
    topology,
    operatingPoint: op,
    perTube,
    smallSignal: { gm: 0, ra: 0, mu: 0, gain: 0, gainDb: 0, outputImpedance: 0, inputCapacitance: 0, lowCutoff: null, highCutoff: null, response: [] },
    largeSignal: { drive: 0, outputAmplitude: 0, harmonics: [], thdPercent: 0, thd3PointPercent: 0, thd5PointPercent: 0, dcShift: 0, outputPower: null, headroom: { maxDrive: 0, limitedBy: 'none', outputSwing: 0 }, waveform: { t: [], input: [], output: [] } },
    ratings: [],
    plot: { ...EMPTY_PLOT, operatingPoint: { va: op.plateCathodeVoltage, ia: op.plateCurrent } },
    warnings: [],
  };
}
export const QUICK_SAMPLES = 32;
export const EMPTY_PLOT: StagePlot = { dcLoadLine: [], acLoadLine: [], operatingPoint: { va: 0, ia: 0 }, paMax: [], curves: [], transfer: [], screenVoltage: null };

const finite = (x: number, fallback = 0) => (Number.isFinite(x) ? x : fallback);
const dbOf = (ratio: number) => (ratio > 0 ? Math.max(-200, 20 * Math.log10(ratio)) : -200);

export function operatingPointOf(s: SampleState, model: TubeModel): OperatingPoint {
  const pentode = model.kind === 'pentode';
  return {
    plateVoltage: s.vp,
    plateCathodeVoltage: s.vp - s.vk,
    plateCurrent: s.ia,
    gridCathodeVoltage: s.vg - s.vk,
    gridVoltage: s.vg,
    cathodeVoltage: s.vk,
    cathodeCurrent: s.ik,
    screenVoltage: pentode ? s.vg2 : null,
    screenCurrent: pentode ? s.ig2 : null,
    plateDissipation: (s.vp - s.vk) * s.ia,
    screenDissipation: pentode ? (s.vg2 - s.vk) * s.ig2 : null,
  };
}

export function checkIdle(op: SampleState, supply: number): void {
  const values = [op.ia, op.vp, op.vk, op.vg, op.vg2, op.ig2];
  if (!values.every(Number.isFinite)) throw new CalcError('no-solution', 'The operating point could not be solved for these values.');
  if (op.vg - op.vk > 1e-3) {
    throw new CalcError(
      'grid-conduction',
      `The grid is ${(op.vg - op.vk).toFixed(2)} V positive of the cathode at idle, so grid current flows. Make the bias more negative.`,
    );
  }
  if (op.ia < 1e-9 * Math.max(1, supply / 100)) {
    throw new CalcError('cutoff', 'The tube is cut off at idle: no plate current flows. Reduce the bias or raise the supply.');
  }
}

function gainOf(net: SingleTubeNetwork, m: Means, guess: SampleState, h = 1e-3) {
  const up = solveNetwork(net, h, m, 0, guess);
  const dn = solveNetwork(net, -h, m, 0, guess);
  return {
    out: (outputVoltage(net, up) - outputVoltage(net, dn)) / (2 * h),
    plate: (up.vp - dn.vp) / (2 * h),
    cathode: (up.vk - dn.vk) / (2 * h),
  };
}

function outputImpedance(net: SingleTubeNetwork, m: Means, guess: SampleState): number {
  const rNode = net.output === 'plate' ? net.plateAc : net.cathodeAc;
  const delta = 1e-3 / Math.max(rNode, 1);
  const up = solveNetwork(net, 0, m, delta, guess);
  const dn = solveNetwork(net, 0, m, -delta, guess);
  const zSeen = (outputVoltage(net, up) - outputVoltage(net, dn)) / (2 * delta);
  // tube alone: remove the network's own resistance from the parallel combination
  const g = 1 / zSeen - 1 / rNode;
  return g > 1e-12 ? 1 / g : 1e12;
}

type CycleResult = { samples: SampleState[]; out: number[] };

/** Quadratic and quartic extrapolation one step ahead from the last 3 / 5 values (newest first). */
export const q3 = (a: number, b: number, c: number) => 3 * a - 3 * b + c;
export const q5 = (a: number, b: number, c: number, d: number, e: number) => 5 * a - 10 * b + 10 * c - 5 * d + e;

export function analyzeSingleTube(spec: SingleTubeSpec): StageAnalysis {
  const { net, model, input } = spec;
  const warnings = [...spec.warnings];
  const op = solveNetwork(net, 0, null);
  checkIdle(op, input.supply);
  const m0: Means = { ia: op.ia, ig2: op.ig2, ik: op.ik };
  const opPoint = operatingPointOf(op, model);
  if (spec.options?.operatingPointOnly) return operatingPointAnalysis(spec.topology, opPoint, [opPoint]);
  const vak0 = opPoint.plateCathodeVoltage;
  const vgk0 = opPoint.gridCathodeVoltage;
  const vg2k0 = op.vg2 - op.vk;

  // small signal
  const d = tubeDerivatives(model, vak0, vgk0, vg2k0);
  const g = gainOf(net, m0, op);
  const gain = finite(g.out);
  const zTube = outputImpedance(net, m0, op);
  const zOut = spec.outputShunt !== null ? (spec.outputShunt * zTube) / (spec.outputShunt + zTube) : zTube;
  const caps = model.capacitances;
  const cin = Math.max(0, caps.cga * (1 - g.plate) + caps.cgk * (1 - g.cathode));
  // frequency response: the linearised network solved as a whole at each frequency, from the source EMF
  const ac = spec.options?.quick === true ? null : singleTubeAc(spec, op);

  // large signal
  const amp = input.drive.amplitude;
  const quick = spec.options?.quick === true;
  const drive = sineDrive(amp, quick ? QUICK_SAMPLES : undefined);
  const coarseDrive = new Map<number, number[]>();
  // Last solved cycle per sample count: the next cycle (slightly different means) starts each sample from it,
  // shifted by how far the previous sample moved between the two cycles.
  const lastCycle = new Map<number, SampleState[]>();
  const guess: SampleState = { ...op };
  const runCycle = (m: Means, count?: number) => {
    let wave = drive;
    if (count) {
      wave = coarseDrive.get(count) ?? sineDrive(amp, count);
      coarseDrive.set(count, wave);
    }
    const n = wave.length;
    const old = lastCycle.get(n);
    const samples: SampleState[] = new Array<SampleState>(n);
    let ia = 0;
    let ig2 = 0;
    let ik = 0;
    for (let k = 0; k < n; k++) {
      const vin = wave[k] ?? 0;
      let start: SampleState;
      if (old) {
        const o = old[k] as SampleState;
        if (k === 0) start = o;
        else {
          // previous cycle + the (extrapolated) change since it, which varies slowly along the cycle
          const a = samples[k - 1] as SampleState;
          const b = old[k - 1] as SampleState;
          if (k >= 3) {
            const a2 = samples[k - 2] as SampleState;
            const b2 = old[k - 2] as SampleState;
            const a3 = samples[k - 3] as SampleState;
            const b3 = old[k - 3] as SampleState;
            guess.ia = o.ia + q3(a.ia - b.ia, a2.ia - b2.ia, a3.ia - b3.ia);
            guess.ig2 = o.ig2 + q3(a.ig2 - b.ig2, a2.ig2 - b2.ig2, a3.ig2 - b3.ig2);
            guess.ik = o.ik + q3(a.ik - b.ik, a2.ik - b2.ik, a3.ik - b3.ik);
          } else {
            guess.ia = o.ia + a.ia - b.ia;
            guess.ig2 = o.ig2 + a.ig2 - b.ig2;
            guess.ik = o.ik + a.ik - b.ik;
          }
          start = guess;
        }
      } else if (k >= 5) {
        // quartic extrapolation along the (smooth) waveform
        const a1 = samples[k - 1] as SampleState;
        const a2 = samples[k - 2] as SampleState;
        const a3 = samples[k - 3] as SampleState;
        const a4 = samples[k - 4] as SampleState;
        const a5 = samples[k - 5] as SampleState;
        guess.ia = Math.max(0, q5(a1.ia, a2.ia, a3.ia, a4.ia, a5.ia));
        guess.ig2 = Math.max(0, q5(a1.ig2, a2.ig2, a3.ig2, a4.ig2, a5.ig2));
        guess.ik = Math.max(0, q5(a1.ik, a2.ik, a3.ik, a4.ik, a5.ik));
        start = guess;
      } else start = k === 0 ? op : extrapolate(samples[k - 1] as SampleState, samples[k - 2], samples[k - 3]);
      const prev = solveNetwork(net, vin, m, 0, start);
      samples[k] = prev;
      ia += prev.ia;
      ig2 += prev.ig2;
      ik += prev.ik;
    }
    lastCycle.set(n, samples);
    return { means: { ia: ia / n, ig2: ig2 / n, ik: ik / n }, result: { samples, out: samples.map((s) => outputVoltage(net, s)) } as CycleResult };
  };
  const steady = amp > 0 ? steadyState<Means, CycleResult>(activeMeans(net), m0, runCycle, undefined, quick ? 16 : undefined) : runCycle(m0);
  const { samples, out } = steady.result;
  const amps = harmonicAmplitudes(out, 10);
  const h1 = amps[1] ?? 0;
  const harmonics = [];
  for (let order = 2; order <= 10; order++) {
    const a = amps[order] ?? 0;
    harmonics.push({ order, amplitude: a, db: dbOf(h1 > 0 ? a / h1 : 0) });
  }
  const thd = amp > 0 ? thdFromAmplitudes(amps, 10) : 0;
  const at = (vin: number) => outputVoltage(net, solveNetwork(net, vin, m0, 0, op));
  const p5 = amp > 0 ? fivePoint(at(amp), at(amp / 2), outputVoltage(net, op), at(-amp / 2), at(-amp)) : null;
  const p3 = p5 ? threePoint(at(amp), outputVoltage(net, op), at(-amp)) : null;
  const maxVgk = Math.max(...samples.map((s) => s.vg - s.vk));
  const minIa = Math.min(...samples.map((s) => s.ia));
  if (amp > 0 && maxVgk > 0) warnings.push(`The grid goes ${maxVgk.toFixed(2)} V positive on peaks: grid current flows and the source is loaded.`);
  if (amp > 0 && minIa < 0.01 * op.ia) warnings.push('The tube cuts off on negative peaks of the drive.');

  const headroom = headroomOf(net, m0, op, input.supply);
  let outputPower: number | null = null;
  if (spec.transformerLoad !== null) {
    const i1 = h1 / net.plateAc;
    outputPower = (spec.transformerLoad * i1 * i1) / 2;
  }
  const stride = drive.length / Math.min(128, drive.length);
  const period = 1 / input.drive.frequency;
  const outMean = mean(out);
  const waveform = { t: [] as number[], input: [] as number[], output: [] as number[] };
  for (let k = 0; k < drive.length; k += stride) {
    waveform.t.push((k / drive.length) * period);
    waveform.input.push(drive[k] ?? 0);
    waveform.output.push((out[k] ?? 0) - outMean);
  }
  const largeSignal: LargeSignal = {
    drive: amp,
    outputAmplitude: h1,
    harmonics,
    thdPercent: 100 * thd,
    thd3PointPercent: p3 ? 100 * p3.thd : 0,
    thd5PointPercent: p5 ? 100 * p5.thd : 0,
    dcShift: mean(samples.map((s) => s.ia)) - op.ia,
    outputPower,
    headroom,
    waveform,
  };

  const ratings = checkRatings({
    ratings: model.ratings,
    derating: input.derating,
    plateCathodeVoltage: vak0,
    plateDissipation: opPoint.plateDissipation,
    screenCathodeVoltage: model.kind === 'pentode' ? vg2k0 : null,
    screenDissipation: opPoint.screenDissipation,
    cathodeCurrent: Math.max(op.ik, steady.means.ik),
    heaterCathodeVoltage: Math.abs(op.vk - input.heaterElevation),
    gridResistance: input.gridResistor,
    biasKind: spec.biasKind,
  });
  for (const r of ratings) if (r.status === 'over') warnings.push(`${r.label} exceeds the tube's rating.`);
  if (amp > headroom.maxDrive && headroom.limitedBy !== 'none') {
    warnings.push(`The drive (${amp.toPrecision(3)} V) is beyond the headroom limit of ${headroom.maxDrive.toPrecision(3)} V (${headroom.limitedBy}).`);
  }

  const plot = quick ? { ...EMPTY_PLOT, operatingPoint: { va: vak0, ia: op.ia } } : stagePlot(model, opPoint, net.plateDc + net.cathodeDc, net.plateAc + net.cathodeAc, input.supply, spec.tube);
  return {
    topology: spec.topology,
    operatingPoint: opPoint,
    perTube: [opPoint],
    smallSignal: {
      gm: d.gm,
      ra: d.ra,
      mu: d.mu,
      gain,
      gainDb: dbOf(Math.abs(gain)),
      outputImpedance: finite(zOut, 1e12),
      inputCapacitance: cin,
      lowCutoff: ac ? cutoffAc(ac.sys, ac.out, 'low') : null,
      highCutoff: ac ? cutoffAc(ac.sys, ac.out, 'high') : null,
      response: ac ? responseCurveAc(ac.sys, ac.out) : [],
    },
    largeSignal,
    ratings,
    plot,
    warnings,
  };
}

function headroomOf(net: SingleTubeNetwork, m: Means, op: SampleState, supply: number) {
  // continuation: each search step starts from the state solved last, which is close to the next one
  let last = op;
  const solve = (vin: number) => (last = solveNetwork(net, vin, m, 0, last));
  const limit = supply;
  const vak0 = op.vp - op.vk;
  // searches walk out from about half the bias (the grid-conduction scale of a plate-loaded stage)
  const scale = Math.max(0.5 * Math.abs(op.vg - op.vk), 0.05);
  const best = nearestLimit<HeadroomLimit>(
    [
      ['grid-conduction', (a) => { const s = solve(a); return s.vg - s.vk; }],
      ['cutoff', (a) => 0.01 * op.ia - solve(-a).ia],
      ['plate-saturation', (a) => { const s = solve(a); return 0.15 * vak0 - (s.vp - s.vk); }],
    ],
    limit,
    scale,
  );
  const swing = Math.abs(outputVoltage(net, solve(best[1])) - outputVoltage(net, solve(-best[1]))) / 2;
  return { maxDrive: best[1], limitedBy: best[0], outputSwing: swing };
}

export function stagePlot(
  model: TubeModel,
  op: OperatingPoint,
  rDc: number,
  rAc: number,
  supply: number,
  tube: Tube,
): StagePlot {
  const va0 = op.plateCathodeVoltage;
  const ia0 = op.plateCurrent;
  const vaMax = Math.max(supply, 2.2 * va0) * 1.05;
  const vg2 = op.screenVoltage !== null ? op.screenVoltage - op.cathodeVoltage : undefined;
  const vgBias = op.gridCathodeVoltage;
  return {
    dcLoadLine: loadLine(va0, ia0, rDc),
    acLoadLine: loadLine(va0, ia0, rAc),
    operatingPoint: { va: va0, ia: ia0 },
    paMax: paMaxCurve(tube.ratings?.plateDissipation ?? 0, vaMax),
    curves: plateCurveFamily(model, { vaMax, biasGridVoltage: vgBias, screenVoltage: vg2 }),
    transfer: transferCurve(model, { plateVoltage: va0, screenVoltage: vg2, vgMin: Math.min(3 * vgBias, -1), vgMax: 0 }),
    screenVoltage: vg2 ?? null,
  };
}
