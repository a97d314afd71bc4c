// Phase splitters through the routes a designer uses: analyse with a library tube, save in a project, read back,
// and the refusals (a pentode in a splitter, a current-source tail with grids to a tap).
import { beforeAll, describe, expect, it } from 'vitest';
import * as analyzeRoute from '@/app/api/analyze/route';
import * as stagesRoute from '@/app/api/projects/[id]/stages/route';
import * as projectsRoute from '@/app/api/projects/route';
import * as stageRoute from '@/app/api/stages/[id]/route';
import { TubeModel, TubeType } from '@/models';
import { call } from '../support/api';

// Koren's published sets (tube-models.md §3.1); created when the library seeder has not run.
const KOREN: Record<string, { family: string; kind: string; params: Record<string, number>; ratings: Record<string, number> }> = {
  '12AX7': { family: 'triode', kind: 'koren-triode', params: { mu: 100, ex: 1.4, kg1: 1060, kp: 600, kvb: 300 }, ratings: { plateVoltage: 300, plateDissipation: 1 } },
  '12AU7': { family: 'triode', kind: 'koren-triode', params: { mu: 21.5, ex: 1.3, kg1: 1180, kp: 84, kvb: 300 }, ratings: { plateVoltage: 300, plateDissipation: 2.75 } },
  EL34: { family: 'pentode', kind: 'koren-pentode', params: { mu: 11, ex: 1.35, kg1: 650, kg2: 4200, kp: 60, kvb: 24 }, ratings: { plateVoltage: 800, plateDissipation: 25 } },
};
const ids: Record<string, number> = {};

beforeAll(async () => {
  for (const [designation, k] of Object.entries(KOREN)) {
    let t = await TubeType.findOne({ where: { designation } });
    if (!t) {
      t = await TubeType.create({
        designation, family: k.family, sections: k.family === 'triode' ? 2 : 1, heater: { voltage: 6.3, current: 0.3 }, published: true, createdById: null,
        ratings: Object.fromEntries(Object.entries(k.ratings).map(([key, value]) => [key, { value, source: 'test fixture' }])),
      } as never);
    }
    if (!(await TubeModel.findOne({ where: { tubeTypeId: t.id } }))) {
      await TubeModel.create({ tubeTypeId: t.id, name: 'Koren original', kind: k.kind, parameters: k.params, source: 'K96', isDefault: true, published: true, curveFitId: null, createdById: null } as never);
    }
    ids[designation] = t.id;
  }
});

const ltpBody = (over: Record<string, unknown> = {}) => ({
  topology: 'long-tailed-pair',
  tubeId: ids['12AX7'],
  supply: 350,
  gridResistor: '1M',
  plateResistors: { inverting: '100k', nonInverting: '100k' },
  tail: { kind: 'resistor', biasResistor: '1k', tailResistor: '22k' },
  grids: { kind: 'bias-tap' },
  secondGridBypass: '100n',
  load: { resistance: '220k', couplingCapacitor: '100n' },
  drive: { amplitude: 2, frequency: 1000 },
  ...over,
});

const slBody = () => ({
  topology: 'split-load',
  tubeId: ids['12AU7'],
  supply: 350,
  gridResistor: '1M',
  plateResistor: '22k',
  cathodeResistor: '22k',
  biasResistor: '1k5',
  bias: { kind: 'bootstrapped' },
  drive: { amplitude: 5, frequency: 1000 },
});

describe('phase splitters through the API', () => {
  it('analyses a long-tailed pair and a split-load stage with library tubes: both outputs and the balance', async () => {
    const ltp = await call(analyzeRoute.POST, { as: 'designer', method: 'POST', body: ltpBody() });
    expect(ltp.status, JSON.stringify(ltp.json)).toBe(200);
    const a = ltp.json.analysis;
    expect(Object.keys(a.outputs)).toEqual(['inverting', 'non-inverting']);
    expect(a.outputs.inverting.gain).toBeLessThan(0);
    expect(a.outputs['non-inverting'].gain).toBeGreaterThan(0);
    // a finite tail leaves the non-inverting output low (common practice)
    expect(a.balance.ratioDb).toBeLessThan(0);
    expect(a.perTube).toHaveLength(2);
    expect(a.tailCurrent).toBeGreaterThan(1e-3);

    const sl = await call(analyzeRoute.POST, { as: 'technician', method: 'POST', body: slBody() });
    expect(sl.status, JSON.stringify(sl.json)).toBe(200);
    expect(Object.keys(sl.json.analysis.outputs)).toEqual(['plate', 'cathode']);
    expect(sl.json.analysis.outputs.plate.outputImpedance).toBeGreaterThan(sl.json.analysis.outputs.cathode.outputImpedance);
  });

  it('refuses a pentode in a splitter on tubeId, and grids to a tap under a current-source tail on grids.kind', async () => {
    const pent = await call(analyzeRoute.POST, { as: 'designer', method: 'POST', body: ltpBody({ tubeId: ids.EL34 }) });
    expect(pent.status).toBe(422);
    expect(Object.keys(pent.json.error.fieldErrors)).toContain('tubeId');
    const tap = await call(analyzeRoute.POST, { as: 'designer', method: 'POST', body: ltpBody({ tail: { kind: 'current-source', current: '2m' } }) });
    expect(tap.status).toBe(422);
    expect(Object.keys(tap.json.error.fieldErrors)).toContain('grids.kind');
  });

  it('saves both splitters in a project and reads them back with their analyses', async () => {
    const p = await call(projectsRoute.POST, { as: 'designer', method: 'POST', body: { name: `Splitter bench ${Date.now()}`, description: 'integration test' } });
    expect(p.status, JSON.stringify(p.json)).toBe(201);
    const projectId = String(p.json.project.id);
    for (const body of [{ name: 'V2 phase inverter', ...ltpBody() }, { name: 'V2 concertina', ...slBody() }]) {
      const r = await call(stagesRoute.POST, { as: 'designer', method: 'POST', params: { id: projectId }, body });
      expect(r.status, JSON.stringify(r.json)).toBe(201);
      const got = await call(stageRoute.GET, { as: 'designer', params: { id: String(r.json.stage.id) } });
      expect(got.status).toBe(200);
      expect(got.json.stage.topology).toBe(body.topology);
      const text = JSON.stringify(got.json);
      expect(text).toContain(body.topology === 'long-tailed-pair' ? 'non-inverting' : 'cathode');
    }
  });
});
