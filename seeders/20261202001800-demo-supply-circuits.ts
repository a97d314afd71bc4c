// The demo projects' supplies as circuits (invented workshop values): the preamp on a small silicon-bridge
// supply with an RC ladder, the 300B amplifier on a 5U4GB with a choke input. Node keys match the stages'.
// Seeders must not import server-only modules: the validation schema is imported relatively.
import { Op, QueryTypes, type QueryInterface } from 'sequelize';
import { supplyCircuitSchema, type SupplyCircuitInput } from '../lib/validation/supply';

type Ctx = { context: QueryInterface };

export const DEMO_SUPPLY_CIRCUITS: { project: string; circuit: SupplyCircuitInput }[] = [
  {
    project: 'Crunch preamp (two 12AX7 stages + cathode follower)',
    circuit: {
      mains: { voltage: 230, frequency: 50, variation: 0.1 },
      secondary: { voltage: 240, resistance: 120, primaryResistance: 25, currentRating: 0.05 },
      rectifier: { kind: 'silicon-bridge', type: '1N4007' },
      reservoir: { capacitance: '47u', voltageRating: 400, key: 'B+1', name: 'Preamp feed' },
      sections: [
        { kind: 'resistor', resistance: '10k', powerRating: 0.5 },
        { kind: 'capacitor', capacitance: '22u', voltageRating: 400, key: 'B+2', name: 'Gain stage and follower' },
        { kind: 'resistor', resistance: '22k', powerRating: 0.5 },
        { kind: 'capacitor', capacitance: '22u', voltageRating: 400, key: 'B+3', name: 'Input stage' },
      ],
      loads: [{ node: 0, resistance: '220k', label: 'bleeder' }],
    },
  },
  {
    project: 'Single-ended 300B output with 12AU7 driver',
    circuit: {
      mains: { voltage: 230, frequency: 50, variation: 0.1 },
      secondary: { voltage: 470, resistance: 110, primaryResistance: 6, currentRating: 0.15 },
      rectifier: { kind: 'vacuum', type: '5U4GB' },
      reservoir: null,
      sections: [
        { kind: 'choke', inductance: 10, resistance: 90, currentRating: 0.15 },
        { kind: 'capacitor', capacitance: '100u', voltageRating: 800, key: 'B+1', name: 'Output plate (after choke)' },
        { kind: 'resistor', resistance: '10k', powerRating: 2 },
        { kind: 'capacitor', capacitance: '47u', voltageRating: 630, key: 'B+2', name: 'Driver' },
      ],
      loads: [{ node: 0, resistance: '100k', label: 'bleeder' }],
    },
  },
];

export async function up({ context: qi }: Ctx) {
  for (const d of DEMO_SUPPLY_CIRCUITS) {
    const circuit = supplyCircuitSchema.parse(d.circuit);
    await qi.sequelize.query(`UPDATE projects SET supply_circuit = :circuit::jsonb WHERE name = :name AND supply_circuit IS NULL`, {
      type: QueryTypes.UPDATE,
      replacements: { circuit: JSON.stringify(circuit), name: d.project },
    });
  }
}

export async function down({ context: qi }: Ctx) {
  await qi.bulkUpdate('projects', { supply_circuit: null }, { name: { [Op.in]: DEMO_SUPPLY_CIRCUITS.map((d) => d.project) } });
}
