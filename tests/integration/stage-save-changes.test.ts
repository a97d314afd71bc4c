// Saving a stage records only real changes: an unchanged save keeps the version and writes no audit row, and the
// audit row of an edit names exactly the input fields whose values differ.
import { beforeAll, describe, expect, it } from 'vitest';
import * as stagesRoute from '@/app/api/projects/[id]/stages/route';
import * as projectsRoute from '@/app/api/projects/route';
import * as stageRoute from '@/app/api/stages/[id]/route';
import { AuditEvent, TubeType } from '@/models';
import { call } from '../support/api';

let tubeId = 0;
beforeAll(async () => {
  const t = await TubeType.findOne({ where: { designation: '12AX7' } });
  expect(t, 'the tube library seeder provides 12AX7').toBeTruthy();
  tubeId = t!.id;
});

const body = () => ({
  name: 'V1a input',
  topology: 'common-cathode',
  tubeId,
  supply: 250,
  gridResistor: '1M',
  plateResistor: '100k',
  bias: { kind: 'cathode', cathodeResistor: '1k5', cathodeBypass: '22u' },
  drive: { amplitude: 0.5, frequency: 1000 },
});

describe('stage saves', () => {
  it('keeps the version and writes no audit row when nothing changed, and names only the changed fields', async () => {
    const p = await call(projectsRoute.POST, { as: 'designer', method: 'POST', body: { name: `Save changes ${Date.now()}`, description: '' } });
    expect(p.status).toBe(201);
    const created = await call(stagesRoute.POST, { as: 'designer', method: 'POST', params: { id: String(p.json.project.id) }, body: body() });
    expect(created.status, JSON.stringify(created.json)).toBe(201);
    const stage = created.json.stage;
    const rows = () => AuditEvent.count({ where: { targetType: 'stage', targetId: String(stage.id), action: 'stage.update' } });

    // the whole form sent again, same values (in other spellings: 100k vs 100000)
    const { tubeId: _t, name: _n, ...inputs } = body();
    const same = await call(stageRoute.PATCH, { as: 'designer', method: 'PATCH', params: { id: String(stage.id) }, body: { version: 1, name: 'V1a input', inputs: { ...inputs, plateResistor: 100000 } } });
    expect(same.status, JSON.stringify(same.json)).toBe(200);
    expect(same.json.stage.version).toBe(1);
    expect(await rows()).toBe(0);

    const edit = await call(stageRoute.PATCH, { as: 'designer', method: 'PATCH', params: { id: String(stage.id) }, body: { version: 1, name: 'V1a input', inputs: { ...inputs, bias: { kind: 'cathode', cathodeResistor: '2k2', cathodeBypass: '22u' } } } });
    expect(edit.status, JSON.stringify(edit.json)).toBe(200);
    expect(edit.json.stage.version).toBe(2);
    expect(await rows()).toBe(1);
    const row = await AuditEvent.findOne({ where: { targetType: 'stage', targetId: String(stage.id), action: 'stage.update' } });
    expect((row!.details as { fields: string[] }).fields).toEqual(['bias.cathodeResistor']);
  });
});
