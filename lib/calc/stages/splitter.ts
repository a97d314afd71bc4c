import type { Tube } from '../input';
import { cutoffAc, responseAt, responseCurvesAc, type AcOutput, type AcSystem } from '../ac';
import { harmonicAmplitudes, thdFromAmplitudes } from '../distortion';
import { CalcError } from '../errors';
import { tubeDerivatives, type TubeModel } from '../models/registry';
import { checkRatings } from '../ratings';
import type { Balance, HeadroomLimit, OperatingPoint, OutputName, StageAnalysis, StageOutput } from '../types';
import { mean, nearestLimit, SAMPLES_PER_CYCLE, sineDrive, steadyState } from './cycle';
import { copyState, newNodalState, solveNodal, voltageOf, type NodalCircuit, type NodalState, type NodeRef } from './nodal';
import { EMPTY_PLOT, QUICK_SAMPLES, stagePlot, type AnalyzeOptions, type CommonStageFields } from './single-tube';

/**
 * Shared analysis of the phase splitters (long-tailed pair, split load): a nodal circuit with two outputs.
 *
 * The DC circuit has every capacitor open. The signal circuit ("held") has the same first unknown nodes, with
 * every capacitor replaced by a fixed node at its held voltage (a short at the signal frequency, charged by the
 * cycle's average currents, as in the one-tube stages): each held voltage is the cycle mean of a per-sample
 * quantity (`implied`), found by the same steady-state iteration. The driven grid is a fixed node at
 * base + drive.
 */
export type HeldVoltage = {
  key: string;
  slot: number;
  /** value at idle, from the DC solution */
  init: (dc: NodalCircuit, s: NodalState) => number;
  /** per-sample quantity whose cycle mean is the held voltage */
  implied: (c: NodalCircuit, s: NodalState) => number;
};

export type SplitterOutput = {
  name: OutputName;
  /** node in the held circuit (same index in the DC circuit) */
  node: NodeRef;
  /** the external load on this output, if any (excluded from its output impedance) */
  load: number | null;
};

export type SplitterTube = { index: number; p: NodeRef; g: NodeRef; k: NodeRef };

export type SplitterSpec = {
  topology: string;
  tube: Tube;
  model: TubeModel;
  input: CommonStageFields;
  dc: NodalCircuit;
  dcStart: Float64Array;
  held: NodalCircuit;
  heldVoltages: HeldVoltage[];
  /** fixed slot of the driven grid in the held circuit and its base value (from the held voltages or fixed) */
  driveSlot: number;
  driveBase: (m: Record<string, number>) => number;
  outputs: [SplitterOutput, SplitterOutput];
  /** tubes as in the DC circuit (index into its tube list) */
  tubes: SplitterTube[];
  /** linearised network at the idle state (DC circuit state) for the response and the balance */
  acNetwork: (dc: NodalCircuit, s: NodalState) => { sys: AcSystem; outs: [AcOutput, AcOutput] };
  tailCurrent: (dc: NodalCircuit, s: NodalState) => number;
  headroom: (ctx: HeadroomContext) => { criteria: Array<[HeadroomLimit, (a: number) => number]>; describe: (limit: HeadroomLimit, at: number) => { side: string; explanation: string } };
  plot: { rDc: number; rAc: number };
  biasKind: 'fixed' | 'cathode';
  warnings: string[];
  options?: AnalyzeOptions;
};

export type HeadroomContext = {
  /** solves the held circuit at idle means with grid drive a (continuation from the last solve) */
  solve: (a: number) => NodalState;
  circuit: NodalCircuit;
  idle: NodalState;
};

const CYCLE_TOL = 1e-6;
const dbOf = (ratio: number) => (ratio > 0 ? Math.max(-200, 20 * Math.log10(ratio)) : -200);
const wrap180 = (deg: number) => {
  let d = deg % 360;
  if (d > 180) d -= 360;
  if (d <= -180) d += 360;
  return d;
};

export function nodalOperatingPoint(c: NodalCircuit, s: NodalState, t: SplitterTube): OperatingPoint {
  const vp = voltageOf(c, s, t.p);
  const vg = voltageOf(c, s, t.g);
  const vk = voltageOf(c, s, t.k);
  const ia = s.ia[t.index] as number;
  const ig = s.ig[t.index] as number;
  return {
    plateVoltage: vp,
    plateCathodeVoltage: vp - vk,
    plateCurrent: ia,
    gridCathodeVoltage: vg - vk,
    gridVoltage: vg,
    cathodeVoltage: vk,
    cathodeCurrent: ia + ig,
    screenVoltage: null,
    screenCurrent: null,
    plateDissipation: (vp - vk) * ia,
    screenDissipation: null,
  };
}

