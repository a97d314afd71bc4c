// The single table of who may call which route: anonymous and each of the four roles.
// Add a row for every new route. `ok` is the status an allowed caller gets with the row's request.
import { describe, expect, it } from 'vitest';
import { call, type CallOptions, type DemoRole } from '../support/api';

type Handler = Parameters<typeof call>[0];
type Rule = {
  route: string;
  handler: () => Promise<Handler>;
  request?: Omit<CallOptions, 'as'> | (() => Promise<Omit<CallOptions, 'as'>>);
  allowed: DemoRole[];
  ok: number;
};

const ALL: DemoRole[] = ['admin', 'designer', 'technician', 'reviewer'];

export const RULES: Rule[] = [
  // --- foundation ---
  { route: 'GET /api/me', handler: async () => (await import('@/app/api/me/route')).GET, allowed: ALL, ok: 200 },
  { route: 'GET /api/admin/users', handler: async () => (await import('@/app/api/admin/users/route')).GET, allowed: ['admin'], ok: 200 },
  {
    route: 'PATCH /api/admin/users/{id}',
    handler: async () => (await import('@/app/api/admin/users/[id]/route')).PATCH,
    request: { method: 'PATCH', params: { id: '999999' }, body: { role: 'designer' } },
    allowed: ['admin'],
    ok: 404,
  },
  {
    route: 'POST /api/admin/invitations',
    handler: async () => (await import('@/app/api/admin/invitations/route')).POST,
    request: { method: 'POST', body: { email: 'not-an-address', displayName: 'x', role: 'designer' } },
    allowed: ['admin'],
    ok: 422,
  },
  { route: 'GET /api/admin/outbox', handler: async () => (await import('@/app/api/admin/outbox/route')).GET, allowed: ['admin'], ok: 200 },
  { route: 'GET /api/admin/mail-sink', handler: async () => (await import('@/app/api/admin/mail-sink/route')).GET, allowed: ['admin'], ok: 200 },
  { route: 'GET /api/audit', handler: async () => (await import('@/app/api/audit/route')).GET, allowed: ['admin', 'designer', 'reviewer'], ok: 200 },
  // --- tube library ---
  { route: 'GET /api/tubes', handler: async () => (await import('@/app/api/tubes/route')).GET, allowed: ALL, ok: 200 },
  { route: 'POST /api/tubes', handler: async () => (await import('@/app/api/tubes/route')).POST, request: { method: 'POST', body: { designation: '' } }, allowed: ['admin', 'designer'], ok: 422 },
  { route: 'GET /api/tubes/options', handler: async () => (await import('@/app/api/tubes/options/route')).GET, allowed: ALL, ok: 200 },
  { route: 'GET /api/tubes/compare', handler: async () => (await import('@/app/api/tubes/compare/route')).GET, request: { path: '/api/tubes/compare?ids=1' }, allowed: ALL, ok: 422 },
  { route: 'GET /api/tubes/{id}', handler: async () => (await import('@/app/api/tubes/[id]/route')).GET, request: { params: { id: '999999' } }, allowed: ALL, ok: 404 },
  { route: 'PATCH /api/tubes/{id}', handler: async () => (await import('@/app/api/tubes/[id]/route')).PATCH, request: { method: 'PATCH', params: { id: '999999' }, body: { notes: 'x' } }, allowed: ['admin', 'designer'], ok: 404 },
  { route: 'GET /api/tubes/{id}/plot', handler: async () => (await import('@/app/api/tubes/[id]/plot/route')).GET, request: { params: { id: '999999' } }, allowed: ALL, ok: 404 },
  { route: 'POST /api/tubes/{id}/models', handler: async () => (await import('@/app/api/tubes/[id]/models/route')).POST, request: { method: 'POST', params: { id: '999999' }, body: {} }, allowed: ['admin', 'designer'], ok: 422 },
  { route: 'PATCH /api/tubes/{id}/models/{modelId}', handler: async () => (await import('@/app/api/tubes/[id]/models/[modelId]/route')).PATCH, request: { method: 'PATCH', params: { id: '999999', modelId: '1' }, body: { name: 'x' } }, allowed: ['admin', 'designer'], ok: 404 },
  { route: 'GET /api/tubes/{id}/models/{modelId}/spice', handler: async () => (await import('@/app/api/tubes/[id]/models/[modelId]/spice/route')).GET, request: { params: { id: '999999', modelId: '1' } }, allowed: ALL, ok: 404 },
  { route: 'GET /api/tubes/{id}/curve-sets', handler: async () => (await import('@/app/api/tubes/[id]/curve-sets/route')).GET, request: { params: { id: '999999' } }, allowed: ALL, ok: 404 },
  { route: 'POST /api/tubes/{id}/curve-sets', handler: async () => (await import('@/app/api/tubes/[id]/curve-sets/route')).POST, request: { method: 'POST', params: { id: '999999' } }, allowed: ['admin', 'designer'], ok: 415 },
  { route: 'POST /api/tubes/{id}/attachments', handler: async () => (await import('@/app/api/tubes/[id]/attachments/route')).POST, request: { method: 'POST', params: { id: '999999' } }, allowed: ['admin', 'designer'], ok: 415 },
  { route: 'GET /api/attachments/{id}', handler: async () => (await import('@/app/api/attachments/[id]/route')).GET, request: { params: { id: '999999' } }, allowed: ALL, ok: 404 },
  { route: 'GET /api/curve-sets/{id}', handler: async () => (await import('@/app/api/curve-sets/[id]/route')).GET, request: { params: { id: '999999' } }, allowed: ALL, ok: 404 },
  { route: 'GET /api/curve-sets/{id}/file', handler: async () => (await import('@/app/api/curve-sets/[id]/file/route')).GET, request: { params: { id: '999999' } }, allowed: ALL, ok: 404 },
  { route: 'POST /api/curve-sets/{id}/fit', handler: async () => (await import('@/app/api/curve-sets/[id]/fit/route')).POST, request: { method: 'POST', params: { id: '999999' }, body: { model: 'koren-triode' } }, allowed: ['admin', 'designer'], ok: 404 },
  { route: 'POST /api/curve-sets/{id}/accept', handler: async () => (await import('@/app/api/curve-sets/[id]/accept/route')).POST, request: { method: 'POST', params: { id: '999999' }, body: {} }, allowed: ['admin', 'designer'], ok: 404 },
  { route: 'POST /api/curve-sets/{id}/discard', handler: async () => (await import('@/app/api/curve-sets/[id]/discard/route')).POST, request: { method: 'POST', params: { id: '999999' }, body: {} }, allowed: ['admin', 'designer'], ok: 404 },
  // --- projects and stages ---
  { route: 'GET /api/projects', handler: async () => (await import('@/app/api/projects/route')).GET, allowed: ALL, ok: 200 },
  {
    route: 'POST /api/projects',
    handler: async () => (await import('@/app/api/projects/route')).POST,
    request: { method: 'POST', body: { name: '' } },
    allowed: ['admin', 'designer'],
    ok: 422,
  },
  { route: 'GET /api/projects/{id}', handler: async () => (await import('@/app/api/projects/[id]/route')).GET, request: { params: { id: '999999' } }, allowed: ALL, ok: 404 },
  {
    route: 'PATCH /api/projects/{id}',
    handler: async () => (await import('@/app/api/projects/[id]/route')).PATCH,
    request: { method: 'PATCH', params: { id: '999999' }, body: { version: 1, name: 'Renamed' } },
    allowed: ['admin', 'designer'],
    ok: 404,
  },
  {
    route: 'DELETE /api/projects/{id}',
    handler: async () => (await import('@/app/api/projects/[id]/route')).DELETE,
    request: { method: 'DELETE', params: { id: '999999' } },
    allowed: ['admin', 'designer'],
    ok: 404,
  },
  {
    route: 'POST /api/projects/{id}/stages',
    handler: async () => (await import('@/app/api/projects/[id]/stages/route')).POST,
    request: { method: 'POST', params: { id: '999999' }, body: { name: 'V1' } },
    allowed: ['admin', 'designer'],
    ok: 422,
  },
  { route: 'GET /api/projects/{id}/chain', handler: async () => (await import('@/app/api/projects/[id]/chain/route')).GET, request: { params: { id: '999999' } }, allowed: ALL, ok: 404 },
  { route: 'GET /api/projects/{id}/feedback', handler: async () => (await import('@/app/api/projects/[id]/feedback/route')).GET, request: { params: { id: '999999' } }, allowed: ALL, ok: 404 },
  { route: 'GET /api/projects/{id}/report', handler: async () => (await import('@/app/api/projects/[id]/report/route')).GET, request: { params: { id: '999999' } }, allowed: ALL, ok: 404 },
  { route: 'GET /api/stages/{id}', handler: async () => (await import('@/app/api/stages/[id]/route')).GET, request: { params: { id: '999999' } }, allowed: ALL, ok: 404 },
  {
    route: 'PATCH /api/stages/{id}',
    handler: async () => (await import('@/app/api/stages/[id]/route')).PATCH,
    request: { method: 'PATCH', params: { id: '999999' }, body: { version: 1, name: 'V1' } },
    allowed: ['admin', 'designer'],
    ok: 404,
  },
  {
    route: 'DELETE /api/stages/{id}',
    handler: async () => (await import('@/app/api/stages/[id]/route')).DELETE,
    request: { method: 'DELETE', path: '/api/stages/999999?version=1', params: { id: '999999' } },
    allowed: ['admin', 'designer'],
    ok: 404,
  },
  {
    route: 'GET /api/stages/{id}/curves',
    handler: async () => (await import('@/app/api/stages/[id]/curves/route')).GET,
    request: { path: '/api/stages/999999/curves?kind=plate', params: { id: '999999' } },
    allowed: ALL,
    ok: 404,
  },
  {
    route: 'POST /api/analyze-supply',
    handler: async () => (await import('@/app/api/analyze-supply/route')).POST,
    request: {
      method: 'POST',
      body: {
        mains: { voltage: 230, frequency: 50 },
        secondary: { voltage: 300, resistance: 40 },
        rectifier: { kind: 'silicon-bridge' },
        reservoir: { capacitance: '47u' },
        sections: [{ kind: 'resistor', resistance: '1k' }, { kind: 'capacitor', capacitance: '22u' }],
        loads: [{ node: 1, current: 0.05 }],
      },
    },
    allowed: ALL,
    ok: 200,
  },
  {
    route: 'POST /api/analyze',
    handler: async () => (await import('@/app/api/analyze/route')).POST,
    request: {
      method: 'POST',
      body: {
        topology: 'common-cathode',
        tube: { model: 'koren-triode', mu: 100, ex: 1.4, kg1: 1060, kp: 600, kvb: 300 },
        supply: 250, gridResistor: '1M', plateResistor: '100k', bias: { kind: 'cathode', cathodeResistor: '1k5' },
      },
    },
    allowed: ALL,
    ok: 200,
  },
  {
    route: 'POST /api/analyze-chain',
    handler: async () => (await import('@/app/api/analyze-chain/route')).POST,
    request: {
      method: 'POST',
      body: {
        input: { amplitude: 0.05, frequency: 1000 },
        stages: [
          {
            id: 'v1', topology: 'common-cathode', tube: { model: 'koren-triode', mu: 100, ex: 1.4, kg1: 1060, kp: 600, kvb: 300 },
            supply: 250, gridResistor: '1M', plateResistor: '100k', bias: { kind: 'cathode', cathodeResistor: '1k5', cathodeBypass: '22u' },
          },
          { id: 'vol', topology: 'volume-control', resistance: '250k', taper: 'log', setting: 0.5 },
        ],
        links: [{ from: 'v1', to: 'vol', coupling: { kind: 'capacitor', capacitance: '47n' } }],
        options: { sweep: false },
      },
    },
    allowed: ALL,
    ok: 200,
  },
  // --- bench checks and review ---
  { route: 'GET /api/stages/{id}/bench-checks', handler: async () => (await import('@/app/api/stages/[id]/bench-checks/route')).GET, request: { params: { id: '999999' } }, allowed: ALL, ok: 404 },
  {
    route: 'POST /api/stages/{id}/bench-checks',
    handler: async () => (await import('@/app/api/stages/[id]/bench-checks/route')).POST,
    request: { method: 'POST', params: { id: '999999' }, body: { supplyVoltage: 300, plateVoltage: 200, cathodeVoltage: 1.5 } },
    allowed: ['admin', 'technician'],
    ok: 404,
  },
  { route: 'GET /api/projects/{id}/bench-checks', handler: async () => (await import('@/app/api/projects/[id]/bench-checks/route')).GET, request: { params: { id: '999999' } }, allowed: ALL, ok: 404 },
  { route: 'GET /api/bench-checks/{id}', handler: async () => (await import('@/app/api/bench-checks/[id]/route')).GET, request: { params: { id: '999999' } }, allowed: ALL, ok: 404 },
  {
    route: 'POST /api/bench-checks/{id}/photos',
    handler: async () => (await import('@/app/api/bench-checks/[id]/photos/route')).POST,
    request: async () => {
      const form = new FormData();
      form.set('file', new File([new Uint8Array([0x89, 0x50, 0x4e, 0x47])], 'x.png', { type: 'image/png' }));
      return { method: 'POST', params: { id: '999999' }, form };
    },
    allowed: ['admin', 'technician'],
    ok: 404,
  },
  {
    route: 'GET /api/bench-checks/{id}/photos/{photoId}',
    handler: async () => (await import('@/app/api/bench-checks/[id]/photos/[photoId]/route')).GET,
    request: { params: { id: '999999', photoId: '999999' } },
    allowed: ALL,
    ok: 404,
  },
  { route: 'GET /api/projects/{id}/revisions', handler: async () => (await import('@/app/api/projects/[id]/revisions/route')).GET, request: { params: { id: '999999' } }, allowed: ['admin', 'designer', 'reviewer'], ok: 404 },
  { route: 'POST /api/projects/{id}/revisions', handler: async () => (await import('@/app/api/projects/[id]/revisions/route')).POST, request: { method: 'POST', params: { id: '999999' }, body: {} }, allowed: ['admin', 'designer'], ok: 404 },
  { route: 'GET /api/revisions', handler: async () => (await import('@/app/api/revisions/route')).GET, allowed: ['admin', 'designer', 'reviewer'], ok: 200 },
  { route: 'GET /api/revisions/{id}', handler: async () => (await import('@/app/api/revisions/[id]/route')).GET, request: { params: { id: '999999' } }, allowed: ['admin', 'designer', 'reviewer'], ok: 404 },
  { route: 'DELETE /api/revisions/{id}', handler: async () => (await import('@/app/api/revisions/[id]/route')).DELETE, request: { method: 'DELETE', params: { id: '999999' } }, allowed: ['admin', 'designer'], ok: 404 },
  {
    route: 'POST /api/revisions/{id}/decision',
    handler: async () => (await import('@/app/api/revisions/[id]/decision/route')).POST,
    request: { method: 'POST', params: { id: '999999' }, body: { decision: 'approve', comment: '' } },
    allowed: ['admin', 'reviewer'],
    ok: 404,
  },
  { route: 'GET /api/revisions/{id}/report', handler: async () => (await import('@/app/api/revisions/[id]/report/route')).GET, request: { params: { id: '999999' } }, allowed: ['admin', 'designer', 'reviewer'], ok: 404 },
  // --- explore ---
  { route: 'POST /api/explore/runs', handler: async () => (await import('@/app/api/explore/runs/route')).POST, request: { method: 'POST', body: { kind: 'swap', target: { stageId: 999999 } } }, allowed: ['admin', 'designer'], ok: 404 },
  { route: 'GET /api/explore/runs', handler: async () => (await import('@/app/api/explore/runs/route')).GET, request: { path: '/api/explore/runs?stageId=999999' }, allowed: ALL, ok: 200 },
  { route: 'GET /api/explore/runs/{id}', handler: async () => (await import('@/app/api/explore/runs/[id]/route')).GET, request: { params: { id: '999999' } }, allowed: ALL, ok: 404 },
  { route: 'POST /api/explore/runs/{id}/cancel', handler: async () => (await import('@/app/api/explore/runs/[id]/cancel/route')).POST, request: { method: 'POST', params: { id: '999999' } }, allowed: ['admin', 'designer'], ok: 404 },
];

describe('route rules: 401 for anonymous, 403 for a role that may not, the allowed status otherwise', () => {
  for (const rule of RULES) {
    for (const who of ['anonymous', ...ALL] as const) {
      const expected = who === 'anonymous' ? 401 : rule.allowed.includes(who) ? rule.ok : 403;
      it(`${rule.route} as ${who} → ${expected}`, async () => {
        const handler = await rule.handler();
        const request = typeof rule.request === 'function' ? await rule.request() : (rule.request ?? {});
        const { status, json } = await call(handler, { ...request, as: who === 'anonymous' ? null : who });
        expect(status, JSON.stringify(json)).toBe(expected);
        if (status >= 400) expect(json?.error?.message).toBeTruthy();
      });
    }
  }
});
