// PostgreSQL going away under load: the API answers 503 with Retry-After in the one error shape (never a 500),
// recovers by itself once the database is back, and every write it confirmed is in the database.
// The app's pool connects through a relay the test cuts for three seconds (the shared cluster is left alone).
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { Sequelize } from 'sequelize';
import { CuttableProxy } from '../support/tcp-proxy';

type Api = typeof import('../support/api');
let api: Api;
let createProject: Parameters<Api['call']>[0];
let listProjects: Parameters<Api['call']>[0];
let me: Parameters<Api['call']>[0];
const dbUrl = new URL(process.env.DATABASE_URL!);
const relay = new CuttableProxy({ host: dbUrl.hostname, port: Number(dbUrl.port || 5432) });
const direct = new Sequelize(dbUrl.toString(), { logging: false });

beforeAll(async () => {
  const port = await relay.start();
  const viaRelay = new URL(dbUrl);
  viaRelay.port = String(port);
  const { createSequelize } = await import('@/lib/db/sequelize');
  (globalThis as { anodyneSequelize?: unknown }).anodyneSequelize = createSequelize(viaRelay.toString());
  api = await import('../support/api');
  createProject = (await import('@/app/api/projects/route')).POST;
  listProjects = (await import('@/app/api/projects/route')).GET;
  me = (await import('@/app/api/me/route')).GET;
});

afterAll(async () => {
  await relay.stop();
  await direct.close();
});

type Outcome = { name: string; kind: 'write' | 'read'; status: number; code?: string; retryAfter: string | null; at: number };

describe('database outage', () => {
  it('503 + Retry-After while PostgreSQL is away, recovery without restart, no confirmed write lost', async () => {
    const tag = `Outage ${Date.now()}`;
    // the session token is made once, before the outage (making it reads the user row)
    const as = null;
    const headers = { cookie: await api.sessionCookie(api.DEMO.designer) };
    const outcomes: Outcome[] = [];
    const t0 = Date.now();
    let running = true;
    let n = 0;
    const worker = async (w: number) => {
      while (running) {
        const name = `${tag} w${w} #${n++}`;
        const write = n % 3 !== 0;
        const r = write
          ? await api.call(createProject, { as, headers, method: 'POST', body: { name } })
          : await api.call(listProjects, { as, headers, path: '/api/projects' });
        outcomes.push({ name, kind: write ? 'write' : 'read', status: r.status, code: r.json?.error?.code, retryAfter: r.res.headers.get('retry-after'), at: Date.now() - t0 });
        await new Promise((res) => setTimeout(res, 20));
      }
    };
    const workers = [0, 1, 2, 3].map(worker);
    await new Promise((res) => setTimeout(res, 1000));
    await relay.cut();
    const cutAt = Date.now() - t0;
    await new Promise((res) => setTimeout(res, 3000));
    const during = await api.call(me, { as, headers });
    await relay.restore();
    const restoredAt = Date.now() - t0;
    await new Promise((res) => setTimeout(res, 2500));
    running = false;
    await Promise.all(workers);

    // never a 500; only success or 503 in the error shape with Retry-After
    const statuses = new Set(outcomes.map((o) => o.status));
    expect([...statuses].filter((s) => ![200, 201, 503].includes(s)), JSON.stringify(outcomes.filter((o) => ![200, 201, 503].includes(o.status)).slice(0, 3))).toEqual([]);
    const unavailable = outcomes.filter((o) => o.status === 503);
    expect(unavailable.length).toBeGreaterThan(0);
    for (const o of unavailable) {
      expect(o.code).toBe('service_unavailable');
      expect(Number(o.retryAfter)).toBeGreaterThan(0);
    }
    expect(during.status).toBe(503);
    expect(during.json.error.message).toMatch(/temporarily unavailable/);

    // worked before, and works again after the database is back (same process, same pool)
    expect(outcomes.some((o) => o.at < cutAt && o.status === 201)).toBe(true);
    const after = outcomes.filter((o) => o.at > restoredAt + 1000);
    expect(after.length).toBeGreaterThan(0);
    expect(after.every((o) => o.status === 200 || o.status === 201), JSON.stringify(after.filter((o) => o.status >= 300).slice(0, 3))).toBe(true);

    // every confirmed create is stored (read over a direct connection)
    const confirmed = outcomes.filter((o) => o.kind === 'write' && o.status === 201).map((o) => o.name);
    const [rows] = await direct.query(`SELECT name FROM projects WHERE name LIKE :tag || '%'`, { replacements: { tag } });
    const stored = new Set((rows as { name: string }[]).map((r) => r.name));
    expect(confirmed.length).toBeGreaterThan(5);
    expect(confirmed.filter((name) => !stored.has(name))).toEqual([]);
  }, 60_000);
});
