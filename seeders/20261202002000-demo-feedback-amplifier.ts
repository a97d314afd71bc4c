// The invented workshop's push-pull amplifier with a global feedback loop: a 12AX7 input stage, a 12AU7
// long-tailed pair and a pair of 6L6GC into a 6.6 kΩ transformer, with feedback from the 8 Ω tap to the input
// stage's cathode through a step network. Its margins, damping factor and distortion with and without the loop are
// on the project's chain view. Seeders must not import server-only modules: the engine is imported relatively.
import { Op, QueryTypes, type QueryInterface } from 'sequelize';
import { analyzeStage, CalcError } from '../lib/calc';
import { engineTubeFrom } from '../lib/tubes/engine-tube';
import { stageBodySchema, stageInputSchema } from '../lib/validation/stage';
import type { TubeCapacitancesRecord, TubeRatingsRecord } from '../models/types';

type Ctx = { context: QueryInterface };

export const FEEDBACK_DEMO = {
  name: 'Workshop 6L6GC push-pull with global feedback',
  description:
    'Thirty-watt-class push-pull amplifier for the workshop’s bench speaker: 12AX7 input stage, 12AU7 long-tailed-pair splitter and ' +
    'a fixed-bias 6L6GC pair into a 6.6 kΩ : 8 Ω transformer. Feedback from the 8 Ω tap (10 kΩ with a 470 pF step capacitor) into ' +
    'a 100 Ω resistor under the input stage’s cathode bias.',
  supply: {
    rawVoltage: 450,
    sourceResistance: 40,
    nodes: [
      { key: 'B+1', name: 'Output plates', droppingResistor: 20, filterCapacitor: 100e-6 },
      { key: 'B+2', name: 'Screens and splitter', droppingResistor: 1000, filterCapacitor: 47e-6 },
      { key: 'B+3', name: 'Input stage', droppingResistor: 22000, filterCapacitor: 22e-6 },
    ],
    heaters: [{ key: 'H1', name: '6.3 V heater winding', voltage: 6.3 }],
  },
  stages: [
    {
      name: 'V1 input stage',
      designation: '12AX7',
      supplyNode: 'B+3',
      inputs: {
        topology: 'common-cathode', supply: 300, gridResistor: 1e6, plateResistor: 100e3,
        bias: { kind: 'cathode', cathodeResistor: 1500, cathodeBypass: 22e-6 },
        load: { resistance: 1e6, couplingCapacitor: 47e-9 }, drive: { amplitude: 0.1, frequency: 1000 },
      },
    },
    {
      name: 'V2 long-tailed pair',
      designation: '12AU7',
      supplyNode: 'B+2',
      inputs: {
        topology: 'long-tailed-pair', supply: 400, gridResistor: 1e6, plateResistors: { inverting: 82e3, nonInverting: 100e3 },
        tail: { kind: 'resistor', biasResistor: 820, tailResistor: 22e3, tailSupply: 0 }, grids: { kind: 'bias-tap' }, secondGridBypass: 100e-9,
        load: { resistance: 220e3, couplingCapacitor: 100e-9 }, drive: { amplitude: 2, frequency: 1000 },
      },
    },
    {
      name: 'V3/V4 6L6GC pair',
      designation: '6L6GC',
      supplyNode: 'B+1',
      inputs: {
        topology: 'push-pull-output', class: 'AB', supply: 430, gridResistor: 220e3, plateToPlateImpedance: 6600, primaryResistance: 180,
        bias: { kind: 'fixed', fixedBias: -38 }, screen: { kind: 'fixed', supply: 400 }, drive: { amplitude: 20, frequency: 1000 },
        transformer: { speakerLoad: 8, secondaryResistance: 0.25, primaryInductance: 40, leakageInductance: 15e-3, windingCapacitance: 800e-12 },
        feedback: { resistor: 10e3, shuntResistor: 100, capacitor: 470e-12, polarity: 'auto' },
      },
    },
  ],
};

type TubeRow = { id: number; designation: string; ratings: TubeRatingsRecord; capacitances: TubeCapacitancesRecord };
type ModelRow = { id: number; name: string; kind: string; parameters: Record<string, number> };

export async function up({ context: qi }: Ctx) {
  const demo = FEEDBACK_DEMO;
  const designations = [...new Set(demo.stages.map((s) => s.designation))];
  const tubes = await qi.sequelize.query<TubeRow>('SELECT id, designation, ratings, capacitances FROM tube_types WHERE designation IN (:designations)', {
    type: QueryTypes.SELECT,
    replacements: { designations },
  });
  const missing = designations.filter((d) => !tubes.some((t) => t.designation === d));
  if (missing.length) {
    console.warn(`[seed] feedback demo skipped: the tube library lacks ${missing.join(', ')}`);
    return;
  }
  const [designer] = await qi.sequelize.query<{ id: number }>(`SELECT id FROM users WHERE email = 'designer@anodyne.test'`, { type: QueryTypes.SELECT });
  const at = new Date();
  await qi.sequelize.transaction(async (transaction) => {
    const [rows] = (await qi.sequelize.query(
      `INSERT INTO projects (name, description, status, archived, owner_id, supply, bench_tolerances, version, created_at, updated_at)
       VALUES (:name, :description, 'draft', false, :owner, :supply::jsonb, '{}'::jsonb, 1, :at, :at) RETURNING id`,
      { replacements: { name: demo.name, description: demo.description, owner: designer?.id ?? null, supply: JSON.stringify(demo.supply), at }, transaction },
    )) as [{ id: number }[], unknown];
    const projectId = rows[0]!.id;
    for (const [si, s] of demo.stages.entries()) {
      const tube = tubes.find((t) => t.designation === s.designation)!;
      const [model] = await qi.sequelize.query<ModelRow>(
        'SELECT id, name, kind, parameters FROM tube_models WHERE tube_type_id = :id ORDER BY is_default DESC, id ASC LIMIT 1',
        { type: QueryTypes.SELECT, replacements: { id: tube.id }, transaction },
      );
      const body = stageBodySchema.parse({ ...s.inputs, tubeId: tube.id });
      let analysis: unknown = null;
      let analysisError: unknown = null;
      if (!model) analysisError = { code: 'invalid-input', message: `${s.designation} has no model in the library.` };
      else {
        try {
          analysis = analyzeStage(stageInputSchema.parse({ ...s.inputs, tube: engineTubeFrom(tube, model) }));
        } catch (err) {
          if (!(err instanceof CalcError)) throw err;
          analysisError = { code: err.code, message: err.message };
        }
      }
      await qi.sequelize.query(
        `INSERT INTO stages (project_id, position, name, topology, tube_type_id, tube_model_id, supply_node, inputs, analysis, analysis_error, version, created_at, updated_at)
         VALUES (:projectId, :position, :name, :topology, :tubeTypeId, NULL, :supplyNode, :inputs::jsonb, :analysis::jsonb, :analysisError::jsonb, 1, :at, :at)`,
        {
          replacements: {
            projectId,
            position: si + 1,
            name: s.name,
            topology: body.topology,
            tubeTypeId: tube.id,
            supplyNode: s.supplyNode,
            inputs: JSON.stringify(body),
            analysis: analysis === null ? null : JSON.stringify(analysis),
            analysisError: analysisError === null ? null : JSON.stringify(analysisError),
            at,
          },
          transaction,
        },
      );
    }
  });
}

export async function down({ context: qi }: Ctx) {
  await qi.bulkDelete('projects', { name: { [Op.in]: [FEEDBACK_DEMO.name] } });
}
