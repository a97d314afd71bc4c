// Report PDFs are drawn off the request thread: while a 20-stage report renders, the server's event loop stays free
// and light requests are answered; a report over its time budget is stopped with a 503 in the one error shape; a
// project holds at most 64 stages (the 65th is a 422), and a larger one (only possible by hand in SQL) is not drawn.
import { performance } from 'node:perf_hooks';
import { PDFParse } from 'pdf-parse';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import * as reportRoute from '@/app/api/projects/[id]/report/route';
import * as projectRoute from '@/app/api/projects/[id]/route';
import * as stagesRoute from '@/app/api/projects/[id]/stages/route';
import * as projectsRoute from '@/app/api/projects/route';
import { MAX_STAGES_PER_PROJECT } from '@/lib/stages/limits';
import { Project, Stage, TubeType } from '@/models';
import { call } from '../support/api';

let tubeId = 0;
const projects: number[] = [];

const stageBody = (name: string) => ({
  name,
  topology: 'common-cathode',
  tubeId,
  supply: 250,
  gridResistor: '1M',
  plateResistor: '100k',
  bias: { kind: 'cathode', cathodeResistor: '1k5', cathodeBypass: '22u' },
  drive: { amplitude: 0.5, frequency: 1000 },
});

async function projectWithStages(name: string, count: number): Promise<number> {
  const r = await call(projectsRoute.POST, { as: 'designer', method: 'POST', body: { name, description: 'report worker test' } });
  expect(r.status, JSON.stringify(r.json)).toBe(201);
  const id = r.json.project.id as number;
  projects.push(id);
  const first = await call(stagesRoute.POST, { as: 'designer', method: 'POST', params: { id: String(id) }, body: stageBody('Stage 1') });
  expect(first.status, JSON.stringify(first.json)).toBe(201);
  // The rest are copies of the analysed first stage, written directly: the test is about the report, not the saves.
  const row = (await Stage.findByPk(first.json.stage.id))!;
  await Stage.bulkCreate(
    Array.from({ length: count - 1 }, (_, i) => ({
      projectId: id,
      position: i + 2,
      name: `Stage ${i + 2}`,
      topology: row.topology,
      tubeTypeId: row.tubeTypeId,
      tubeModelId: row.tubeModelId,
      supplyNode: row.supplyNode,
      inputs: row.inputs,
      analysis: row.analysis,
      analysisError: row.analysisError,
    })),
  );
  return id;
}

beforeAll(async () => {
  const t = await TubeType.findOne({ where: { designation: '12AX7' } });
  expect(t, 'the seeded tube library has the 12AX7').not.toBeNull();
  tubeId = t!.id;
});

afterAll(async () => {
  delete process.env.REPORT_TIME_BUDGET_MS;
  if (projects.length) {
    await Stage.destroy({ where: { projectId: projects } });
    await Project.destroy({ where: { id: projects } });
  }
});

