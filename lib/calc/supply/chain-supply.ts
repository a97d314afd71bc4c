// The signal chain on a supply circuit: node voltages come from the circuit solved with the stages' idle and
// full-drive currents (with-stages.ts); the chain is then solved with every stage at its solved idle node voltage
// (its bias point follows the supply), and the result carries the circuit's solution beside the ladder-shaped
// summary the chain view reads. The chain solver is passed in (no import cycle with lib/calc/chain.ts).
import type { ChainOptions, ChainResult, ChainStage, ChainSupply, ChainSupplyResult } from '../chain';
import { solveSupplyWithStages } from './with-stages';
import type { SupplyCircuit } from './types';
import { circuitNodes } from './ladder';
import { CalcError } from '../errors';

export function solveChainOnCircuit(
  stages: ChainStage[],
  circuit: SupplyCircuit,
  supplyIn: ChainSupply,
  options: ChainOptions,
  solve: (stages: ChainStage[], supply: ChainSupply, options: ChainOptions) => ChainResult,
): ChainResult {
  let solved: ReturnType<typeof solveSupplyWithStages> | null = null;
  let supplyError: { code: string; message: string } | null = null;
  try {
    solved = solveSupplyWithStages(
      circuit,
      stages.map((s) => ({ id: s.id, name: s.name, node: s.supplyNode, input: s.input })),
    );
  } catch (err) {
    supplyError = err instanceof CalcError ? { code: err.code, message: err.message } : { code: 'no-solution', message: err instanceof Error ? err.message : 'The supply could not be solved.' };
  }
  const byId = new Map((solved?.stages ?? []).map((r) => [r.stageId, r]));
  // every stage at its solved idle node voltage, with no ladder (stages keep the voltage they are given)
  const rewritten = stages.map((s) => {
    const r = byId.get(s.id);
    if (!r || r.idleVoltage === null || !s.input) return { ...s, supplyNode: null };
    return { ...s, supplyNode: null, input: { ...s.input, supply: r.idleVoltage } as typeof s.input };
  });
  const result = solve(rewritten, { heaters: supplyIn.heaters }, options);
  result.stages = result.stages.map((st) => {
    const orig = stages.find((s) => s.id === st.stageId);
    const r = byId.get(st.stageId);
    return {
      ...st,
      supplyNode: orig?.supplyNode ?? null,
      assumedSupply: orig?.input?.supply ?? orig?.assumedSupply ?? st.assumedSupply,
      solvedSupply: r?.idleVoltage ?? null,
      supplyCurrent: r?.idleCurrent ?? st.supplyCurrent,
    };
  });
  if (!solved) {
    result.supply = null;
    result.supplyError = supplyError;
    result.warnings.push(`The supply could not be solved: ${supplyError!.message}`);
    return result;
  }
  const s = solved.supply;
  const meta = circuitNodes(circuit);
  const stageCurrent = new Array<number>(s.nodes.length).fill(0);
  for (const r of solved.stages) if (r.nodeIndex !== null && r.idleCurrent !== null) stageCurrent[r.nodeIndex]! += r.idleCurrent;
  const through = new Array<number>(s.nodes.length).fill(0);
  for (let j = s.nodes.length - 1; j >= 0; j--) through[j] = s.nodes[j]!.loadCurrent + (j + 1 < s.nodes.length ? through[j + 1]! : 0);
  const supply: ChainSupplyResult & { circuit: typeof s } = {
    rawVoltage: s.secondaryPeak,
    sourceResistance: s.sourceResistance,
    totalCurrent: s.totalCurrent,
    sourceDrop: s.secondaryPeak - s.nodes[0]!.dc,
    loadedVoltage: s.nodes[0]!.dc,
    iterations: solved.rounds,
    converged: solved.converged,
    residual: solved.residual,
    nodes: s.nodes.map((n, j) => {
      const R = meta[j]?.droppingResistor ?? 0;
      return {
        key: n.key,
        name: n.name,
        droppingResistor: R,
        filterCapacitor: n.capacitance,
        voltage: n.dc,
        currentIn: through[j]!,
        stageCurrent: stageCurrent[j]!,
        currentOut: through[j]! - n.loadCurrent,
        drop: R * through[j]!,
        resistorPower: R * through[j]! * through[j]!,
        stageIds: solved!.stages.filter((r) => r.nodeIndex === j).map((r) => r.stageId),
      };
    }),
    circuit: s,
  };
  result.supply = supply;
  result.supplyError = solved.converged ? null : { code: 'no-solution', message: solved.warnings[0] ?? 'The supply did not settle.' };
  result.warnings.push(...solved.warnings);
  // a vacuum rectifier's heater joins the heater budget
  const heater = s.rectifier.heater;
  if (heater) {
    const total = result.heaters.find((h) => Math.abs(h.voltage - heater.voltage) <= 0.05 * heater.voltage);
    if (total) {
      total.current += heater.current;
      total.power += heater.current * total.voltage;
      total.loads.push({ stageId: 0, designation: `${s.rectifier.type} (rectifier)`, current: heater.current });
    } else result.unassignedHeaters.push({ stageId: 0, designation: `${s.rectifier.type} (rectifier)`, voltage: heater.voltage, current: heater.current });
  }
  return result;
}
