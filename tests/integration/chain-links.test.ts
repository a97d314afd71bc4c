// A project's stored chain links through the real routes and database: PATCH /api/projects/{id} with chainLinks
// saves them (engineering-notation capacitors parsed by the shared chain schema), the chain view solves with them,
// a bad link is refused with a field message, a stale version gets 409, null goes back to the default order,
// and only designers may change them.
import { describe, expect, it } from 'vitest';
import * as chainRoute from '@/app/api/projects/[id]/chain/route';
import * as projectRoute from '@/app/api/projects/[id]/route';
import * as stagesRoute from '@/app/api/projects/[id]/stages/route';
import * as projectsRoute from '@/app/api/projects/route';
import type { ChainResult } from '@/lib/calc/chain';
import type { ProjectDetail } from '@/lib/projects/service';
import type { StageDTO } from '@/lib/stages/service';
import { TubeType } from '@/models';
import { call } from '../support/api';

async function twoStageProject(): Promise<{ project: ProjectDetail; stages: StageDTO[] }> {
  const tube = await TubeType.findOne({ where: { designation: '12AX7' } });
  expect(tube, 'the tube library seeder ran').not.toBeNull();
  const created = await call(projectsRoute.POST, { as: 'designer', method: 'POST', body: { name: `Links ${Date.now()}`, description: 'integration test' } });
  expect(created.status, JSON.stringify(created.json)).toBe(201);
  const project = created.json.project as ProjectDetail;
  const stages: StageDTO[] = [];
  for (const name of ['V1a', 'V1b']) {
    const body = {
      name, topology: 'common-cathode', tubeId: tube!.id, supply: 250, gridResistor: '1M', plateResistor: '100k',
      bias: { kind: 'cathode', cathodeResistor: '1k5', cathodeBypass: '22u' }, drive: { amplitude: 0.05, frequency: 1000 },
    };
    const r = await call(stagesRoute.POST, { as: 'designer', method: 'POST', params: { id: String(project.id) }, body });
    expect(r.status, JSON.stringify(r.json)).toBe(201);
    stages.push(r.json.stage);
  }
  const fresh = await call(projectRoute.GET, { as: 'designer', params: { id: String(project.id) } });
  return { project: fresh.json.project, stages };
}

describe('PATCH /api/projects/{id} chainLinks', () => {
  it('round-trips a link, refuses a bad one with a field message, 409s a stale save and clears back to the default order', async () => {
    const { project, stages } = await twoStageProject();
    expect(project.chainLinks).toBeNull();
    const id = String(project.id);
    const link = { from: String(stages[0]!.id), output: 'plate', to: String(stages[1]!.id), input: 'grid', coupling: { kind: 'capacitor', capacitance: '47n' } };

    const saved = await call(projectRoute.PATCH, { as: 'designer', method: 'PATCH', params: { id }, body: { version: project.version, chainLinks: [link] } });
    expect(saved.status, JSON.stringify(saved.json)).toBe(200);
    const after = saved.json.project as ProjectDetail;
    expect(after.version).toBe(project.version + 1);
    expect(after.chainLinks).toHaveLength(1);
    expect(after.chainLinks![0]!.coupling).toEqual({ kind: 'capacitor', capacitance: 47e-9 });

    // read back from the database, and the chain view solves with the stored link
    const read = await call(projectRoute.GET, { as: 'technician', params: { id } });
    expect((read.json.project as ProjectDetail).chainLinks![0]!.coupling).toEqual({ kind: 'capacitor', capacitance: 47e-9 });
    const chain = await call(chainRoute.GET, { as: 'designer', params: { id }, path: `/api/projects/${id}/chain?input=0.01` });
    expect(chain.status, JSON.stringify(chain.json)).toBe(200);
    expect((chain.json.chain as ChainResult).endToEndError).toBeNull();

    // a capacitor that is not a number is refused with the field named, and nothing changes
    const bad = await call(projectRoute.PATCH, { as: 'designer', method: 'PATCH', params: { id }, body: { version: after.version, chainLinks: [{ ...link, coupling: { kind: 'capacitor', capacitance: 'lots' } }] } });
    expect(bad.status).toBe(422);
    expect(bad.json.error.fieldErrors['chainLinks.0.coupling.capacitance'][0]).toMatch(/not a number/);
    const zero = await call(projectRoute.PATCH, { as: 'designer', method: 'PATCH', params: { id }, body: { version: after.version, chainLinks: [{ ...link, coupling: { kind: 'capacitor', capacitance: 0 } }] } });
    expect(zero.status).toBe(422);
    expect(zero.json.error.fieldErrors['chainLinks.0.coupling.capacitance'][0]).toMatch(/greater than zero/);

    // direct coupling saved; a save with the old version is a conflict
    const direct = await call(projectRoute.PATCH, { as: 'designer', method: 'PATCH', params: { id }, body: { version: after.version, chainLinks: [{ ...link, coupling: { kind: 'direct' } }] } });
    expect(direct.status).toBe(200);
    expect((direct.json.project as ProjectDetail).chainLinks![0]!.coupling.kind).toBe('direct');
    const stale = await call(projectRoute.PATCH, { as: 'designer', method: 'PATCH', params: { id }, body: { version: after.version, chainLinks: null } });
    expect(stale.status).toBe(409);

    // technicians read the links but cannot change them
    const tech = await call(projectRoute.PATCH, { as: 'technician', method: 'PATCH', params: { id }, body: { version: after.version + 1, chainLinks: null } });
    expect(tech.status).toBe(403);

    const cleared = await call(projectRoute.PATCH, { as: 'designer', method: 'PATCH', params: { id }, body: { version: after.version + 1, chainLinks: null } });
    expect(cleared.status).toBe(200);
    expect((cleared.json.project as ProjectDetail).chainLinks).toBeNull();
  });
});
