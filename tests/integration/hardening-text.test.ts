// Text that PostgreSQL cannot store as sent (U+0000) or that has no UTF-8 form (an unpaired UTF-16 surrogate)
// is refused with a 422 naming the field; well-formed text, astral characters included, is stored as sent.
import { describe, expect, it } from 'vitest';
import { POST as invite } from '@/app/api/admin/invitations/route';
import { POST as createProject } from '@/app/api/projects/route';
import { GET as getProject, PATCH as patchProject } from '@/app/api/projects/[id]/route';
import { POST as submitRevision } from '@/app/api/projects/[id]/revisions/route';
import { POST as createTube, GET as listTubes } from '@/app/api/tubes/route';
import { POST as uploadCurves } from '@/app/api/tubes/[id]/curve-sets/route';
import { GET as auditList } from '@/app/api/audit/route';
import { call } from '../support/api';

const NUL = 'bad\u0000text';
const HIGH = 'bad\uD83Dtext'; // high surrogate with no low one after it
const LOW = 'bad\uDE9Etext'; // low surrogate with no high one before it

describe('NUL and unpaired surrogates in text fields', () => {
  it('project name and description: 422 naming the field', async () => {
    for (const bad of [NUL, HIGH, LOW]) {
      const r1 = await call(createProject, { as: 'designer', method: 'POST', body: { name: bad } });
      expect(r1.status, JSON.stringify(r1.json)).toBe(422);
      expect(Object.keys(r1.json.error.fieldErrors)).toContain('name');
      const r2 = await call(createProject, { as: 'designer', method: 'POST', body: { name: 'Fine name', description: bad } });
      expect(r2.status).toBe(422);
      expect(Object.keys(r2.json.error.fieldErrors)).toContain('description');
    }
  });

  it('revision note, invitation name, tube notes, a stage\'s free-form inputs, query strings', async () => {
    const project = (await call(getProject, { as: 'designer', params: { id: '1' } })).json;
    const note = await call(submitRevision, { as: 'designer', method: 'POST', params: { id: '1' }, body: { note: NUL } });
    expect(note.status).toBe(422);
    expect(Object.keys(note.json.error.fieldErrors)).toContain('note');

    const inv = await call(invite, { as: 'admin', method: 'POST', body: { email: 'harden-text@anodyne.test', displayName: HIGH, role: 'designer' } });
    expect(inv.status).toBe(422);
    expect(Object.keys(inv.json.error.fieldErrors)).toContain('displayName');

    const tube = await call(createTube, { as: 'designer', method: 'POST', body: { designation: 'HX1', family: 'triode', notes: LOW } });
    expect(tube.status).toBe(422);
    expect(Object.keys(tube.json.error.fieldErrors)).toContain('notes');

    const supply = await call(patchProject, { as: 'designer', method: 'PATCH', params: { id: '1' }, body: { version: project.project?.version ?? project.version, supply: { nodes: [{ name: NUL }] } } });
    expect(supply.status).toBe(422);
    expect(Object.keys(supply.json.error.fieldErrors).join(' ')).toMatch(/supply\.nodes\.0\.name/);

    for (const [handler, q] of [[listTubes, 'search'], [auditList, 'action']] as const) {
      const r = await call(handler, { as: 'admin', path: `/api/x?${q}=${encodeURIComponent(NUL)}` });
      expect(r.status, q).toBe(422);
      expect(Object.keys(r.json.error.fieldErrors)).toContain(q);
    }
  });

  it('curve upload: a NUL in a form field or the file name is a 422', async () => {
    const csv = 'va,vg,ia\n100,0,1\n150,0,2\n200,0,3\n100,-1,0.5\n150,-1,1\n200,-1,1.8\n';
    const form1 = new FormData();
    form1.set('file', new File([csv], 'curves.csv', { type: 'text/csv' }));
    form1.set('currentUnit', 'mA');
    form1.set('name', NUL);
    const r1 = await call(uploadCurves, { as: 'designer', method: 'POST', params: { id: '1' }, form: form1 });
    expect(r1.status, JSON.stringify(r1.json)).toBe(422);
    expect(Object.keys(r1.json.error.fieldErrors)).toContain('name');
    const form2 = new FormData();
    form2.set('file', new File([csv], 'cur\u0000ves.csv', { type: 'text/csv' }));
    form2.set('currentUnit', 'mA');
    const r2 = await call(uploadCurves, { as: 'designer', method: 'POST', params: { id: '1' }, form: form2 });
    expect(r2.status, JSON.stringify(r2.json)).toBe(422);
    expect(Object.keys(r2.json.error.fieldErrors)).toContain('file');
  });

  it('well-formed text with astral characters is stored and read back unchanged', async () => {
    const name = `Harden \u{1F39B}\u{FE0F} stage ${Date.now()} — Ωµ`;
    const created = await call(createProject, { as: 'designer', method: 'POST', body: { name } });
    expect(created.status, JSON.stringify(created.json)).toBe(201);
    const id = String(created.json.project?.id ?? created.json.id);
    const read = await call(getProject, { as: 'designer', params: { id } });
    expect((read.json.project ?? read.json).name).toBe(name);
  });
});
