// Size limits hold before a body is read: a declared Content-Length over the limit is refused at once, and a
// body sent without one (chunked) is cut off just past the limit. The stream below counts what was pulled.
import { NextRequest } from 'next/server';
import { describe, expect, it } from 'vitest';
import { POST as createProject } from '@/app/api/projects/route';
import { POST as uploadCurves } from '@/app/api/tubes/[id]/curve-sets/route';
import { POST as attach } from '@/app/api/tubes/[id]/attachments/route';
import { POST as addPhoto } from '@/app/api/bench-checks/[id]/photos/route';
import { call, sessionCookie, DEMO } from '../support/api';

const MB = 1024 * 1024;

/** A request whose body is produced on demand in 64 KiB chunks, up to total bytes; pulled() says how much was read. */
function streamingRequest(path: string, total: number, headers: Record<string, string>) {
  let sent = 0;
  const chunk = new Uint8Array(64 * 1024).fill(0x20);
  const body = new ReadableStream<Uint8Array>({
    pull(controller) {
      if (sent >= total) return controller.close();
      sent += chunk.byteLength;
      controller.enqueue(chunk);
    },
  });
  const req = new NextRequest(new URL(path, 'http://localhost:3100'), { method: 'POST', headers, body, duplex: 'half' } as ConstructorParameters<typeof NextRequest>[1] & { duplex: 'half' });
  return { req, pulled: () => sent };
}

type Handler = Parameters<typeof call>[0];
const cases: [string, Handler, Record<string, string>, number, string][] = [
  ['JSON body', createProject, {}, 1 * MB, 'application/json'],
  ['curve CSV upload', uploadCurves, { id: '1' }, 5 * MB, 'multipart/form-data; boundary=xyz'],
  ['datasheet attachment', attach, { id: '1' }, 20 * MB, 'multipart/form-data; boundary=xyz'],
  ['bench photo', addPhoto, { id: '1' }, 8 * MB, 'multipart/form-data; boundary=xyz'],
];

describe('request bodies over the limit', () => {
  for (const [what, handler, params, limit, type] of cases) {
    it(`${what}: 60 MB with Content-Length is refused with 413 before reading`, async () => {
      const cookie = await sessionCookie(DEMO.admin);
      const { req, pulled } = streamingRequest('/api/x', 60 * MB, { cookie, 'content-type': type, 'content-length': String(60 * MB) });
      const res = await handler(req, { params: Promise.resolve(params) });
      expect(res.status).toBe(413);
      const json = await res.json();
      expect(json.error.code).toBe('payload_too_large');
      expect(json.error.message).toMatch(/larger than/);
      expect(pulled()).toBeLessThanOrEqual(256 * 1024);
    });
    it(`${what}: 60 MB without Content-Length is cut off just past the limit`, async () => {
      const cookie = await sessionCookie(DEMO.admin);
      const { req, pulled } = streamingRequest('/api/x', 60 * MB, { cookie, 'content-type': type });
      const res = await handler(req, { params: Promise.resolve(params) });
      expect(res.status).toBe(413);
      expect(pulled()).toBeLessThan(limit + 512 * 1024);
    });
  }

  it('a JSON body under the limit still works, and text/plain uploads are refused with 415', async () => {
    const ok = await call(createProject, { as: 'designer', method: 'POST', body: { name: `Size check ${Date.now()}`, description: 'x'.repeat(3000) } });
    expect(ok.status).toBe(201);
    const cookie = await sessionCookie(DEMO.designer);
    const req = new NextRequest(new URL('/api/tubes/1/curve-sets', 'http://localhost:3100'), { method: 'POST', headers: { cookie, 'content-type': 'text/plain' }, body: 'va,vg,ia\n' });
    const res = await uploadCurves(req, { params: Promise.resolve({ id: '1' }) });
    expect(res.status).toBe(415);
  });
});
