// The invented workshop's two demo projects, fully analysed with the library's default tube models:
// a two-stage 12AX7 guitar preamp feeding a cathode follower, and a single-ended 300B output stage with its 12AU7 driver.
// Seeders must not import server-only modules, so the engine is imported relatively and tubes are read with SQL.
import { Op, QueryTypes, type QueryInterface } from 'sequelize';
import { analyzeStage, CalcError } from '../lib/calc';
import { engineTubeFrom } from '../lib/tubes/engine-tube';
import { stageBodySchema, stageInputSchema } from '../lib/validation/stage';
import type { TubeCapacitancesRecord, TubeRatingsRecord } from '../models/types';

type Ctx = { context: QueryInterface };

type DemoStage = { name: string; designation: string; supplyNode: string; inputs: Record<string, unknown> };
type DemoProject = { name: string; description: string; supply: Record<string, unknown>; stages: DemoStage[] };

export const DEMO_PROJECTS: DemoProject[] = [
  {
    name: 'Crunch preamp (two 12AX7 stages + cathode follower)',
    description:
      'Guitar preamp for the workshop combo: a bypassed 12AX7 input stage, a second gain stage with a partly bypassed cathode, ' +
      'and a self-biased cathode follower to drive the tone stack. Fed from the power amp’s screen node.',
    supply: {
      rawVoltage: 310,
      sourceResistance: 200,
      nodes: [
        { key: 'B+1', name: 'Preamp feed', droppingResistor: 4700, filterCapacitor: 47e-6 },
        { key: 'B+2', name: 'Gain stage and follower', droppingResistor: 10000, filterCapacitor: 22e-6 },
        { key: 'B+3', name: 'Input stage', droppingResistor: 22000, filterCapacitor: 22e-6 },
      ],
      heaters: [{ key: 'H1', name: '6.3 V heater winding', voltage: 6.3 }],
    },
    stages: [
      {
        name: 'V1a input stage',
        designation: '12AX7',
        supplyNode: 'B+3',
        inputs: {
          topology: 'common-cathode', supply: 280, gridResistor: 1e6, sourceResistance: 68e3, plateResistor: 100e3,
          bias: { kind: 'cathode', cathodeResistor: 1500, cathodeBypass: 22e-6 },
          load: { resistance: 1e6, couplingCapacitor: 22e-9 }, drive: { amplitude: 0.14, frequency: 1000 },
        },
      },
      {
        name: 'V1b gain stage',
        designation: '12AX7',
        supplyNode: 'B+2',
        inputs: {
          topology: 'common-cathode', supply: 300, gridResistor: 470e3, plateResistor: 100e3,
          bias: { kind: 'cathode', cathodeResistor: 2700, cathodeBypass: 1e-6 },
          load: { resistance: 1e6, couplingCapacitor: 22e-9 }, drive: { amplitude: 0.5, frequency: 1000 },
        },
      },
      {
        name: 'V2a cathode follower',
        designation: '12AX7',
        supplyNode: 'B+2',
        inputs: {
          topology: 'cathode-follower', supply: 300, gridResistor: 1e6, cathodeResistor: 100e3,
          bias: { kind: 'self', biasResistor: 1500 },
          load: { resistance: 100e3, couplingCapacitor: 100e-9 }, drive: { amplitude: 5, frequency: 1000 },
        },
      },
    ],
  },
  {
    name: 'Single-ended 300B output with 12AU7 driver',
    description:
      'Eight-watt-class single-ended amplifier: a 12AU7 driver with a bypassed cathode, RC-coupled to a cathode-biased 300B ' +
      'into a 3.5 kΩ output transformer. Choke-input filter ahead of the output node.',
    supply: {
      rawVoltage: 440,
      sourceResistance: 60,
      nodes: [
        { key: 'B+1', name: 'Output plate (after choke)', droppingResistor: 90, filterCapacitor: 100e-6 },
        { key: 'B+2', name: 'Driver', droppingResistor: 10000, filterCapacitor: 47e-6 },
      ],
      heaters: [
        { key: 'H1', name: '6.3 V heater winding', voltage: 6.3 },
        { key: 'H2', name: '5 V filament winding', voltage: 5 },
      ],
    },
    stages: [
      {
        name: 'V1 driver',
        designation: '12AU7',
        supplyNode: 'B+2',
        inputs: {
          topology: 'common-cathode', supply: 330, gridResistor: 100e3, plateResistor: 47e3,
          bias: { kind: 'cathode', cathodeResistor: 1000, cathodeBypass: 47e-6 },
          load: { resistance: 220e3, couplingCapacitor: 220e-9 }, drive: { amplitude: 2, frequency: 1000 },
        },
      },
      {
        name: 'V2 300B output',
        designation: '300B',
        supplyNode: 'B+1',
        inputs: {
          topology: 'single-ended-output', supply: 420, gridResistor: 220e3, primaryImpedance: 3500, primaryResistance: 120,
          bias: { kind: 'cathode', cathodeResistor: 1000, cathodeBypass: 100e-6 }, drive: { amplitude: 50, frequency: 1000 },
        },
      },
    ],
  },
];

type TubeRow = { id: number; designation: string; ratings: TubeRatingsRecord; capacitances: TubeCapacitancesRecord };
type ModelRow = { id: number; name: string; kind: string; parameters: Record<string, number> };

export async function up({ context: qi }: Ctx) {
  const designations = [...new Set(DEMO_PROJECTS.flatMap((p) => p.stages.map((s) => s.designation)))];
  const tubes = await qi.sequelize.query<TubeRow>('SELECT id, designation, ratings, capacitances FROM tube_types WHERE designation IN (:designations)', {
    type: QueryTypes.SELECT,
    replacements: { designations },
  });
  const missing = designations.filter((d) => !tubes.some((t) => t.designation === d));
  if (missing.length) {
    console.warn(`[seed] demo projects skipped: the tube library lacks ${missing.join(', ')}`);
    return;
  }
  const [designer] = await qi.sequelize.query<{ id: number }>(`SELECT id FROM users WHERE email = 'designer@anodyne.test'`, { type: QueryTypes.SELECT });
  const now = new Date();
  await qi.sequelize.transaction(async (transaction) => {
    for (const [pi, demo] of DEMO_PROJECTS.entries()) {
      const at = new Date(now.getTime() - (DEMO_PROJECTS.length - pi) * 3600_000);
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
    }
  });
}

export async function down({ context: qi }: Ctx) {
  await qi.bulkDelete('projects', { name: { [Op.in]: DEMO_PROJECTS.map((p) => p.name) } });
}
