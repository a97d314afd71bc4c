// Record ids are strict decimal integers 1 … 2^31 − 1 (PostgreSQL `integer`): anything else is "no such record"
// (404) in a path and a field error (422) in a query string, never a 500 and never read as another number.
import { readdirSync, statSync } from 'node:fs';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { GET as auditList } from '@/app/api/audit/route';
import { GET as projectBenchChecks } from '@/app/api/projects/[id]/bench-checks/route';
import { GET as revisionList } from '@/app/api/revisions/route';
import { GET as tubePlot } from '@/app/api/tubes/[id]/plot/route';
import { GET as tubeCompare } from '@/app/api/tubes/compare/route';
import { PATCH as patchProject } from '@/app/api/projects/[id]/route';
import { call } from '../support/api';

const root = path.resolve(__dirname, '../../app/api');
function routeFiles(dir: string): string[] {
  return readdirSync(dir).flatMap((name) => {
    const p = path.join(dir, name);
    return statSync(p).isDirectory() ? routeFiles(p) : name === 'route.ts' ? [p] : [];
  });
}

// Each of these reads as the number 1 (or another small id) to Number()/parseInt, so a lax parser finds a record.
const NOT_IDS = ['+1', '0x1', ' 1', '1 ', '1e0', '01', '1.0', '2147483648', '99999999999999999999', '-1', '0', ''];

type Handler = Parameters<typeof call>[0];
const files = routeFiles(root).filter((f) => /\[(id|modelId|photoId)\]/.test(f));
const targets = (
  await Promise.all(
    files.map(async (file) => {
      const mod = (await import(file)) as Record<string, Handler | undefined>;
      const rel = path.relative(root, file).replace(/\/route\.ts$/, '');
      return (['GET', 'POST', 'PATCH', 'PUT', 'DELETE'] as const).flatMap((method) => (mod[method] ? [{ rel, method, handler: mod[method]! }] : []));
    }),
  )
).flat();

describe('path ids', () => {
  it('covers the routes with an id in the path', () => expect(targets.length).toBeGreaterThanOrEqual(25));
  for (const { rel, method, handler } of targets) {
    it(`${method} /api/${rel} answers 404 for text that is no id`, async () => {
      const names = [...rel.matchAll(/\[(\w+)\]/g)].map((m) => m[1]!);
      for (const bad of NOT_IDS) {
        for (const which of names) {
          const params = Object.fromEntries(names.map((n) => [n, n === which ? bad : '1']));
          const body = method === 'GET' || method === 'DELETE' ? undefined : {};
          const { status, json } = await call(handler, { as: 'admin', method, params, body, path: `/api/${rel}?version=1` });
          expect(status, `${which}=${JSON.stringify(bad)}: ${JSON.stringify(json)}`).toBe(404);
          expect(json?.error?.code).toBe('not_found');
        }
      }
    });
  }
});

describe('query ids', () => {
  const cases: [string, Handler, string, Record<string, string>?][] = [
    ['audit projectId', auditList, '/api/audit?projectId=', undefined],
    ['audit userId', auditList, '/api/audit?userId=', undefined],
    ['revisions projectId', revisionList, '/api/revisions?projectId=', undefined],
    ['bench checks stageId', projectBenchChecks, '/api/projects/1/bench-checks?stageId=', { id: '1' }],
    ['plot modelId', tubePlot, '/api/tubes/1/plot?modelId=', { id: '1' }],
    ['compare ids', tubeCompare, '/api/tubes/compare?ids=1,', undefined],
  ];
  for (const [what, handler, prefix, params] of cases) {
    it(`${what}: 422 naming the field`, async () => {
      for (const bad of ['2147483648', '99999999999', '0x10', '+1', '1e3', ' 1']) {
        const { status, json } = await call(handler, { as: 'admin', path: prefix + encodeURIComponent(bad), params });
        expect(status, `${what}=${JSON.stringify(bad)}: ${JSON.stringify(json)}`).toBe(422);
        expect(Object.keys(json.error.fieldErrors ?? {}).join(' ')).toMatch(/projectId|userId|stageId|modelId|ids/);
      }
      const ok = await call(handler, { as: 'admin', path: prefix + '2', params });
      expect(ok.status).toBeLessThan(500);
      expect(ok.status).not.toBe(422);
    });
  }
});

describe('body ids and versions', () => {
  it('a version or watcher id beyond the integer range is a 422, not a 500', async () => {
    for (const body of [{ version: 2147483648, name: 'x' }, { version: 1, watchers: [99999999999] }]) {
      const { status, json } = await call(patchProject, { as: 'admin', method: 'PATCH', params: { id: '1' }, body });
      expect(status, JSON.stringify(json)).toBe(422);
    }
  });
});
