// The signal chain and the supply of a project, solved together (pure: no I/O).
//
// Supply model: raw B+ (open-circuit equivalent) behind the transformer + rectifier source resistance, then a
// ladder of nodes. Node i is fed from node i-1 (or from the raw supply for i = 0) through its dropping resistor
// and carries the current of its own stages plus everything downstream. Stages draw their idle plate + screen
// current; each stage is re-analysed at its node's voltage and node voltages ↔ stage currents are iterated
// (damped fixed point) until no node moves by more than `tolerance` (0.01 V by default).
import { CalcError } from './errors';
import { analyzeStage } from './index';
import type { HeadroomLimit, StageAnalysis } from './types';
import type { StageInput } from './input';

export type ChainSupplyNode = { key: string; name: string; droppingResistor: number; filterCapacitor: number };
export type ChainSupply = {
  rawVoltage?: number;
  sourceResistance?: number;
  nodes?: ChainSupplyNode[];
  heaters?: { key: string; name: string; voltage: number }[];
};

export type ChainHeater = { voltage?: number; current?: number; sections?: number; designation?: string };

export type ChainStage = {
  id: number;
  name: string;
  position: number;
  supplyNode: string | null;
  /** the validated engine input, with the library tube in place; null when it could not be built */
  input: StageInput | null;
  /** why there is no input (e.g. the tube has no model) */
  inputError?: { code: string; message: string } | null;
  /** topology and assumed supply from the stored stage, used when input is null */
  topology?: string;
  assumedSupply?: number;
  heater?: ChainHeater;
};

export type ChainOptions = { inputRms?: number; tolerance?: number; maxIterations?: number };

export type ChainStageResult = {
  stageId: number;
  name: string;
  position: number;
  topology: string;
  supplyNode: string | null;
  assumedSupply: number;
  /** node voltage the stage was analysed at (null when the stage is not on a solved node) */
  solvedSupply: number | null;
  /** idle current drawn from its node: plate + screen, both tubes of a push-pull pair */
  supplyCurrent: number | null;
  gain: number | null;
  gainDb: number | null;
  cumulativeGain: number | null;
  /** signal at this stage's grid and at its output, V rms, for the chosen chain input */
  inputRms: number | null;
  outputRms: number | null;
  /** largest grid drive before the stage limits, V peak at its grid */
  maxDrivePeak: number | null;
  limitedBy: HeadroomLimit | null;
  /** chain input (V rms) at which this stage starts to clip */
  clipsAtChainInputRms: number | null;
  /** the signal at its grid exceeds its headroom at the chosen chain input (levels after it are linear projections) */
  clipping: boolean;
  worstRating: 'ok' | 'near' | 'over' | 'not-checked' | null;
  error: { code: string; message: string } | null;
};

export type ChainNodeResult = {
  key: string;
  name: string;
  droppingResistor: number;
  filterCapacitor: number;
  voltage: number;
  /** current through this node's dropping resistor (own stages + downstream nodes) */
  currentIn: number;
  /** current drawn at this node by its own stages */
  stageCurrent: number;
  /** current passed on to the next node */
  currentOut: number;
  drop: number;
  resistorPower: number;
  stageIds: number[];
};

export type ChainSupplyResult = {
  rawVoltage: number;
  sourceResistance: number;
  totalCurrent: number;
  sourceDrop: number;
  /** voltage at the source resistor's output (rectifier output under load) */
  loadedVoltage: number;
  nodes: ChainNodeResult[];
  iterations: number;
  converged: boolean;
  /** largest node change in the last iteration, V */
  residual: number;
};

export type HeaterTotal = {
  key: string;
  name: string;
  voltage: number;
  current: number;
  power: number;
  loads: { stageId: number; designation: string; current: number }[];
};

export type ChainResult = {
  inputRms: number;
  stages: ChainStageResult[];
  totalGain: number | null;
  totalGainDb: number | null;
  outputRms: number | null;
  firstClip: { stageId: number; name: string; chainInputRms: number; limitedBy: HeadroomLimit } | null;
  supply: ChainSupplyResult | null;
  supplyError: { code: string; message: string } | null;
  heaters: HeaterTotal[];
  unassignedHeaters: { stageId: number; designation: string; voltage: number | null; current: number | null }[];
  warnings: string[];
};

