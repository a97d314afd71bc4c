// The supply solved with the stages it feeds: each stage draws its idle current (plate + screen, every tube)
// and, at full drive, that plus the rise of its average current under the drive set on the stage (class-AB
// pairs draw more). Node voltages ↔ stage currents are iterated: the first round analyses every stage at its
// own assumed supply; from the second round each stage's current is taken as linear in its node voltage through
// the last two analyses (a current plus a conductance, which the supply solver takes exactly), so a couple of
// rounds settle it. The stages are then analysed once more at the solved idle node voltages: their bias points
// follow the supply.
import { analyzeStage } from '../index';
import type { StageInput } from '../input';
import { CalcError } from '../errors';
import type { StageAnalysis } from '../types';
import { prepareSupply, solvePrepared, supplyDc, type PreparedSupply } from './solve';
import type { SupplyCircuit, SupplyOptions, SupplyResult } from './types';

export type SupplyStage = {
  id: number;
  name: string;
  /** key of the node it draws from */
  node: string | null;
  /** engine input with the library tube in place; null when it cannot be built */
  input: StageInput | null;
};

export type SupplyStageResult = {
  stageId: number;
  name: string;
  node: string | null;
  nodeIndex: number | null;
  /** solved node voltage at idle and at full drive */
  idleVoltage: number | null;
  fullDriveVoltage: number | null;
  idleCurrent: number | null;
  fullDriveCurrent: number | null;
  /** the stage analysed at its solved idle node voltage (null when it could not be analysed) */
  analysis: StageAnalysis | null;
  error: { code: string; message: string } | null;
};

export type SupplyWithStagesResult = {
  supply: SupplyResult;
  stages: SupplyStageResult[];
  rounds: number;
  converged: boolean;
  /** largest change of a node voltage in the last round, V */
  residual: number;
  warnings: string[];
};

/** Current a stage takes from its node at idle: plate + screen of every tube of the stage. */
export function stageIdleCurrent(input: StageInput, a: StageAnalysis): number {
  const tubes = a.perTube.length >= 2 ? a.perTube : [a.operatingPoint];
  let sum = 0;
  for (const op of tubes) sum += op.plateCurrent + (op.screenCurrent ?? 0);
  if (input.topology === 'push-pull-output' && a.perTube.length < 2) sum *= 2;
  return sum;
}

/** Current at full drive: idle plus the rise of the average plate current under the stage's own drive. */
export function stageFullDriveCurrent(input: StageInput, a: StageAnalysis): number {
  return stageIdleCurrent(input, a) + Math.max(0, a.largeSignal.dcShift);
}

type Point = { v: number; idle: number; full: number };

function analyse(input: StageInput, v: number): { a: StageAnalysis | null; error: { code: string; message: string } | null } {
  if (!(v > 0)) return { a: null, error: { code: 'cutoff', message: `The node has collapsed to ${v.toFixed(1)} V: the supply cannot deliver this current.` } };
  try {
    return { a: analyzeStage({ ...input, supply: v } as StageInput, { quick: true }), error: null };
  } catch (err) {
    if (err instanceof CalcError) return { a: null, error: { code: err.code, message: err.message } };
    return { a: null, error: { code: 'no-solution', message: err instanceof Error ? err.message : 'The stage could not be analysed.' } };
  }
}

