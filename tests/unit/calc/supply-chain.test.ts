// The signal chain on a supply circuit: stages analysed at the circuit's solved node voltages.
import { readFileSync } from 'node:fs';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { analyzeStage } from '@/lib/calc';
import { solveChain, type ChainStage } from '@/lib/calc/chain';
import { circuitNodes, ladderToCircuit, type SupplyCircuit } from '@/lib/calc/supply';
import { stageInputSchema } from '@/lib/validation/stage';

const stage = (file: string, id: number, position: number, node: string): ChainStage => {
  const input = stageInputSchema.parse(JSON.parse(readFileSync(path.resolve(__dirname, '../../fixtures/stages', file), 'utf8')));
  return { id, name: file, position, supplyNode: node, input, heater: { voltage: 6.3, current: 0.3, sections: 2, designation: 'test' } };
};

const circuit: SupplyCircuit = {
  mains: { voltage: 230, frequency: 50, variation: 0.1 },
  secondary: { voltage: 340, resistance: 50, primaryResistance: 4, currentRating: 0.3 },
  rectifier: { kind: 'vacuum', type: '5AR4' },
  reservoir: { capacitance: 40e-6, voltageRating: 550, key: 'B+1', name: 'Plates' },
  sections: [
    { kind: 'choke', inductance: 8, resistance: 100 },
    { kind: 'capacitor', capacitance: 47e-6, voltageRating: 500, key: 'B+2', name: 'Driver' },
    { kind: 'resistor', resistance: 10e3 },
    { kind: 'capacitor', capacitance: 22e-6, voltageRating: 450, key: 'B+3', name: 'Preamp' },
  ],
  loads: [{ node: 0, resistance: 150e3 }],
};

describe('chain on a supply circuit', () => {
  const stages = [stage('cc-12ax7-bypassed.json', 1, 0, 'B+3'), stage('cc-12au7-fixed.json', 2, 1, 'B+2'), stage('pp-6l6-ab-fixed.json', 3, 2, 'B+1')];
  const r = solveChain(stages, { heaters: [{ key: 'h1', name: '6.3 V', voltage: 6.3 }, { key: 'h2', name: '5 V', voltage: 5 }], circuit }, { sweep: false } as never);

  it('analyses each stage at its solved idle node voltage (its bias point follows the supply)', () => {
    expect(r.supply?.circuit).toBeDefined();
    for (const st of r.stages) {
      const node = r.supply!.nodes.find((n) => n.key === st.supplyNode)!;
      expect(st.solvedSupply).toBeCloseTo(node.voltage, 6);
      // the stage's current at that voltage, computed on its own, is what the node carries for it
      const own = analyzeStage({ ...stages.find((s) => s.id === st.stageId)!.input!, supply: st.solvedSupply! } as never);
      expect(st.supplyCurrent! / (own.perTube.length >= 2 ? own.perTube.reduce((a, t) => a + t.plateCurrent + (t.screenCurrent ?? 0), 0) : own.operatingPoint.plateCurrent + (own.operatingPoint.screenCurrent ?? 0))).toBeCloseTo(1, 2);
    }
  });

  it('the node currents add up: through current = own stages + everything downstream', () => {
    const n = r.supply!.nodes;
    for (let j = 0; j < n.length - 1; j++) expect(n[j]!.currentOut).toBeCloseTo(n[j + 1]!.currentIn, 9);
    expect(n[2]!.stageIds).toEqual([1]);
  });

  it('the class-AB output stage draws more at full drive, so the plate node sags', () => {
    expect(r.supply!.circuit!.nodes[0]!.sag).toBeGreaterThan(1);
  });

  it('adds the rectifier heater to the 5 V heater supply', () => {
    const h5 = r.heaters.find((h) => h.voltage === 5)!;
    expect(h5.loads.map((l) => l.designation)).toContain('5AR4 (rectifier)');
    expect(h5.current).toBeCloseTo(1.9, 9);
  });
});

describe('ladder ↔ circuit', () => {
  it('mirrors the circuit nodes with their series resistance and keeps the keys', () => {
    const nodes = circuitNodes(circuit);
    expect(nodes.map((x) => x.key)).toEqual(['B+1', 'B+2', 'B+3']);
    expect(nodes[1]).toMatchObject({ droppingResistor: 100, inductance: 8 });
    expect(nodes[2]).toMatchObject({ droppingResistor: 10e3, filterCapacitor: 22e-6 });
  });
  it('turns a ladder into a circuit with the same node keys', () => {
    const c = ladderToCircuit({ rawVoltage: 400, sourceResistance: 50, nodes: [{ key: 'A', name: 'a', droppingResistor: 10, filterCapacitor: 47e-6 }, { key: 'B', name: 'b', droppingResistor: 4700, filterCapacitor: 22e-6 }] });
    expect(circuitNodes(c).map((x) => x.key)).toEqual(['A', 'B']);
    expect(c.secondary.voltage * Math.SQRT2).toBeCloseTo(401.4, 0);
    expect(c.secondary.resistance).toBe(60);
  });
});
