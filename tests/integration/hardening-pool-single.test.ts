// "No request waits for a second connection while holding one", proved with a pool of ONE connection: a write path
// that asks for another connection inside its transaction can never get it and times out (503). Every write
// path below – including the 409 answers and the read-back – must complete on the one connection.
import { beforeAll, describe, expect, it } from 'vitest';

type Api = typeof import('../support/api');
type Handler = Parameters<Api['call']>[0];
let api: Api;
let r: Record<string, Handler>;
let tubeId: number;

beforeAll(async () => {
  const { createSequelize } = await import('@/lib/db/sequelize');
  (globalThis as { anodyneSequelize?: unknown }).anodyneSequelize = createSequelize(process.env.DATABASE_URL!, { max: 1, acquire: 3_000 });
  api = await import('../support/api');
  r = {
    createProject: (await import('@/app/api/projects/route')).POST,
    patchProject: (await import('@/app/api/projects/[id]/route')).PATCH,
    addStage: (await import('@/app/api/projects/[id]/stages/route')).POST,
    patchStage: (await import('@/app/api/stages/[id]/route')).PATCH,
    deleteStage: (await import('@/app/api/stages/[id]/route')).DELETE,
    submit: (await import('@/app/api/projects/[id]/revisions/route')).POST,
  };
  const { TubeType } = await import('@/models');
  tubeId = (await TubeType.findOne({ where: { designation: '12AX7' } }))!.id;
});

const stageBody = () => ({
  name: 'V1a',
  topology: 'common-cathode',
  tubeId,
  supply: 250,
  gridResistor: '1M',
  plateResistor: '100k',
  bias: { kind: 'cathode', cathodeResistor: '1k5', cathodeBypass: '22u' },
  drive: { amplitude: 0.5, frequency: 1000 },
});

describe('one connection per request', () => {
  it('stage and project saves, their 409s, a stale delete and a revision submission all finish on a pool of one', async () => {
    const p = await api.call(r.createProject!, { as: 'designer', method: 'POST', body: { name: `Pool of one ${Date.now()}` } });
    expect(p.status, JSON.stringify(p.json)).toBe(201);
    const pid = String(p.json.project.id);
    const s = await api.call(r.addStage!, { as: 'designer', method: 'POST', params: { id: pid }, body: stageBody() });
    expect(s.status, JSON.stringify(s.json)).toBe(201);
    const sid = String(s.json.stage.id);

    const ok = await api.call(r.patchStage!, { as: 'designer', method: 'PATCH', params: { id: sid }, body: { version: 1, inputs: { plateResistor: '220k' } } });
    expect(ok.status, JSON.stringify(ok.json)).toBe(200);
    const stale = await api.call(r.patchStage!, { as: 'designer', method: 'PATCH', params: { id: sid }, body: { version: 1, name: 'late' } });
    expect(stale.status, JSON.stringify(stale.json)).toBe(409);
    expect(stale.json.error.details.current.version).toBe(2);
    expect(stale.json.error.details.current.tubeDesignation).toBe('12AX7');
    const staleDelete = await api.call(r.deleteStage!, { as: 'designer', method: 'DELETE', params: { id: sid }, path: `/api/stages/${sid}?version=1` });
    expect(staleDelete.status, JSON.stringify(staleDelete.json)).toBe(409);

    const proj = await api.call(r.patchProject!, { as: 'designer', method: 'PATCH', params: { id: pid }, body: { version: 1, description: 'first' } });
    expect(proj.status, JSON.stringify(proj.json)).toBe(200);
    const projStale = await api.call(r.patchProject!, { as: 'designer', method: 'PATCH', params: { id: pid }, body: { version: 1, description: 'late' } });
    expect(projStale.status, JSON.stringify(projStale.json)).toBe(409);
    expect(projStale.json.error.details.current.stages).toHaveLength(1);

    const rev = await api.call(r.submit!, { as: 'designer', method: 'POST', params: { id: pid }, body: { note: 'pool of one' } });
    expect(rev.status, JSON.stringify(rev.json)).toBe(201);
    const again = await api.call(r.submit!, { as: 'designer', method: 'POST', params: { id: pid } });
    expect(again.status, JSON.stringify(again.json)).toBe(409);
  });
});
