// Every JSON-body route answers malformed input with a 4xx in the one error shape, never a 500.
import { readdirSync, statSync } from 'node:fs';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { call } from '../support/api';

const root = path.resolve(__dirname, '../../app/api');
function routeFiles(dir: string): string[] {
  return readdirSync(dir).flatMap((name) => {
    const p = path.join(dir, name);
    return statSync(p).isDirectory() ? routeFiles(p) : name === 'route.ts' ? [p] : [];
  });
}

const BODIES: [string, unknown][] = [
  ['not JSON', '{"oops'],
  ['an array', [1, 2, 3]],
  ['null', 'null'],
  ['wrong types everywhere', { name: 42, note: 42, comment: 42, version: 'x', supply: { nodes: 'no' }, topology: 7, decision: true, email: [], model: {} }],
  ['numbers out of range', { note: -1, comment: -1, version: -1, supply: -300, plateResistor: 'abc', cathodeResistor: '4x7', tubeId: 1e12 }],
];

type Handler = Parameters<typeof call>[0];
const files = routeFiles(root).filter((f) => !f.includes('[...nextauth]'));
const targets = (
  await Promise.all(
    files.map(async (file) => {
      const mod = (await import(file)) as Record<string, Handler | undefined>;
      const rel = path.relative(root, file).replace(/\/route\.ts$/, '');
      return (['POST', 'PATCH'] as const).flatMap((method) => (mod[method] ? [{ rel, method, handler: mod[method]! }] : []));
    }),
  )
).flat();

describe('bad input never becomes a 500', () => {
  it('covers the routes that take a body', () => {
    expect(targets.length).toBeGreaterThanOrEqual(20);
  });
  for (const { rel, method, handler } of targets) {
    it(`${method} /api/${rel}`, async () => {
      const params = Object.fromEntries([...rel.matchAll(/\[(\w+)\]/g)].map((m) => [m[1]!, m[1] === 'token' ? 'x'.repeat(43) : '1']));
      for (const [what, body] of BODIES) {
        const { status, json } = await call(handler, { as: 'admin', method, params, body, path: `/api/${rel}` });
        expect(status, `${what}: ${JSON.stringify(json)}`).toBeGreaterThanOrEqual(400);
        expect(status, `${what}: ${JSON.stringify(json)}`).toBeLessThan(500);
        expect(json?.error?.message, what).toEqual(expect.any(String));
      }
    });
  }
});