/** Fundamental of one cycle as amplitude and phase (degrees) relative to sin(2πk/N). */
function fundamental(xs: ArrayLike<number>): { amplitude: number; phaseDeg: number } {
  const n = xs.length;
  let a = 0;
  let b = 0;
  for (let k = 0; k < n; k++) {
    const th = (2 * Math.PI * k) / n;
    a += (xs[k] as number) * Math.cos(th);
    b += (xs[k] as number) * Math.sin(th);
  }
  a *= 2 / n;
  b *= 2 / n;
  return { amplitude: Math.hypot(a, b), phaseDeg: (Math.atan2(a, b) * 180) / Math.PI };
}

export function analyzeSplitter(spec: SplitterSpec): StageAnalysis {
  const { dc, held, model, input } = spec;
  const warnings = [...spec.warnings];
  const quick = spec.options?.quick === true;

  // DC operating point
  const op = newNodalState(dc);
  if (!solveNodal(dc, spec.dcStart, op, Math.max(5, 0.1 * input.supply), 200)) {
    throw new CalcError('no-solution', 'The operating point could not be solved for these values.');
  }
  const ops = spec.tubes.map((t) => nodalOperatingPoint(dc, op, t));
  for (const o of ops) {
    if (![o.plateVoltage, o.cathodeVoltage, o.plateCurrent].every(Number.isFinite)) {
      throw new CalcError('no-solution', 'The operating point could not be solved for these values.');
    }
    if (o.gridCathodeVoltage > 1e-3) {
      throw new CalcError(
        'grid-conduction',
        `A grid is ${o.gridCathodeVoltage.toFixed(2)} V positive of its cathode at idle, so grid current flows. Make the bias more negative.`,
      );
    }
    if (o.plateCurrent < 1e-9 * Math.max(1, input.supply / 100)) {
      throw new CalcError('cutoff', 'A section is cut off at idle: no plate current flows. Check the bias and the tail.');
    }
  }

  // held circuit at idle
  const m0: Record<string, number> = {};
  for (const h of spec.heldVoltages) m0[h.key] = h.init(dc, op);
  const nh = held.n;
  const setHeld = (m: Record<string, number>, vin: number) => {
    for (const h of spec.heldVoltages) held.fixed[h.slot] = m[h.key] as number;
    held.fixed[spec.driveSlot] = spec.driveBase(m) + vin;
  };
  const idleStart = op.v.slice(0, nh);
  const solveHeld = (m: Record<string, number>, vin: number, start: Float64Array, out: NodalState, tol = 1e-9) => {
    setHeld(m, vin);
    if (!solveNodal(held, start, out, Math.max(5, 0.1 * input.supply), 100, tol)) {
      // restart from idle with a smaller step limit
      if (!solveNodal(held, idleStart, out, 2, 400)) throw new CalcError('no-solution', 'The circuit could not be solved under drive.');
    }
    return out;
  };
  const idle = solveHeld(m0, 0, idleStart, newNodalState(held));

  // midband gains by perturbation (grid referenced)
  const h = 1e-3;
  const up = solveHeld(m0, h, idle.v, newNodalState(held));
  const dn = solveHeld(m0, -h, idle.v, newNodalState(held));
  const gains = spec.outputs.map((o) => (voltageOf(held, up, o.node) - voltageOf(held, dn, o.node)) / (2 * h));
  // output impedance: a test current into the node, external load removed from the result
  const zOuts = spec.outputs.map((o) => {
    const rNode = 1e3;
    const delta = 1e-3 / rNode;
    const base = held.inject[o.node] as number;
    setHeld(m0, 0);
    const a = newNodalState(held);
    const b = newNodalState(held);
    held.inject[o.node] = base + delta;
    solveNodal(held, idle.v, a);
    held.inject[o.node] = base - delta;
    solveNodal(held, idle.v, b);
    held.inject[o.node] = base;
    const zSeen = (voltageOf(held, a, o.node) - voltageOf(held, b, o.node)) / (2 * delta);
    const g = 1 / zSeen - (o.load ? 1 / o.load : 0);
    return g > 1e-12 ? 1 / g : 1e12;
  });

  // linearised network: response, cut-offs, balance and phases at the drive frequency
  const ac = spec.acNetwork(dc, op);
  const f = input.drive.frequency;
  const atDrive = ac.outs.map((o) => responseAt(ac.sys, o, f));
  const phase = atDrive.map((r) => r.phaseDeg);
  const balance: Balance = {
    ratioDb: (atDrive[1] as { magnitudeDb: number }).magnitudeDb - (atDrive[0] as { magnitudeDb: number }).magnitudeDb,
    phaseErrorDeg: wrap180((phase[1] as number) - (phase[0] as number) - 180),
    frequency: f,
  };

  // large signal
  const amp = input.drive.amplitude;
  const drive = sineDrive(amp, quick ? QUICK_SAMPLES : SAMPLES_PER_CYCLE);
  const coarseDrive = new Map<number, number[]>();
  const lastCycle = new Map<number, NodalState[]>();
  // two sample buffers per cycle length, used in turn (the previous cycle is the warm start of the next)
  const pools = new Map<number, [NodalState[], NodalState[]]>();
  const bufferFor = (n: number, old: NodalState[] | undefined) => {
    let pair = pools.get(n);
    if (!pair) {
      pair = [Array.from({ length: n }, () => newNodalState(held)), Array.from({ length: n }, () => newNodalState(held))];
      pools.set(n, pair);
    }
    return pair[0] === old ? pair[1] : pair[0];
  };
  const guess = new Float64Array(nh);
  type Cycle = { samples: NodalState[] };
  const runCycle = (m: Record<string, number>, count?: number) => {
    let wave = drive;
    if (count) {
      wave = coarseDrive.get(count) ?? sineDrive(amp, count);
      coarseDrive.set(count, wave);
    }
    const n = wave.length;
    const old = lastCycle.get(n);
    const samples = bufferFor(n, old);
    const sums: Record<string, number> = {};
    for (const hv of spec.heldVoltages) sums[hv.key] = 0;
    for (let k = 0; k < n; k++) {
      let start: Float64Array;
      if (old && k > 0) {
        const o = old[k] as NodalState;
        const a = samples[k - 1] as NodalState;
        const b = old[k - 1] as NodalState;
        if (k >= 3) {
          // previous cycle + the change since it, extrapolated quadratically along the cycle
          const a2 = samples[k - 2] as NodalState;
          const b2 = old[k - 2] as NodalState;
          const a3 = samples[k - 3] as NodalState;
          const b3 = old[k - 3] as NodalState;
          for (let i = 0; i < nh; i++) {
            const d1 = (a.v[i] as number) - (b.v[i] as number);
            const d2 = (a2.v[i] as number) - (b2.v[i] as number);
            const d3 = (a3.v[i] as number) - (b3.v[i] as number);
            guess[i] = (o.v[i] as number) + 3 * d1 - 3 * d2 + d3;
          }
        } else for (let i = 0; i < nh; i++) guess[i] = (o.v[i] as number) + (a.v[i] as number) - (b.v[i] as number);
        start = guess;
      } else if (old) start = (old[0] as NodalState).v;
      else if (k >= 5) {
        // quartic extrapolation along the (smooth) waveform
        const a1 = (samples[k - 1] as NodalState).v;
        const a2 = (samples[k - 2] as NodalState).v;
        const a3 = (samples[k - 3] as NodalState).v;
        const a4 = (samples[k - 4] as NodalState).v;
        const a5 = (samples[k - 5] as NodalState).v;
        for (let i = 0; i < nh; i++) {
          guess[i] = 5 * (a1[i] as number) - 10 * (a2[i] as number) + 10 * (a3[i] as number) - 5 * (a4[i] as number) + (a5[i] as number);
        }
        start = guess;
      } else if (k >= 3) {
        const a = samples[k - 1] as NodalState;
        const b = samples[k - 2] as NodalState;
        const c = samples[k - 3] as NodalState;
        for (let i = 0; i < nh; i++) guess[i] = 3 * (a.v[i] as number) - 3 * (b.v[i] as number) + (c.v[i] as number);
        start = guess;
      } else start = k === 0 ? idle.v : (samples[k - 1] as NodalState).v;
      // samples of a cycle: a last step below 1e-6 of the node voltage leaves ~1e-10 of it (quadratic convergence)
      const s = solveHeld(m, wave[k] ?? 0, start, samples[k] as NodalState, CYCLE_TOL);
      for (const hv of spec.heldVoltages) sums[hv.key] = (sums[hv.key] as number) + hv.implied(held, s);
    }
    lastCycle.set(n, samples);
    const means: Record<string, number> = {};
    for (const hv of spec.heldVoltages) means[hv.key] = (sums[hv.key] as number) / n;
    return { means, result: { samples } as Cycle };
  };
  const keys = spec.heldVoltages.map((hv) => hv.key);
  const steady =
    amp > 0
      ? keys.length > 0
        ? steadyState<Record<string, number>, Cycle>(keys, m0, runCycle, undefined, quick ? 16 : undefined)
        : runCycle(m0)
      : { means: m0, result: { samples: Array.from({ length: drive.length }, () => idle) } };
  const samples = steady.result.samples;
  // with no drive there is nothing to converge; the means are the idle ones
  const outWaves = spec.outputs.map((o) => samples.map((s) => voltageOf(held, s, o.node)));

  // headroom, with the held voltages at idle (continuation from the last solve)
  // one continuation chain per drive polarity (criteria alternate between them)
  let lastPos = idle;
  let lastNeg = idle;
  // the criteria walk out from the same scale by doubling, so many drive levels repeat across criteria
  const solved = new Map<number, NodalState>();
  const hctx: HeadroomContext = {
    solve: (a: number) => {
      const hit = solved.get(a);
      if (hit) {
        // fixed nodes (the driven grid) are read from the circuit: set them for this drive level
        setHeld(m0, a);
        return hit;
      }
      const s = a >= 0 ? (lastPos = solveHeld(m0, a, lastPos.v, newNodalState(held))) : (lastNeg = solveHeld(m0, a, lastNeg.v, newNodalState(held)));
      solved.set(a, s);
      return s;
    },
    circuit: held,
    idle,
  };
  const hr = spec.headroom(hctx);
  const scale = Math.max(0.5 * Math.abs(ops[0]?.gridCathodeVoltage ?? 1), 0.05);
  // a drive so large that the circuit has no solution is past every limit (the search then narrows below it)
  const guarded = hr.criteria.map(([name, g]): [HeadroomLimit, (a: number) => number] => [
    name,
    (a) => {
      try {
        return g(a);
      } catch (err) {
        if (err instanceof CalcError) return 1;
        throw err;
      }
    },
  ]);
  const best = nearestLimit<HeadroomLimit>(guarded, input.supply, scale);
  const swingOf = (o: SplitterOutput) =>
    Math.abs(voltageOf(held, hctx.solve(best[1]), o.node) - voltageOf(held, hctx.solve(-best[1]), o.node)) / 2;
  const swings = spec.outputs.map(swingOf);
  const why = best[0] === 'none' ? { side: 'none', explanation: 'No limit is reached up to a drive equal to the supply.' } : hr.describe(best[0], best[1]);

  // outputs
  const stride = drive.length / Math.min(128, drive.length);
  const period = 1 / f;
  const t: number[] = [];
  const input0: number[] = [];
  for (let k = 0; k < drive.length; k += stride) {
    t.push((k / drive.length) * period);
    input0.push(drive[k] ?? 0);
  }
  const curves = quick ? [[], []] : responseCurvesAc(ac.sys, ac.outs);
  const outputs: Partial<Record<OutputName, StageOutput>> = {};
  const fundamentals = outWaves.map((w) => fundamental(w));
  spec.outputs.forEach((o, i) => {
    const w = outWaves[i] as number[];
    const amps = harmonicAmplitudes(w, 10);
    const mu = mean(w);
    const wave: number[] = [];
    for (let k = 0; k < w.length; k += stride) wave.push((w[k] ?? 0) - mu);
    outputs[o.name] = {
      amplitude: amp > 0 ? (fundamentals[i] as { amplitude: number }).amplitude : 0,
      phaseDeg: phase[i] as number,
      thdPercent: amp > 0 ? 100 * thdFromAmplitudes(amps, 10) : 0,
      gain: gains[i] as number,
      outputImpedance: zOuts[i] as number,
      dcVoltage: voltageOf(dc, op, o.node),
      response: curves[i] ?? [],
      waveform: wave,
    };
  });
  const first = spec.outputs[0].name;
  const primary = outputs[first] as StageOutput;
  const primaryWave = outWaves[0] as number[];
  const amps1 = harmonicAmplitudes(primaryWave, 10);
  const h1 = amps1[1] ?? 0;

  // warnings
  for (const ti of spec.tubes) {
    const maxVgk = Math.max(...samples.map((s) => voltageOf(held, s, ti.g) - voltageOf(held, s, ti.k)));
    const minIa = Math.min(...samples.map((s) => s.ia[ti.index] as number));
    const idleIa = ops[ti.index]?.plateCurrent ?? 0;
    const which = spec.tubes.length > 1 ? ` of section ${ti.index + 1}` : '';
    if (amp > 0 && maxVgk > 0) warnings.push(`The grid${which} goes ${maxVgk.toFixed(2)} V positive on peaks: grid current flows.`);
    if (amp > 0 && minIa < 0.01 * idleIa) warnings.push(`Section ${ti.index + 1} cuts off on part of the cycle.`);
  }
  if (amp > best[1] && best[0] !== 'none') {
    warnings.push(`The drive (${amp.toPrecision(3)} V) is beyond the headroom limit of ${best[1].toPrecision(3)} V (${best[0]}: ${why.explanation})`);
  }

  // ratings: the worse of the sections
  const worst = (pick: (o: OperatingPoint) => number) => Math.max(...ops.map(pick));
  const ratings = checkRatings({
    ratings: model.ratings,
    derating: input.derating,
    plateCathodeVoltage: worst((o) => o.plateCathodeVoltage),
    plateDissipation: worst((o) => o.plateDissipation),
    screenCathodeVoltage: null,
    screenDissipation: null,
    cathodeCurrent: worst((o) => o.cathodeCurrent),
    heaterCathodeVoltage: worst((o) => Math.abs(o.cathodeVoltage - input.heaterElevation)),
    gridResistance: input.gridResistor,
    biasKind: spec.biasKind,
  });
  for (const r of ratings) if (r.status === 'over') warnings.push(`${r.label} exceeds the tube's rating.`);

  const op0 = ops[0] as OperatingPoint;
  const d = tubeDerivatives(model, op0.plateCathodeVoltage, op0.gridCathodeVoltage, 0);
  const caps = model.capacitances;
  const aK = (voltageOf(held, up, spec.tubes[0]!.k) - voltageOf(held, dn, spec.tubes[0]!.k)) / (2 * h);
  const aP = (voltageOf(held, up, spec.tubes[0]!.p) - voltageOf(held, dn, spec.tubes[0]!.p)) / (2 * h);
  const cin = Math.max(0, caps.cga * (1 - aP) + caps.cgk * (1 - aK));
  const out0 = ac.outs[0] as AcOutput;
  return {
    topology: spec.topology,
    operatingPoint: op0,
    perTube: ops,
    smallSignal: {
      gm: d.gm,
      ra: d.ra,
      mu: d.mu,
      gain: primary.gain,
      gainDb: dbOf(Math.abs(primary.gain)),
      outputImpedance: primary.outputImpedance,
      inputCapacitance: cin,
      lowCutoff: cutoffAc(ac.sys, out0, 'low'),
      highCutoff: cutoffAc(ac.sys, out0, 'high'),
      response: primary.response,
    },
    largeSignal: {
      drive: amp,
      outputAmplitude: primary.amplitude,
      harmonics: Array.from({ length: 9 }, (_, i) => {
        const a = amps1[i + 2] ?? 0;
        return { order: i + 2, amplitude: a, db: dbOf(h1 > 0 ? a / h1 : 0) };
      }),
      thdPercent: primary.thdPercent,
      thd3PointPercent: 0,
      thd5PointPercent: 0,
      dcShift: mean(samples.map((s) => s.ia[0] as number)) - op0.plateCurrent,
      outputPower: null,
      headroom: { maxDrive: best[1], limitedBy: best[0], outputSwing: Math.min(...swings), side: why.side, explanation: why.explanation },
      waveform: { t, input: input0, output: primary.waveform },
    },
    ratings,
    plot: quick
      ? { ...EMPTY_PLOT, operatingPoint: { va: op0.plateCathodeVoltage, ia: op0.plateCurrent } }
      : stagePlot(model, op0, spec.plot.rDc, spec.plot.rAc, input.supply, spec.tube),
    warnings,
    outputs,
    balance,
    tailCurrent: spec.tailCurrent(dc, op),
  };
}

export { copyState };
