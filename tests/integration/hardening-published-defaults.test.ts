// Published library entries: only an admin sets their default model. A designer's first model on a published
// type without a default does not become its default (nor the model stages use when none is chosen).
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { POST as analyze } from '@/app/api/analyze/route';
import { GET as getTube } from '@/app/api/tubes/[id]/route';
import { POST as addModel } from '@/app/api/tubes/[id]/models/route';
import { PATCH as patchModel } from '@/app/api/tubes/[id]/models/[modelId]/route';
import { TubeModel, TubeType } from '@/models';
import { call } from '../support/api';

let id: string;
const model = (name: string, extra: Record<string, unknown> = {}) => ({ kind: 'koren-triode', name, parameters: { mu: 100, ex: 1.4, kg1: 1060, kp: 600, kvb: 300 }, ...extra });

beforeAll(async () => {
  // a published, ratings-only triode (as an admin would publish one before anyone has a model for it)
  const t = await TubeType.create({
    designation: `HX${Date.now() % 100000}`, family: 'triode', sections: 2, heater: { voltage: 6.3, current: 0.3 }, published: true, createdById: null,
    ratings: { plateDissipation: { value: 1, source: 'test fixture' }, plateVoltage: { value: 300, source: 'test fixture' } },
  } as never);
  id = String(t.id);
});
afterAll(async () => {
  await TubeModel.destroy({ where: { tubeTypeId: Number(id) } });
  await TubeType.destroy({ where: { id: Number(id) } });
});

const defaultOf = async () => ((await call(getTube, { as: 'designer', params: { id } })).json.tube.models as { id: number; isDefault: boolean }[]).find((m) => m.isDefault) ?? null;

describe('defaults of published tube types', () => {
  it("a designer's first model is added but is not the default, and is not used unless chosen", async () => {
    const r = await call(addModel, { as: 'designer', method: 'POST', params: { id }, body: model('Designer guess') });
    expect(r.status, JSON.stringify(r.json)).toBe(201);
    const mine = r.json.model;
    expect(mine.isDefault).toBe(false);
    expect(await defaultOf()).toBeNull();

    const stage = { topology: 'common-cathode', tubeId: Number(id), supply: 250, gridResistor: '1M', plateResistor: '100k', bias: { kind: 'cathode', cathodeResistor: '1k5', cathodeBypass: '22u' }, drive: { amplitude: 0.5, frequency: 1000 } };
    const implicit = await call(analyze, { as: 'designer', method: 'POST', body: stage });
    expect(implicit.status, JSON.stringify(implicit.json)).toBe(422);
    const chosen = await call(analyze, { as: 'designer', method: 'POST', body: { ...stage, tubeModelId: mine.id } });
    expect(chosen.status, JSON.stringify(chosen.json)).toBe(200);
  });

  it('a designer may not make any model the default; an admin may', async () => {
    const asked = await call(addModel, { as: 'designer', method: 'POST', params: { id }, body: model('Pushy', { setDefault: true }) });
    expect(asked.status).toBe(403);
    const some = (await TubeModel.findOne({ where: { tubeTypeId: Number(id) } }))!;
    const patch = await call(patchModel, { as: 'designer', method: 'PATCH', params: { id, modelId: String(some.id) }, body: { setDefault: true } });
    expect(patch.status).toBe(403);
    expect(await defaultOf()).toBeNull();

    const admin = await call(addModel, { as: 'admin', method: 'POST', params: { id }, body: model('Library set') });
    expect(admin.status, JSON.stringify(admin.json)).toBe(201);
    expect(admin.json.model.isDefault).toBe(true);
    expect((await defaultOf())?.id).toBe(admin.json.model.id);
  });
});