export function solveSupplyWithStages(
  circuit: SupplyCircuit,
  stages: SupplyStage[],
  options: SupplyOptions & { tolerance?: number; maxRounds?: number; prepared?: PreparedSupply } = {},
): SupplyWithStagesResult {
  const p = options.prepared ?? prepareSupply(circuit, options);
  /** node voltage change between rounds, V */
  const tol = options.tolerance ?? 0.05;
  const maxRounds = options.maxRounds ?? 8;
  const k = p.net.k;
  const keyIndex = new Map(p.net.meta.map((m, i) => [m.key, i]));
  const warnings: string[] = [];
  const on = stages.map((s) => {
    if (s.node === null) return -1;
    const i = keyIndex.get(s.node);
    if (i === undefined) {
      warnings.push(`${s.name} draws from '${s.node}', which is not a node of the supply; it keeps its own supply voltage.`);
      return -1;
    }
    if (!s.input) warnings.push(`${s.name} cannot be analysed, so its current is left out of the supply solution.`);
    return s.input ? i : -1;
  });
  const history: Point[][] = stages.map(() => []);
  const errors: ({ code: string; message: string } | null)[] = stages.map(() => null);
  const lastAnalysis: (StageAnalysis | null)[] = stages.map(() => null);

  const sample = (volts: number[] | null) => {
    stages.forEach((s, j) => {
      const i = on[j]!;
      if (i < 0 || errors[j]) return;
      const v = volts ? volts[i]! : s.input!.supply;
      const r = analyse(s.input!, v);
      if (!r.a) {
        errors[j] = r.error;
        return;
      }
      lastAnalysis[j] = r.a;
      history[j]!.push({ v, idle: stageIdleCurrent(s.input!, r.a), full: stageFullDriveCurrent(s.input!, r.a) });
    });
  };

  // Each stage as I(V) = I1 + g·(V − V1) through its last two points (g ≥ 0 from the idle currents; the
  // full-drive current keeps the same slope): a constant current plus a conductance at its node.
  const linearLoads = () => {
    const idle = new Array<number>(k).fill(0);
    const full = new Array<number>(k).fill(0);
    const g = new Array<number>(k).fill(0);
    stages.forEach((_, j) => {
      const i = on[j]!;
      const h = history[j]!;
      if (i < 0 || errors[j] || h.length === 0) return;
      const last = h[h.length - 1]!;
      let slope = 0;
      if (h.length >= 2) {
        const prev = h[h.length - 2]!;
        const dv = last.v - prev.v;
        if (Math.abs(dv) > 1e-6) slope = Math.max(0, (last.idle - prev.idle) / dv);
      }
      // (the constant part may be negative: a plate load line has I = (V − V0)/R; only the sum matters)
      idle[i]! += last.idle - slope * last.v;
      full[i]! += last.full - slope * last.v;
      g[i]! += slope;
    });
    return { idle, full, g };
  };

  sample(null);
  let rounds = 0;
  let converged = false;
  let residual = Infinity;
  let lastVolts: number[] | null = null;
  const failed = () => errors.some((e, j) => e && on[j]! >= 0);
  while (!failed() && rounds < maxRounds) {
    rounds++;
    const lin = linearLoads();
    const loads = [...(circuit.loads ?? [])];
    lin.g.forEach((g, i) => {
      if (g > 0) loads.push({ node: i, resistance: 1 / g });
    });
    // the rounds run on half the steps (the DC they feed back moves by millivolts); the final solution uses the full count
    const q = prepareSupply({ ...circuit, loads }, { ...options, stepsPerHalfCycle: Math.max(64, Math.round(p.steps / 2)) });
    q.warm = p.warm;
    // the stages are sampled at the idle voltages; the full-drive case is solved once at the end
    const volts = supplyDc(q, { idle: lin.idle, full: lin.idle }).idle;
    residual = lastVolts ? Math.max(...volts.map((v, i) => Math.abs(v - lastVolts![i]!))) : Infinity;
    lastVolts = volts;
    sample(volts);
    if (residual < tol) {
      converged = true;
      break;
    }
  }
  if (failed()) {
    const j = errors.findIndex((e, jj) => e && on[jj]! >= 0);
    warnings.push(`The supply could not be solved with ${stages[j]!.name}: ${errors[j]!.message}`);
  } else if (!converged) warnings.push(`Node voltages and stage currents did not settle within ${maxRounds} rounds (last change ${residual.toFixed(3)} V).`);

  // final: constant currents as last sampled (at the solved voltages), complete solution
  const idleC = new Array<number>(k).fill(0);
  const fullC = new Array<number>(k).fill(0);
  stages.forEach((_, j) => {
    const i = on[j]!;
    const h = history[j]!;
    if (i < 0 || errors[j] || !h.length) return;
    idleC[i]! += h.at(-1)!.idle;
    fullC[i]! += h.at(-1)!.full;
  });
  const supply = solvePrepared(p, { idle: idleC, full: fullC }, options);
  const results: SupplyStageResult[] = stages.map((s, j) => {
    const i = on[j]!;
    const h = history[j]!;
    return {
      stageId: s.id,
      name: s.name,
      node: s.node,
      nodeIndex: i >= 0 ? i : null,
      idleVoltage: i >= 0 ? supply.nodes[i]!.dc : null,
      fullDriveVoltage: i >= 0 ? supply.nodes[i]!.fullDrive.dc : null,
      idleCurrent: h.length ? h.at(-1)!.idle : null,
      fullDriveCurrent: h.length ? h.at(-1)!.full : null,
      analysis: lastAnalysis[j] ?? null,
      error: errors[j] ?? null,
    };
  });
  return { supply, stages: results, rounds, converged, residual: Number.isFinite(residual) ? residual : 0, warnings };
}
