// Cross-site state changes are refused: a foreign Origin or Sec-Fetch-Site: cross-site/same-site is a 403 on every
// POST/PATCH/PUT/DELETE route, and a JSON route takes its body only as application/json (415 otherwise, so a
// form on another site cannot post text/plain "JSON" without a preflight).
import { readdirSync, readFileSync, statSync } from 'node:fs';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { POST as createProject } from '@/app/api/projects/route';
import { POST as submitRevision } from '@/app/api/projects/[id]/revisions/route';
import { call } from '../support/api';

const root = path.resolve(__dirname, '../../app/api');
function routeFiles(dir: string): string[] {
  return readdirSync(dir).flatMap((name) => {
    const p = path.join(dir, name);
    return statSync(p).isDirectory() ? routeFiles(p) : name === 'route.ts' ? [p] : [];
  });
}

type Handler = Parameters<typeof call>[0];
const files = routeFiles(root).filter((f) => !f.includes('[...nextauth]'));
const targets = (
  await Promise.all(
    files.map(async (file) => {
      const mod = (await import(file)) as Record<string, Handler | undefined>;
      const rel = path.relative(root, file).replace(/\/route\.ts$/, '');
      const json = /parseBody\(/.test(readFileSync(file, 'utf8'));
      return (['POST', 'PATCH', 'PUT', 'DELETE'] as const).flatMap((method) => (mod[method] ? [{ rel, method, handler: mod[method]!, json: json && method !== 'DELETE' }] : []));
    }),
  )
).flat();

const paramsFor = (rel: string) => Object.fromEntries([...rel.matchAll(/\[(\w+)\]/g)].map((m) => [m[1]!, m[1] === 'token' ? 'x'.repeat(43) : '1']));

describe('cross-site requests', () => {
  it('covers every state-changing route', () => expect(targets.length).toBeGreaterThanOrEqual(20));
  for (const { rel, method, handler, json } of targets) {
    it(`${method} /api/${rel}: 403 for a foreign Origin or Sec-Fetch-Site${json ? ', 415 for text/plain' : ''}`, async () => {
      const params = paramsFor(rel);
      const body = method === 'DELETE' ? undefined : {};
      const foreign: Record<string, string>[] = [{ origin: 'https://attacker.example' }, { origin: 'null' }, { 'sec-fetch-site': 'cross-site' }, { 'sec-fetch-site': 'same-site', origin: 'http://other.localhost:3100' }];
      for (const headers of foreign) {
        const r = await call(handler, { as: 'admin', method, params, body, headers, path: `/api/${rel}?version=1` });
        expect(r.status, `${JSON.stringify(headers)}: ${JSON.stringify(r.json)}`).toBe(403);
        expect(r.json.error.code).toBe('forbidden');
      }
      if (json) {
        const r = await call(handler, { as: 'admin', method, params, body: '{"name":"x"}', headers: { 'content-type': 'text/plain;charset=UTF-8' }, path: `/api/${rel}` });
        expect(r.status, JSON.stringify(r.json)).toBe(415);
      }
    });
  }

  it('our own pages still change things: same Origin, Sec-Fetch-Site same-origin, application/json', async () => {
    const ok = await call(createProject, { as: 'designer', method: 'POST', body: { name: `Same-origin ${Date.now()}` }, headers: { origin: 'http://localhost:3100', 'sec-fetch-site': 'same-origin' } });
    expect(ok.status, JSON.stringify(ok.json)).toBe(201);
    const charset = await call(createProject, { as: 'designer', method: 'POST', body: { name: `Charset ${Date.now()}` }, headers: { 'content-type': 'application/json; charset=utf-8' } });
    expect(charset.status).toBe(201);
  });

  it('a revision submitted without a body still works; a text/plain note is refused', async () => {
    const plain = await call(submitRevision, { as: 'designer', method: 'POST', params: { id: '1' }, body: '{"note":"x"}', headers: { 'content-type': 'text/plain' } });
    expect(plain.status).toBe(415);
  });
});
