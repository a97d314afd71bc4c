// A reviewer compares a revision with any earlier one (the previous one by default, whatever its decision), and a
// revision waiting for a decision says when the project has changed since it was submitted, and what changed.
import { beforeAll, describe, expect, it } from 'vitest';
import { POST as decide } from '@/app/api/revisions/[id]/decision/route';
import { GET as getRevision } from '@/app/api/revisions/[id]/route';
import { POST as submit } from '@/app/api/projects/[id]/revisions/route';
import * as stagesRoute from '@/app/api/projects/[id]/stages/route';
import * as projectsRoute from '@/app/api/projects/route';
import { PATCH as patchStage } from '@/app/api/stages/[id]/route';
import { TubeType } from '@/models';
import { call } from '../support/api';

let projectId = 0;
let stageId = 0;
let version = 1;

beforeAll(async () => {
  const tube = await TubeType.findOne({ where: { designation: '12AX7' } });
  const p = await call(projectsRoute.POST, { as: 'designer', method: 'POST', body: { name: `Compare test ${Date.now()}`, description: '' } });
  expect(p.status).toBe(201);
  projectId = p.json.project.id;
  const s = await call(stagesRoute.POST, {
    as: 'designer', method: 'POST', params: { id: String(projectId) },
    body: { name: 'V1a', topology: 'common-cathode', tubeId: tube!.id, supply: 250, gridResistor: '1M', plateResistor: '100k', bias: { kind: 'cathode', cathodeResistor: '1k5', cathodeBypass: '22u' } },
  });
  expect(s.status, JSON.stringify(s.json)).toBe(201);
  stageId = s.json.stage.id;
});

async function setCathode(value: string) {
  const r = await call(patchStage, { as: 'designer', method: 'PATCH', params: { id: String(stageId) }, body: { version, inputs: { bias: { kind: 'cathode', cathodeResistor: value, cathodeBypass: '22u' } } } });
  expect(r.status, JSON.stringify(r.json)).toBe(200);
  version = r.json.stage.version;
}

describe('revision comparison', () => {
  it('compares a resubmission after "changes requested" with the previous revision, and with any earlier one on request', async () => {
    const r1 = await call(submit, { as: 'designer', method: 'POST', params: { id: String(projectId) }, body: {} });
    expect(r1.status, JSON.stringify(r1.json)).toBe(201);
    const d1 = await call(decide, { as: 'reviewer', method: 'POST', params: { id: String(r1.json.revision.id) }, body: { decision: 'request-changes', comment: 'More cathode resistance.' } });
    expect(d1.status, JSON.stringify(d1.json)).toBe(201);

    await setCathode('2k2');
    const r2 = await call(submit, { as: 'designer', method: 'POST', params: { id: String(projectId) }, body: {} });
    expect(r2.status).toBe(201);
    const rev2 = r2.json.revision;
    // nothing approved yet, but the diff is against revision 1 (changes requested), not empty
    expect(rev2.base).toMatchObject({ number: 1, state: 'changes-requested' });
    expect(rev2.earlier.map((e: { number: number }) => e.number)).toEqual([1]);
    const stage = rev2.diff.stages.find((s: { stageId: number }) => s.stageId === stageId);
    expect(stage.change).toBe('changed');
    expect(stage.inputs).toEqual([expect.objectContaining({ path: 'inputs.bias.cathodeResistor', before: 1500, after: 2200 })]);

    const d2 = await call(decide, { as: 'reviewer', method: 'POST', params: { id: String(rev2.id) }, body: { decision: 'request-changes', comment: 'Once more.' } });
    expect(d2.status).toBe(201);
    await setCathode('2k7');
    const r3 = await call(submit, { as: 'designer', method: 'POST', params: { id: String(projectId) }, body: {} });
    const id3 = String(r3.json.revision.id);
    expect(r3.json.revision.base.number).toBe(2);
    const vs1 = await call(getRevision, { as: 'reviewer', params: { id: id3 }, path: `/api/revisions/${id3}?compare=1` });
    expect(vs1.status, JSON.stringify(vs1.json)).toBe(200);
    expect(vs1.json.revision.base.number).toBe(1);
    expect(vs1.json.revision.diff.stages[0].inputs[0]).toMatchObject({ before: 1500, after: 2700 });
    const notEarlier = await call(getRevision, { as: 'reviewer', params: { id: id3 }, path: `/api/revisions/${id3}?compare=3` });
    expect(notEarlier.status).toBe(422);
    expect(notEarlier.json.error.fieldErrors.compare[0]).toMatch(/Choose one of: 2, 1/);
    const bad = await call(getRevision, { as: 'reviewer', params: { id: id3 }, path: `/api/revisions/${id3}?compare=0x1` });
    expect(bad.status).toBe(422);
  });

  it('says the project moved on since submission, and what changed', async () => {
    const list = await call(submit, { as: 'designer', method: 'POST', params: { id: String(projectId) }, body: {} });
    // revision 3 is still open from the test above: a second submission is refused
    expect(list.status).toBe(409);
    const openId = String(list.json.error.details.revisionId);
    const before = await call(getRevision, { as: 'reviewer', params: { id: openId } });
    expect(before.json.revision.movedOn).toBeNull();

    await setCathode('3k3');
    const after = await call(getRevision, { as: 'reviewer', params: { id: openId } });
    const moved = after.json.revision.movedOn;
    expect(moved).not.toBeNull();
    expect(moved.diff.counts.changed).toBe(1);
    expect(moved.diff.stages[0].inputs).toEqual([expect.objectContaining({ path: 'inputs.bias.cathodeResistor', before: 2700, after: 3300 })]);
  });
});
