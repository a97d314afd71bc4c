// The invented workshop's EL34 push-pull amplifier with a concertina splitter: a 12AX7 input stage whose plate
// drives the split-load 12AU7 directly (DC-coupled), and a cathode-biased EL34 pair fed from its two outputs.
// The chain view solves it end to end: at the default 100 mV input the pair is driven past its clip point, so the
// view shows the clipped waveforms and the level sweep with the clip point. Seeders must not import server-only
// modules: the engine is imported relatively.
import { Op, QueryTypes, type QueryInterface } from 'sequelize';
import { analyzeStage, CalcError } from '../lib/calc';
import { engineTubeFrom } from '../lib/tubes/engine-tube';
import { stageBodySchema, stageInputSchema } from '../lib/validation/stage';
import type { TubeCapacitancesRecord, TubeRatingsRecord } from '../models/types';

type Ctx = { context: QueryInterface };

type DemoLink = { from: number; output?: string; to: number; input?: string; coupling: { kind: 'capacitor'; capacitance: number } | { kind: 'direct' } };

export const CONCERTINA_DEMO = {
  name: 'Workshop EL34 push-pull with a concertina splitter',
  description:
    'Twenty-watt-class amplifier for the workshop’s reference speaker: a 12AX7 input stage DC-coupled into a 12AU7 ' +
    'split-load (concertina) splitter, and a cathode-biased EL34 pair into an 8 kΩ plate-to-plate transformer.',
  supply: {
    rawVoltage: 430,
    sourceResistance: 50,
    nodes: [
      { key: 'B+1', name: 'Output plates and screens', droppingResistor: 10, filterCapacitor: 100e-6 },
      { key: 'B+2', name: 'Splitter', droppingResistor: 470, filterCapacitor: 47e-6 },
      { key: 'B+3', name: 'Input stage', droppingResistor: 33000, filterCapacitor: 22e-6 },
    ],
    heaters: [{ key: 'H1', name: '6.3 V heater winding', voltage: 6.3 }],
  },
  stages: [
    {
      name: 'V1a input stage',
      designation: '12AX7',
      supplyNode: 'B+3',
      inputs: {
        topology: 'common-cathode', supply: 250, gridResistor: 1e6, plateResistor: 220e3,
        bias: { kind: 'cathode', cathodeResistor: 1500, cathodeBypass: 22e-6 }, drive: { amplitude: 0.1, frequency: 1000 },
      },
    },
    {
      name: 'V2 concertina splitter',
      designation: '12AU7',
      supplyNode: 'B+2',
      inputs: {
        topology: 'split-load', supply: 400, gridResistor: 1e6, plateResistor: 47e3, cathodeResistor: 47e3, biasResistor: 1000,
        bias: { kind: 'dc-coupled', gridVoltage: 130 }, drive: { amplitude: 5, frequency: 1000 },
      },
    },
    {
      name: 'V3/V4 EL34 pair',
      designation: 'EL34',
      supplyNode: 'B+1',
      inputs: {
        topology: 'push-pull-output', class: 'A', supply: 420, gridResistor: 220e3, plateToPlateImpedance: 8000, primaryResistance: 150,
        bias: { kind: 'cathode', cathodeResistor: 150, cathodeBypass: 100e-6 }, screen: { kind: 'resistor', resistor: 470, bypass: 10e-6 },
        drive: { amplitude: 20, frequency: 1000 },
      },
    },
  ],
  links: [
    { from: 0, to: 1, coupling: { kind: 'direct' } },
    { from: 1, output: 'cathode', to: 2, input: 'grid1', coupling: { kind: 'capacitor', capacitance: 100e-9 } },
    { from: 1, output: 'plate', to: 2, input: 'grid2', coupling: { kind: 'capacitor', capacitance: 100e-9 } },
  ] as DemoLink[],
};

type TubeRow = { id: number; designation: string; ratings: TubeRatingsRecord; capacitances: TubeCapacitancesRecord };
type ModelRow = { id: number; name: string; kind: string; parameters: Record<string, number> };

export async function up({ context: qi }: Ctx) {
  const demo = CONCERTINA_DEMO;
  const designations = [...new Set(demo.stages.map((s) => s.designation))];
  const tubes = await qi.sequelize.query<TubeRow>('SELECT id, designation, ratings, capacitances FROM tube_types WHERE designation IN (:designations)', {
    type: QueryTypes.SELECT,
    replacements: { designations },
  });
  const missing = designations.filter((d) => !tubes.some((t) => t.designation === d));
  if (missing.length) {
    console.warn(`[seed] concertina demo skipped: the tube library lacks ${missing.join(', ')}`);
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
    const ids: number[] = [];
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
      const [stageRows] = (await qi.sequelize.query(
        `INSERT INTO stages (project_id, position, name, topology, tube_type_id, tube_model_id, supply_node, inputs, analysis, analysis_error, version, created_at, updated_at)
         VALUES (:projectId, :position, :name, :topology, :tubeTypeId, NULL, :supplyNode, :inputs::jsonb, :analysis::jsonb, :analysisError::jsonb, 1, :at, :at) RETURNING id`,
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
      )) as [{ id: number }[], unknown];
      ids.push(stageRows[0]!.id);
    }
    // the stored links name stages by id: the input stage's plate drives the splitter's grid directly
    const links = demo.links.map((l) => ({ ...l, from: String(ids[l.from]), to: String(ids[l.to]) }));
    await qi.sequelize.query('UPDATE projects SET chain_links = :links::jsonb WHERE id = :projectId', {
      replacements: { links: JSON.stringify(links), projectId },
      transaction,
    });
  });
}

export async function down({ context: qi }: Ctx) {
  await qi.bulkDelete('projects', { name: { [Op.in]: [CONCERTINA_DEMO.name] } });
}
