// The signal chain and the supply of a project, solved together (pure: no I/O).
//
// Supply model: raw B+ (open-circuit equivalent) behind the transformer + rectifier source resistance, then a
// ladder of nodes. Node i is fed from node i-1 (or from the raw supply for i = 0) through its dropping resistor
// and carries the current of its own stages plus everything downstream. Stages draw their idle plate + screen
// current; each stage is re-analysed at its node's voltage and node voltages ↔ stage currents are iterated
// (damped fixed point) until no node moves by more than `tolerance` (0.01 V by default).
//
// Signal levels come from the chain solved end to end at the solved node voltages (chain/solve.ts: every stage
// driven by the previous stage's actual waveform and loaded by the next), never from a product of gains.
import { analyzeChain, type ChainAnalysis } from './chain/solve';
import type { ChainLink } from './chain/input';
import { CalcError } from './errors';
import { analyzeStage } from './index';
import type { HeadroomLimit, StageAnalysis } from './types';
import type { StageInput } from './input';
import { solveChainOnCircuit } from './supply/chain-supply';
import type { SupplyCircuit, SupplyResult } from './supply/types';

export type ChainSupplyNode = { key: string; name: string; droppingResistor: number; filterCapacitor: number };
export type ChainSupply = {
  rawVoltage?: number;
  sourceResistance?: number;
  nodes?: ChainSupplyNode[];
  heaters?: { key: string; name: string; voltage: number }[];
  /** the supply as a circuit (mains winding to the last node); when given, the ladder above is not used */
  circuit?: SupplyCircuit | null;
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

export type ChainOptions = {
  inputRms?: number;
  tolerance?: number;
  maxIterations?: number;
  /** how the stages are joined (stage ids as strings); default: capacitor coupling between consecutive stages */
  links?: ChainLink[] | null;
  /** run the level sweep of the end-to-end solution (default true) */
  sweep?: boolean;
  /** signal frequency of the end-to-end solution (default 1 kHz) */
  frequency?: number;
};

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
  /** the full supply-circuit solution (ripple, sag, ratings, waveforms) when the project has a circuit */
  circuit?: SupplyResult;
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
  /** the chain solved end to end at the solved supply (levels, clipping, response, level sweep) */
  endToEnd: ChainAnalysis | null;
  /** why there is no end-to-end solution (a stage without inputs, a link that does not fit) */
  endToEndError: { code: string; message: string } | null;
  /** the links used (the project's, or the default capacitor coupling) */
  links: ChainLink[];
};

/** Default links: each stage's main output to the next stage's grid (both grids of a push-pull pair after a splitter). */
export function defaultChainLinks(stages: Array<{ id: number | string; input: StageInput | null }>): ChainLink[] {
  const links: ChainLink[] = [];
  for (let i = 1; i < stages.length; i++) {
    const from = stages[i - 1]!;
    const to = stages[i]!;
    const capacitance = (from.input && 'load' in from.input && from.input.load?.couplingCapacitor) || 100e-9;
    const coupling = { kind: 'capacitor' as const, capacitance };
    const fromTop = from.input?.topology;
    if (to.input?.topology === 'push-pull-output' && (fromTop === 'long-tailed-pair' || fromTop === 'split-load')) {
      const [a, b] = fromTop === 'long-tailed-pair' ? ['non-inverting', 'inverting'] : ['cathode', 'plate'];
      links.push({ from: String(from.id), output: a, to: String(to.id), input: 'grid1', coupling });
      links.push({ from: String(from.id), output: b, to: String(to.id), input: 'grid2', coupling });
    } else links.push({ from: String(from.id), to: String(to.id), coupling });
  }
  return links;
}

/** Idle current a stage takes from its B+ node. */
export function stageSupplyCurrent(input: StageInput, analysis: StageAnalysis): number {
  const tubes = input.topology === 'push-pull-output' || input.topology === 'long-tailed-pair' ? analysis.perTube : [analysis.operatingPoint];
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
  // a long-tailed pair uses both sections of its envelope
  const tubes = topology === 'push-pull-output' || topology === 'long-tailed-pair' ? 2 : 1;
  let current: number | null = null;
  if (near(h.voltage, supplyVoltage)) current = h.current;
  else if (sections >= 2 && near(h.voltage, 2 * supplyVoltage)) current = 2 * h.current;
  return current === null ? null : (current * tubes) / sections;
}

