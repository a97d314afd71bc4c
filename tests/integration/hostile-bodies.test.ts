// Bodies the fuzz found answering 500: JSON nested thousands deep overflowed the stack in the text check. Now a
// 422 in the one error shape, on a route with a body.
import { describe, expect, it } from 'vitest';
import * as projectsRoute from '@/app/api/projects/route';
import { refuseDeepNesting } from '@/lib/api/with-user';
import { call } from '../support/api';

describe('deeply nested JSON', () => {
  it('is refused with a 422, not a stack overflow', async () => {
    // the text as the fuzz sent it: {"a":{"a":…"x"…}} 20,000 levels deep
    const body = '{"a":'.repeat(20_000) + '"x"' + '}'.repeat(20_000);
    const r = await call(projectsRoute.POST, { as: 'designer', method: 'POST', body });
    expect(r.status, JSON.stringify(r.json)).toBe(422);
    expect(r.json.error.message).toMatch(/nests deeper than 32 levels/);
    expect(() => refuseDeepNesting(JSON.parse('['.repeat(20_000) + ']'.repeat(20_000)))).toThrow(/nests deeper/);
    expect(() => refuseDeepNesting({ a: [{ b: { c: [1, 2, { d: 'ok' }] } }] })).not.toThrow();
  });
});