/** Idle current a stage takes from its B+ node. */
export function stageSupplyCurrent(input: StageInput, analysis: StageAnalysis): number {
  const tubes = input.topology === 'push-pull-output' ? analysis.perTube : [analysis.operatingPoint];
  const list = tubes.length ? tubes : [analysis.operatingPoint];
  let sum = 0;
  for (const op of list) sum += op.plateCurrent + (op.screenCurrent ?? 0);
  if (input.topology === 'push-pull-output' && list.length === 1) sum *= 2;
  return sum;
}

/**
 * Node voltages for given node currents (A drawn at each node), the hand-checkable ladder:
 * V0 = Vraw − (Rs + R0)·ΣI, Vi = V(i−1) − Ri·Σ(j≥i) Ij.
 */
export function solveLadder(supply: { rawVoltage: number; sourceResistance: number; nodes: ChainSupplyNode[] }, nodeCurrents: number[]) {
  const n = supply.nodes.length;
  const downstream = new Array<number>(n).fill(0);
  for (let i = n - 1; i >= 0; i--) downstream[i] = (nodeCurrents[i] ?? 0) + (i + 1 < n ? downstream[i + 1]! : 0);
  const total = n ? downstream[0]! : 0;
  const loaded = supply.rawVoltage - supply.sourceResistance * total;
  const voltages: number[] = [];
  let v = loaded;
  for (let i = 0; i < n; i++) {
    v -= supply.nodes[i]!.droppingResistor * downstream[i]!;
    voltages.push(v);
  }
  return { voltages, throughCurrents: downstream, totalCurrent: total, loadedVoltage: loaded };
}

function worstRating(a: StageAnalysis): ChainStageResult['worstRating'] {
  const order = ['not-checked', 'ok', 'near', 'over'] as const;
  let worst: ChainStageResult['worstRating'] = null;
  for (const r of a.ratings) if (worst === null || order.indexOf(r.status) > order.indexOf(worst)) worst = r.status;
  return worst;
}

function calcErrorOf(err: unknown): { code: string; message: string } {
  if (err instanceof CalcError) return { code: err.code, message: err.message };
  return { code: 'no-solution', message: err instanceof Error ? err.message : 'The stage could not be analysed.' };
}

function tryAnalyze(input: StageInput | null, inputError?: { code: string; message: string } | null): { analysis: StageAnalysis | null; error: { code: string; message: string } | null } {
  if (!input) return { analysis: null, error: inputError ?? { code: 'invalid-input', message: 'The stage has no usable inputs.' } };
  try {
    return { analysis: analyzeStage(input), error: null };
  } catch (err) {
    return { analysis: null, error: calcErrorOf(err) };
  }
}

const near = (a: number, b: number, rel = 0.05) => Math.abs(a - b) <= rel * Math.abs(b);

/**
 * Heater load of one stage on a supply of `supplyVoltage`: each stage counts its own section's share of the
 * envelope (heater current / sections; both tubes for push-pull). A centre-tapped dual-triode heater rated at
 * twice the supply voltage is taken as wired in parallel for it (twice the rated current).
 */
export function heaterShare(h: ChainHeater, topology: string, supplyVoltage: number): number | null {
  if (!h.voltage || !h.current) return null;
  const sections = Math.max(1, h.sections ?? 1);
  const tubes = topology === 'push-pull-output' ? 2 : 1;
  let current: number | null = null;
  if (near(h.voltage, supplyVoltage)) current = h.current;
  else if (sections >= 2 && near(h.voltage, 2 * supplyVoltage)) current = 2 * h.current;
  return current === null ? null : (current * tubes) / sections;
}

