// The supply circuit's nodes in the older ladder shape (key, name, dropping resistor, filter capacitor), and a
// ladder turned into a circuit. Pure; used by the project service (node pickers keep working on either) and the
// supply editor's "convert" action.
import type { SupplyCircuit } from './types';

export type CircuitNode = { key: string; name: string; droppingResistor: number; filterCapacitor: number; inductance: number };

/** Nodes in order with the series resistance (and inductance) feeding each; keys default to n0, n1, … like the solver. */
export function circuitNodes(c: Pick<SupplyCircuit, 'reservoir' | 'sections'>): CircuitNode[] {
  const out: CircuitNode[] = [];
  const capInput = !!c.reservoir;
  if (capInput) out.push({ key: c.reservoir!.key?.trim() || 'n0', name: c.reservoir!.name?.trim() || 'Reservoir', droppingResistor: 0, filterCapacitor: c.reservoir!.capacitance, inductance: 0 });
  let r = 0;
  let l = 0;
  for (const s of c.sections ?? []) {
    if (s.kind === 'resistor') r += s.resistance;
    else if (s.kind === 'choke') {
      r += s.resistance;
      l += s.inductance;
    } else {
      const i = out.length;
      out.push({ key: s.key?.trim() || `n${i}`, name: s.name?.trim() || `Node ${i}`, droppingResistor: r, filterCapacitor: s.capacitance, inductance: l });
      r = 0;
      l = 0;
    }
  }
  return out;
}

type Ladder = { rawVoltage?: number; sourceResistance?: number; nodes?: { key: string; name: string; droppingResistor: number; filterCapacitor: number }[] };

/**
 * A first circuit from a ladder: a silicon bridge on a secondary whose peak is the raw B+ (plus two diode drops),
 * the source resistance as winding resistance, node 0 as the reservoir (its dropping resistor added to the
 * winding), the later nodes as resistor + capacitor sections. Mains 230 V 50 Hz: edit to suit.
 */
export function ladderToCircuit(ladder: Ladder): SupplyCircuit {
  const nodes = ladder.nodes ?? [];
  const raw = ladder.rawVoltage ?? 300;
  const first = nodes[0];
  return {
    mains: { voltage: 230, frequency: 50, variation: 0.1 },
    secondary: { voltage: Math.round(((raw + 1.4) / Math.SQRT2) * 10) / 10, resistance: (ladder.sourceResistance ?? 0) + (first?.droppingResistor ?? 0) || 20 },
    rectifier: { kind: 'silicon-bridge', type: '1N4007' },
    reservoir: { capacitance: first && first.filterCapacitor > 0 ? first.filterCapacitor : 47e-6, key: first?.key ?? 'B+1', name: first?.name ?? 'Reservoir' },
    sections: nodes.slice(1).flatMap((n) => [
      { kind: 'resistor' as const, resistance: n.droppingResistor > 0 ? n.droppingResistor : 100 },
      { kind: 'capacitor' as const, capacitance: n.filterCapacitor > 0 ? n.filterCapacitor : 22e-6, key: n.key, name: n.name },
    ]),
    loads: [],
  };
}