export function solveChain(stagesIn: ChainStage[], supplyIn: ChainSupply, options: ChainOptions = {}): ChainResult {
  if (supplyIn.circuit) return solveChainOnCircuit(stagesIn, supplyIn.circuit, supplyIn, options, solveChain);
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

  // Signal chain, end to end at the solved node voltages: levels, clipping and the clip point come from the
  // waveform each stage really receives; no level after a clipping stage is a linear projection.
  const links = options.links && options.links.length ? options.links : defaultChainLinks(stages);
  let endToEnd: ChainAnalysis | null = null;
  let endToEndError: { code: string; message: string } | null = null;
  const missing = stages.find((s, i) => !s.input || analyses[i]?.error);
  if (!stages.length) endToEndError = { code: 'invalid-input', message: 'The project has no stages.' };
  else if (missing) endToEndError = { code: 'invalid-input', message: `${missing.name} has no usable inputs, so the chain cannot be solved end to end.` };
  else {
    try {
      endToEnd = analyzeChain(
        {
          input: { amplitude: inputRms * Math.SQRT2, frequency: options.frequency ?? 1000 },
          stages: stages.map((s, i) => ({ ...(s.input as StageInput), supply: solvedAt[i] ?? (s.input as StageInput).supply, id: String(s.id) })),
          links,
        },
        { sweep: options.sweep ?? true },
      );
    } catch (err) {
      endToEndError = calcErrorOf(err);
    }
  }
  if (endToEndError) warnings.push(`Signal levels are not shown: ${endToEndError.message}`);
  const e2e = new Map((endToEnd?.stages ?? []).map((x) => [x.id, x]));
  const results: ChainStageResult[] = [];
  let cumulative: number | null = 1;
  for (let i = 0; i < stages.length; i++) {
    const s = stages[i]!;
    const { analysis, error } = analyses[i]!;
    const gain = analysis ? analysis.smallSignal.gain : null;
    cumulative = cumulative !== null && gain !== null ? cumulative * Math.abs(gain) : null;
    const maxDrive = analysis ? analysis.largeSignal.headroom.maxDrive : null;
    const solved = e2e.get(String(s.id));
    const main = solved ? Object.values(solved.outputs)[0] : undefined;
    const isFirstClip = endToEnd?.firstClip?.stage === String(s.id);
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
      inputRms: solved ? solved.inputAmplitude / Math.SQRT2 : null,
      outputRms: main ? main.amplitude / Math.SQRT2 : null,
      maxDrivePeak: maxDrive,
      limitedBy: solved ? (solved.clipped ? solved.limitedBy : isFirstClip ? (endToEnd!.firstClip!.limitedBy as HeadroomLimit) : 'none') : analysis ? analysis.largeSignal.headroom.limitedBy : null,
      clipsAtChainInputRms: isFirstClip ? endToEnd!.firstClip!.inputAmplitude / Math.SQRT2 : null,
      clipping: solved?.clipped ?? false,
      worstRating: analysis ? worstRating(analysis) : null,
      error,
    });
  }
  const first = endToEnd?.firstClip ? results.find((r) => String(r.stageId) === endToEnd!.firstClip!.stage) ?? null : null;
  // whole-chain small-signal gain with every stage loaded by the next (the response at 1 kHz)
  const at1k = endToEnd?.response.reduce((best, r) => (Math.abs(Math.log(r.frequency / 1000)) < Math.abs(Math.log(best.frequency / 1000)) ? r : best));
  const totalGain = at1k ? Math.pow(10, at1k.magnitudeDb / 20) : null;
  const clippedNow = results.find((r) => r.clipping);
  if (clippedNow) warnings.push(`${clippedNow.name} clips at this input level (${LIMIT_TEXT[clippedNow.limitedBy ?? 'none']}); the levels after it are those of the clipped waveform.`);

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
    outputRms: endToEnd ? endToEnd.output.amplitude / Math.SQRT2 : null,
    firstClip: first && endToEnd?.firstClip ? { stageId: first.stageId, name: first.name, chainInputRms: endToEnd.firstClip.inputAmplitude / Math.SQRT2, limitedBy: endToEnd.firstClip.limitedBy as HeadroomLimit } : null,
    supply,
    supplyError,
    heaters,
    unassignedHeaters,
    warnings,
    endToEnd,
    endToEndError,
    links,
  };
}

const LIMIT_TEXT: Record<HeadroomLimit, string> = {
  'grid-conduction': 'grid conduction',
  cutoff: 'cutoff',
  'plate-saturation': 'plate saturation',
  none: 'no limit',
};