export function solveChain(stagesIn: ChainStage[], supplyIn: ChainSupply, options: ChainOptions = {}): ChainResult {
  const inputRms = options.inputRms ?? 0.1;
  const tolerance = options.tolerance ?? 0.01;
  const maxIterations = options.maxIterations ?? 80;
  const warnings: string[] = [];
  const stages = [...stagesIn].sort((a, b) => a.position - b.position || a.id - b.id);
  const nodes = supplyIn.nodes ?? [];
  const nodeIndex = new Map(nodes.map((n, i) => [n.key, i]));

  // Stages analysed at their own assumed supplies: the starting point, and the answer when there is no supply to solve.
  let analyses = stages.map((s) => tryAnalyze(s.input, s.inputError));
  // A stage that cannot be analysed even at its own supply is left out of the supply solution (and said so).
  const onNode = (s: ChainStage) => {
    const i = stages.indexOf(s);
    return s.input && !analyses[i]?.error && s.supplyNode !== null && nodeIndex.has(s.supplyNode) ? nodeIndex.get(s.supplyNode)! : -1;
  };
  for (const s of stages) {
    if (s.supplyNode !== null && !nodeIndex.has(s.supplyNode)) warnings.push(`${s.name} draws from '${s.supplyNode}', which is not a node of the supply; it keeps its own supply voltage.`);
    else if (s.supplyNode !== null && onNode(s) < 0 && nodes.length) warnings.push(`${s.name} cannot be analysed, so its current is left out of the supply solution.`);
  }
  const onNodeIndex = stages.map((s) => onNode(s));
  let solvedAt: (number | null)[] = stages.map(() => null);
  let supply: ChainSupplyResult | null = null;
  let supplyError: { code: string; message: string } | null = null;

  const canSolve = nodes.length > 0 && typeof supplyIn.rawVoltage === 'number' && supplyIn.rawVoltage > 0;
  if (nodes.length > 0 && !canSolve) warnings.push('The supply has nodes but no raw B+ voltage, so node voltages are not solved.');
  if (canSolve) {
    const ladder = { rawVoltage: supplyIn.rawVoltage!, sourceResistance: supplyIn.sourceResistance ?? 0, nodes };
    const currentsAt = (volts: number[] | null) => {
      const nodeCurrents = new Array<number>(nodes.length).fill(0);
      const results = stages.map((s, i) => {
        const k = onNodeIndex[i]!;
        if (k < 0 || !s.input) return analyses[i]!;
        const v = volts ? volts[k]! : s.input.supply;
        if (!(v > 0)) return { analysis: null, error: { code: 'cutoff', message: `The node ${nodes[k]!.key} has collapsed to ${v.toFixed(1)} V: the supply cannot deliver this current.` } };
        const r = tryAnalyze({ ...s.input, supply: v } as StageInput);
        if (r.analysis) nodeCurrents[k]! += stageSupplyCurrent(s.input, r.analysis);
        return r;
      });
      return { nodeCurrents, results };
    };

    let state = currentsAt(null);
    let volts = solveLadder(ladder, state.nodeCurrents).voltages;
    let alpha = 1;
    let residual = Infinity;
    let iterations = 0;
    let converged = false;
    let failed = state.results.find((r, i) => onNodeIndex[i]! >= 0 && r.error);
    while (!failed && iterations < maxIterations) {
      iterations++;
      state = currentsAt(volts);
      failed = state.results.find((r, i) => onNodeIndex[i]! >= 0 && r.error);
      if (failed) break;
      const target = solveLadder(ladder, state.nodeCurrents).voltages;
      const step = Math.max(0, ...target.map((t, i) => Math.abs(t - volts[i]!)));
      if (step < tolerance) {
        converged = true;
        residual = step;
        break;
      }
      if (step > residual) alpha = Math.max(0.1, alpha * 0.5);
      residual = step;
      volts = volts.map((v, i) => v + alpha * (target[i]! - v));
    }
    analyses = state.results;
    if (failed?.error) {
      supplyError = failed.error;
      warnings.push(`The supply could not be solved: ${failed.error.message}`);
    } else {
      if (!converged) {
        supplyError = { code: 'no-solution', message: `Node voltages did not settle within ${maxIterations} iterations (last change ${residual.toFixed(3)} V).` };
        warnings.push(supplyError.message);
      }
      const final = solveLadder(ladder, state.nodeCurrents);
      solvedAt = onNodeIndex.map((k) => (k >= 0 ? final.voltages[k]! : null));
      supply = {
        rawVoltage: ladder.rawVoltage,
        sourceResistance: ladder.sourceResistance,
        totalCurrent: final.totalCurrent,
        sourceDrop: ladder.sourceResistance * final.totalCurrent,
        loadedVoltage: final.loadedVoltage,
        iterations,
        converged,
        residual: Number.isFinite(residual) ? residual : 0,
        nodes: nodes.map((n, i) => {
          const through = final.throughCurrents[i]!;
          const own = state.nodeCurrents[i]!;
          return {
            key: n.key,
            name: n.name,
            droppingResistor: n.droppingResistor,
            filterCapacitor: n.filterCapacitor,
            voltage: final.voltages[i]!,
            currentIn: through,
            stageCurrent: own,
            currentOut: through - own,
            drop: n.droppingResistor * through,
            resistorPower: n.droppingResistor * through * through,
            stageIds: stages.filter((_, j) => onNodeIndex[j] === i).map((s) => s.id),
          };
        }),
      };
    }
  }

  // Signal chain: input rms × cumulative gain; each stage's headroom gives the chain input at which it clips.
  const results: ChainStageResult[] = [];
  let cumulative: number | null = 1;
  for (let i = 0; i < stages.length; i++) {
    const s = stages[i]!;
    const { analysis, error } = analyses[i]!;
    const before: number | null = cumulative;
    const gain = analysis ? analysis.smallSignal.gain : null;
    cumulative = before !== null && gain !== null ? before * Math.abs(gain) : null;
    const maxDrive = analysis ? analysis.largeSignal.headroom.maxDrive : null;
    const limitedBy = analysis ? analysis.largeSignal.headroom.limitedBy : null;
    const clipsAt = before !== null && before > 0 && maxDrive !== null && limitedBy !== 'none' ? maxDrive / Math.SQRT2 / before : null;
    results.push({
      stageId: s.id,
      name: s.name,
      position: s.position,
      topology: s.input?.topology ?? s.topology ?? 'unknown',
      supplyNode: s.supplyNode,
      assumedSupply: s.input?.supply ?? s.assumedSupply ?? 0,
      solvedSupply: solvedAt[i] ?? null,
      supplyCurrent: analysis && s.input ? stageSupplyCurrent(s.input, analysis) : null,
      gain,
      gainDb: analysis ? analysis.smallSignal.gainDb : null,
      cumulativeGain: cumulative,
      inputRms: before !== null ? inputRms * before : null,
      outputRms: cumulative !== null ? inputRms * cumulative : null,
      maxDrivePeak: maxDrive,
      limitedBy,
      clipsAtChainInputRms: clipsAt,
      clipping: clipsAt !== null && clipsAt < inputRms,
      worstRating: analysis ? worstRating(analysis) : null,
      error,
    });
  }
  const clipping = results.filter((r) => r.clipsAtChainInputRms !== null);
  const first = clipping.reduce<ChainStageResult | null>((m, r) => (m === null || r.clipsAtChainInputRms! < m.clipsAtChainInputRms! ? r : m), null);
  const totalGain = stages.length && cumulative !== null ? cumulative : null;
  if (first && first.clipsAtChainInputRms! < inputRms) warnings.push(`${first.name} clips at this input level (it clips from ${(first.clipsAtChainInputRms! * 1000).toPrecision(3)} mV rms).`);

  // Heater totals per heater supply.
  const heaterSupplies = supplyIn.heaters ?? [];
  const heaters: HeaterTotal[] = heaterSupplies.map((h) => ({ key: h.key, name: h.name, voltage: h.voltage, current: 0, power: 0, loads: [] }));
  const unassignedHeaters: ChainResult['unassignedHeaters'] = [];
  for (const s of stages) {
    const h = s.heater;
    const designation = h?.designation ?? s.input?.tube.name ?? 'tube';
    const topology = s.input?.topology ?? s.topology ?? '';
    let placed = false;
    if (h) {
      for (const total of heaters) {
        const share = heaterShare(h, topology, total.voltage);
        if (share !== null) {
          total.current += share;
          total.power += share * total.voltage;
          total.loads.push({ stageId: s.id, designation, current: share });
          placed = true;
          break;
        }
      }
    }
    if (!placed) unassignedHeaters.push({ stageId: s.id, designation, voltage: h?.voltage ?? null, current: h?.current ?? null });
  }
  if (unassignedHeaters.length && heaterSupplies.length) {
    warnings.push(`No heater supply matches ${unassignedHeaters.map((u) => `${u.designation} (${u.voltage ?? '?'} V)`).join(', ')}.`);
  }

  return {
    inputRms,
    stages: results,
    totalGain,
    totalGainDb: totalGain !== null && totalGain > 0 ? 20 * Math.log10(totalGain) : null,
    outputRms: totalGain !== null ? inputRms * totalGain : null,
    firstClip: first ? { stageId: first.stageId, name: first.name, chainInputRms: first.clipsAtChainInputRms!, limitedBy: first.limitedBy! } : null,
    supply,
    supplyError,
    heaters,
    unassignedHeaters,
    warnings,
  };
}
