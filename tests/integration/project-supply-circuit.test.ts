// A project's supply as a circuit: stored with the project (PATCH supplyCircuit), solved with the stages it feeds
// (GET chain: stages at the solved node voltages), nodes that stages use cannot be removed, null returns to the ladder.
import { beforeAll, describe, expect, it } from 'vitest';
import { GET as chainRoute } from '@/app/api/projects/[id]/chain/route';
import { PATCH as patchProject } from '@/app/api/projects/[id]/route';
import { POST as createStage } from '@/app/api/projects/[id]/stages/route';
import { POST as createProjectRoute } from '@/app/api/projects/route';
import { Project, TubeType } from '@/models';
import { call } from '../support/api';

let projectId: number;
let version: number;

const circuit = (withDriverNode = true) => ({
  mains: { voltage: 230, frequency: 50 },
  secondary: { voltage: 300, resistance: 45, primaryResistance: 5, currentRating: 0.2 },
  rectifier: { kind: 'vacuum', type: '5AR4' },
  reservoir: { capacitance: '47u', voltageRating: 500, key: 'B+1', name: 'Output' },
  sections: withDriverNode ? [{ kind: 'resistor', resistance: '4k7' }, { kind: 'capacitor', capacitance: '22u', voltageRating: 450, key: 'B+2', name: 'Driver' }] : [],
  loads: [{ node: 0, resistance: '220k' }],
});

beforeAll(async () => {
  const created = await call(createProjectRoute, {
    as: 'designer',
    method: 'POST',
    body: { name: `Supply circuit ${Date.now()}`, supply: { rawVoltage: 400, sourceResistance: 50, nodes: [{ key: 'B+1', name: 'Output', droppingResistor: 0, filterCapacitor: 47e-6 }, { key: 'B+2', name: 'Driver', droppingResistor: 4700, filterCapacitor: 22e-6 }] } },
  });
  expect(created.status).toBe(201);
  projectId = created.json.project.id;
  const tube = await TubeType.findOne({ where: { designation: '12AU7' } });
  const stage = await call(createStage, {
    as: 'designer',
    method: 'POST',
    params: { id: String(projectId) },
    body: { name: 'Driver', supplyNode: 'B+2', topology: 'common-cathode', tubeId: tube!.id, supply: 300, plateResistor: 22e3, gridResistor: 1e6, bias: { kind: 'cathode', cathodeResistor: 1000, cathodeBypass: 47e-6 } },
  });
  expect(stage.status).toBe(201);
  version = created.json.project.version;
});

describe('project supply circuit', () => {
  it('is stored with the project and mirrored into the node list the stage editor reads', async () => {
    const res = await call(patchProject, { as: 'designer', method: 'PATCH', params: { id: String(projectId) }, body: { version, supplyCircuit: circuit() } });
    expect(res.status).toBe(200);
    const p = res.json.project;
    version = p.version;
    expect(p.supplyCircuit.rectifier).toEqual({ kind: 'vacuum', type: '5AR4' });
    expect(p.supplyCircuit.reservoir.capacitance).toBeCloseTo(47e-6, 12);
    expect(p.supply.nodes.map((n: { key: string }) => n.key)).toEqual(['B+1', 'B+2']);
    expect(p.supply.nodes[1].droppingResistor).toBe(4700);
  });

  it('the chain is solved on the circuit: the stage sits at its node’s solved voltage, with ripple and ratings', async () => {
    const res = await call(chainRoute, { as: 'reviewer', params: { id: String(projectId) }, path: `/api/projects/${projectId}/chain` });
    expect(res.status).toBe(200);
    const { chain } = res.json;
    const node = chain.supply.nodes.find((n: { key: string }) => n.key === 'B+2');
    expect(chain.stages[0].solvedSupply).toBeCloseTo(node.voltage, 6);
    expect(chain.supply.circuit.nodes[1].ripplePeakToPeak).toBeGreaterThan(0);
    expect(chain.supply.circuit.rectifier.heater).toEqual({ voltage: 5, current: 1.9 });
    expect(chain.supply.circuit.ratings.length).toBeGreaterThan(3);
    // the driver's current passes through the 4.7 kΩ: the node sits that much below the reservoir (Ohm's law)
    const drop = chain.supply.nodes[0].voltage - node.voltage;
    expect(drop).toBeCloseTo(4700 * chain.stages[0].supplyCurrent, 1);
  });

  it('refuses to drop a node a stage draws from', async () => {
    const res = await call(patchProject, { as: 'designer', method: 'PATCH', params: { id: String(projectId) }, body: { version, supplyCircuit: circuit(false) } });
    expect(res.status).toBe(422);
    expect(Object.keys(res.json.error.fieldErrors)).toContain('supplyCircuit');
  });

  it('a technician cannot change it; null returns the project to its ladder', async () => {
    const denied = await call(patchProject, { as: 'technician', method: 'PATCH', params: { id: String(projectId) }, body: { version, supplyCircuit: null } });
    expect(denied.status).toBe(403);
    const res = await call(patchProject, { as: 'designer', method: 'PATCH', params: { id: String(projectId) }, body: { version, supplyCircuit: null } });
    expect(res.status).toBe(200);
    expect(res.json.project.supplyCircuit).toBeNull();
    const chain = await call(chainRoute, { as: 'designer', params: { id: String(projectId) }, path: `/api/projects/${projectId}/chain` });
    expect(chain.json.chain.supply.circuit).toBeUndefined();
  });
});

describe('demo projects', () => {
  it('carry supply circuits that solve with their stages', async () => {
    for (const name of ['Crunch preamp (two 12AX7 stages + cathode follower)', 'Single-ended 300B output with 12AU7 driver']) {
      const p = await Project.findOne({ where: { name } });
      expect(p?.supplyCircuit, name).toBeTruthy();
      const res = await call(chainRoute, { as: 'designer', params: { id: String(p!.id) }, path: `/api/projects/${p!.id}/chain` });
      expect(res.status).toBe(200);
      const { chain } = res.json;
      expect(chain.supply.circuit.nodes.length).toBeGreaterThan(1);
      for (const st of chain.stages) expect(st.solvedSupply, st.name).toBeGreaterThan(100);
    }
  });
});
