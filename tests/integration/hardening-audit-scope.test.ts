// The audit log through GET /api/audit: admins read every event; designers and reviewers read only events that
// belong to a project (every role may read projects), never sign-ins, invitations or role changes.
import { describe, expect, it } from 'vitest';
import { GET as auditList } from '@/app/api/audit/route';
import { POST as invite } from '@/app/api/admin/invitations/route';
import { POST as createProject } from '@/app/api/projects/route';
import { call } from '../support/api';

describe('audit log scope', () => {
  it('account events are for admins only; project events are visible to designers and reviewers', async () => {
    const email = `harden-audit-${Date.now()}@anodyne.test`;
    expect((await call(invite, { as: 'admin', method: 'POST', body: { email, displayName: 'Audit probe', role: 'designer' } })).status).toBe(201);
    const project = await call(createProject, { as: 'designer', method: 'POST', body: { name: `Audit scope ${Date.now()}` } });
    expect(project.status).toBe(201);
    const projectId = project.json.project?.id ?? project.json.id;

    const admin = await call(auditList, { as: 'admin', path: '/api/audit?limit=500' });
    expect(admin.status).toBe(200);
    const adminActions = new Set(admin.json.events.map((e: { action: string }) => e.action));
    expect([...adminActions].some((a) => String(a).startsWith('invitation') || String(a).startsWith('user.'))).toBe(true);
    expect(admin.json.events.some((e: { projectId: number | null }) => e.projectId === projectId)).toBe(true);

    for (const role of ['designer', 'reviewer'] as const) {
      const r = await call(auditList, { as: role, path: '/api/audit?limit=500' });
      expect(r.status).toBe(200);
      expect(r.json.events.length).toBeGreaterThan(0);
      for (const e of r.json.events as { action: string; projectId: number | null; targetType: string }[]) {
        expect(e.projectId, `${role} sees ${e.action}`).not.toBeNull();
        expect(e.action).not.toMatch(/^(user\.|invitation)/);
      }
      expect(r.json.events.some((e: { projectId: number | null }) => e.projectId === projectId)).toBe(true);
      // filtering by a user does not reach account events either
      const byUser = await call(auditList, { as: role, path: `/api/audit?userId=${admin.json.events.find((e: { actorId: number | null; projectId: number | null }) => e.projectId === null && e.actorId)?.actorId ?? 1}` });
      expect(byUser.json.events.every((e: { projectId: number | null }) => e.projectId !== null)).toBe(true);
    }
  });
});
