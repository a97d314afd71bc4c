// Exploration jobs: two worker processes share the queue in PostgreSQL (pg-boss); a worker killed mid-job loses no
// job (the other notices the stale heartbeat and the run completes there); cancel stops a running run; the routes
// answer with progress and results stored against the stage version they were made for.
import { spawn, type ChildProcess } from 'node:child_process';
import path from 'node:path';
import { PDFParse } from 'pdf-parse';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import * as reportRoute from '@/app/api/projects/[id]/report/route';
import * as runRoute from '@/app/api/explore/runs/[id]/route';
import * as cancelRoute from '@/app/api/explore/runs/[id]/cancel/route';
import * as runsRoute from '@/app/api/explore/runs/route';
import { stopQueue } from '@/lib/jobs/queue';
import { ExploreRun, Stage } from '@/models';
import { call } from '../support/api';

const root = path.resolve(__dirname, '../..');
type Worker = { name: string; child: ChildProcess; log: string[] };
const workers: Worker[] = [];
let stageId = 0;

function startWorker(name: string): Promise<Worker> {
  const child = spawn(process.execPath, ['--import', 'tsx', 'scripts/worker.ts'], {
    cwd: root,
    env: { ...process.env, EXPLORE_WORKER_NAME: name, EXPLORE_THREADS: '1', EXPLORE_HEARTBEAT_MS: '500', EXPLORE_STALE_SECONDS: '4' },
    stdio: ['ignore', 'pipe', 'pipe'],
  });
  const w: Worker = { name, child, log: [] };
  workers.push(w);
  return new Promise((resolve, reject) => {
    const timer = setTimeout(() => reject(new Error(`${name} did not start: ${w.log.join('')}`)), 60_000);
    const onData = (d: Buffer) => {
      w.log.push(d.toString());
      if (d.toString().includes('ready')) {
        clearTimeout(timer);
        resolve(w);
      }
    };
    child.stdout!.on('data', onData);
    child.stderr!.on('data', (d: Buffer) => w.log.push(d.toString()));
    child.on('exit', (code) => w.log.push(`exit ${code}`));
  });
}

async function waitFor<T>(what: string, probe: () => Promise<T | null | undefined | false>, timeoutMs = 90_000): Promise<T> {
  const t0 = Date.now();
  for (;;) {
    const v = await probe();
    if (v) return v;
    if (Date.now() - t0 > timeoutMs) throw new Error(`timed out waiting for ${what}; logs: ${workers.map((w) => `${w.name}: ${w.log.join('')}`).join(' | ')}`);
    await new Promise((r) => setTimeout(r, 200));
  }
}

async function postTolerance(trials: number, seed = 1) {
  const r = await call(runsRoute.POST, { as: 'designer', method: 'POST', body: { kind: 'tolerance', target: { stageId }, options: { trials, seed } } });
  expect(r.status, JSON.stringify(r.json)).toBe(201);
  return (r.json as { run: { id: number } }).run.id;
}

beforeAll(async () => {
  // a demo stage that analyses (the seeded projects carry several)
  const stages = await Stage.findAll({ order: [['id', 'ASC']] });
  const ok = stages.find((s) => s.analysis !== null && s.topology === 'common-cathode') ?? stages.find((s) => s.analysis !== null);
  if (!ok) throw new Error('no analysable demo stage');
  stageId = ok.id;
  await Promise.all([startWorker('w1'), startWorker('w2')]);
}, 120_000);

afterAll(async () => {
  for (const w of workers) if (w.child.exitCode === null) w.child.kill('SIGKILL');
  await stopQueue(process.env.DATABASE_URL!, 'app');
});

describe('exploration jobs', { timeout: 180_000 }, () => {
  it('refuses a bad request with field messages and answers 404 for an unknown run', async () => {
    const bad = await call(runsRoute.POST, { as: 'designer', method: 'POST', body: { kind: 'tolerance', target: { stageId }, options: { trials: 5 } } });
    expect(bad.status).toBe(422);
    const body = bad.json as { error: { fieldErrors: Record<string, string[]> } };
    expect(body.error.fieldErrors['options.trials']).toBeDefined();
    const missing = await call(runRoute.GET, { as: 'reviewer', params: { id: '999999' } });
    expect(missing.status).toBe(404);
  });

  it('shares the queue between two workers and stores results with the stage version', async () => {
    const ids = [await postTolerance(20_000, 1), await postTolerance(20_000, 2)];
    const done = await waitFor('both runs', async () => {
      const rows = await ExploreRun.findAll({ where: { id: ids } });
      return rows.every((r) => r.status === 'completed') ? rows : null;
    });
    expect(new Set(done.map((r) => r.worker)), workers.map((w) => `${w.name}: ${w.log.join('')}`).join(' | ')).toEqual(new Set(['w1', 'w2']));
    const stage = await Stage.findByPk(stageId);
    const res = await call(runRoute.GET, { as: 'technician', params: { id: String(ids[0]) } });
    expect(res.status).toBe(200);
    const { run } = res.json as { run: { status: string; designVersion: number; current: boolean; progress: { done: number; total: number }; result: { summary: { completed: number; metrics: { key: string }[] } } } };
    expect(run.status).toBe('completed');
    expect(run.designVersion).toBe(stage!.version);
    expect(run.current).toBe(true);
    expect(run.progress).toEqual({ done: 20_000, total: 20_000 });
    expect(run.result.summary.completed).toBe(20_000);
    expect(run.result.summary.metrics.map((m) => m.key)).toContain('plateCurrent');
    // the design report carries the tolerance summary of the current stage version
    const pdf = await call(reportRoute.GET, { as: 'reviewer', params: { id: String(stage!.projectId) } });
    expect(pdf.status).toBe(200);
    const text = (await new PDFParse({ data: new Uint8Array(await pdf.res.arrayBuffer()) }).getText()).text;
    expect(text).toContain('Tolerance runs');
    expect(text).toContain(stage!.name);
  });

  it('cancels a running run', async () => {
    const id = await postTolerance(150_000, 3);
    await waitFor('running with progress', async () => {
      const r = await ExploreRun.findByPk(id);
      return r?.status === 'running' && r.progressDone > 0;
    });
    const res = await call(cancelRoute.POST, { as: 'designer', method: 'POST', params: { id: String(id) } });
    expect(res.status).toBe(200);
    const r = await waitFor('cancelled', async () => {
      const x = await ExploreRun.findByPk(id);
      return x?.status === 'cancelled' ? x : null;
    }, 30_000);
    expect(r.progressDone).toBeLessThan(150_000);
    const again = await call(cancelRoute.POST, { as: 'designer', method: 'POST', params: { id: String(id) } });
    expect(again.status).toBe(409);
  });

  it('loses no job when the worker running it is killed', async () => {
    const id = await postTolerance(60_000, 4);
    const running = await waitFor('running with progress', async () => {
      const r = await ExploreRun.findByPk(id);
      return r?.status === 'running' && r.progressDone > 0 ? r : null;
    });
    const victim = workers.find((w) => w.name === running.worker)!;
    victim.child.kill('SIGKILL');
    const done = await waitFor('the run to complete on the other worker', async () => {
      const r = await ExploreRun.findByPk(id);
      return r?.status === 'completed' ? r : null;
    }, 120_000);
    expect(done.worker).not.toBe(victim.name);
    expect(done.attempt).toBeGreaterThanOrEqual(2);
    expect((done.result as { summary: { completed: number } }).summary.completed).toBe(60_000);
  });
});