describe('report PDFs off the request thread', () => {
  let twenty = 0;

  it('keeps the event loop free and answers light requests while a 20-stage report renders', async () => {
    // This test is about the event loop, not the budget: a busy test machine may draw slowly.
    process.env.REPORT_TIME_BUDGET_MS = '170000';
    twenty = await projectWithStages('Twenty-stage report', 20);
    // Warm the pool with a one-stage report (the first report starts the drawing thread), so the measurement below
    // is the render itself.
    const one = await projectWithStages('One-stage report', 1);
    expect((await call(reportRoute.GET, { as: 'designer', params: { id: String(one) } })).status).toBe(200);

    let done = false;
    const started = performance.now();
    const report = call(reportRoute.GET, { as: 'designer', params: { id: String(twenty) } }).then((r) => {
      done = true;
      return r;
    });

    // Event-loop lag: a 10 ms timer that fires late by the time the main thread was busy.
    let maxLag = 0;
    let ticks = 0;
    const lagProbe = (async () => {
      while (!done) {
        const t0 = performance.now();
        await new Promise((r) => setTimeout(r, 10));
        maxLag = Math.max(maxLag, performance.now() - t0 - 10);
        ticks++;
      }
    })();
    // Light requests through the same process, one after another, while the report is in flight.
    const light: number[] = [];
    const lightCalls = (async () => {
      while (!done) {
        const t0 = performance.now();
        const r = await call(projectRoute.GET, { as: 'designer', params: { id: String(twenty) } });
        expect(r.status).toBe(200);
        if (!done) light.push(performance.now() - t0);
      }
    })();

    const r = await report;
    const renderMs = performance.now() - started;
    delete process.env.REPORT_TIME_BUDGET_MS;
    await Promise.all([lagProbe, lightCalls]);

    expect(r.status, JSON.stringify(r.json)).toBe(200);
    const text = (await new PDFParse({ data: new Uint8Array(await r.res.arrayBuffer()) }).getText()).text;
    expect(text).toContain('Twenty-stage report');
    expect(text).toContain('Stage 20');

    // Drawn on the request thread, the loop would stall for the whole render (seconds) and no light call would
    // finish before the report. Off the thread, the loop keeps ticking and several light calls complete.
    const sorted = [...light].sort((a, b) => a - b);
    const p99 = sorted[Math.min(sorted.length - 1, Math.floor(sorted.length * 0.99))] ?? Infinity;
    console.info(`[report-worker] 20-stage render ${renderMs.toFixed(0)} ms; loop max lag ${maxLag.toFixed(0)} ms over ${ticks} ticks; ${light.length} light calls, p99 ${p99.toFixed(0)} ms`);
    expect(renderMs).toBeGreaterThan(300);
    expect(ticks).toBeGreaterThan(10);
    expect(light.length).toBeGreaterThanOrEqual(3);
    expect(maxLag).toBeLessThan(Math.max(150, renderMs / 4));
  }, 180_000);

  it('stops a report over its time budget with a 503, Retry-After and a plain message, then draws the next one', async () => {
    process.env.REPORT_TIME_BUDGET_MS = '150';
    const slow = await call(reportRoute.GET, { as: 'designer', params: { id: String(twenty) } });
    delete process.env.REPORT_TIME_BUDGET_MS;
    expect(slow.status).toBe(503);
    expect(slow.res.headers.get('retry-after')).toBe('60');
    expect(slow.json.error.code).toBe('report_timeout');
    expect(slow.json.error.message).toMatch(/took longer than 0\.2 s to draw/);
    // The stopped thread is replaced: the same report draws within the normal budget.
    const again = await call(reportRoute.GET, { as: 'designer', params: { id: String(twenty) } });
    expect(again.status).toBe(200);
    expect(again.res.headers.get('content-type')).toBe('application/pdf');
  }, 180_000);

  it(`refuses the ${MAX_STAGES_PER_PROJECT + 1}th stage with a 422 and a plain message, and keeps the count`, async () => {
    expect(MAX_STAGES_PER_PROJECT).toBe(64);
    const id = await projectWithStages('Full project', MAX_STAGES_PER_PROJECT - 1);
    const last = await call(stagesRoute.POST, { as: 'designer', method: 'POST', params: { id: String(id) }, body: stageBody('Stage 64') });
    expect(last.status, JSON.stringify(last.json)).toBe(201);
    const over = await call(stagesRoute.POST, { as: 'designer', method: 'POST', params: { id: String(id) }, body: stageBody('Stage 65') });
    expect(over.status).toBe(422);
    expect(over.json.error.code).toBe('unprocessable_entity');
    expect(over.json.error.message).toMatch(/at most 64 stages/);
    expect(await Stage.count({ where: { projectId: id } })).toBe(64);
  });

  it('does not draw a project that holds more stages than the limit', async () => {
    const id = await projectWithStages('Oversized by hand', MAX_STAGES_PER_PROJECT + 1);
    const r = await call(reportRoute.GET, { as: 'designer', params: { id: String(id) } });
    expect(r.status).toBe(422);
    expect(r.json.error.code).toBe('report_too_large');
    expect(r.json.error.message).toMatch(/at most 64 stages; this project has 65/);
  });
});
