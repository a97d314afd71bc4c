// The project's review and bench settings (bench tolerances, watchers) through PATCH /api/projects/{id}, and what they change
// downstream: the bench check's verdict and the recipients of the decision mail.
import { beforeAll, describe, expect, it } from 'vitest';
import { GET as getProjectRoute, PATCH as patchProject } from '@/app/api/projects/[id]/route';
import { POST as createProjectRoute } from '@/app/api/projects/route';
import { POST as decide } from '@/app/api/revisions/[id]/decision/route';
import { POST as submit } from '@/app/api/projects/[id]/revisions/route';
import { GET as stageChecks, POST as recordCheck } from '@/app/api/stages/[id]/bench-checks/route';
import { analyzeStage, type StageAnalysis } from '@/lib/calc';
import { BENCH_QUANTITIES, BENCH_QUANTITY_KEYS } from '@/lib/calc/bench';
import { listWatcherOptions } from '@/lib/projects/service';
import { getEngineTube } from '@/lib/tubes/service';
import { deliverDueMail } from '@/lib/mail/outbox';
import { BENCH_TOLERANCE_KEYS } from '@/lib/validation/project';
import { stageBodySchema, stageInputSchema } from '@/lib/validation/stage';
import { AuditEvent, MailOutbox, Stage, TubeType, User } from '@/models';
import { call, sinkMessages, waitFor } from '../support/api';

const name = `Settings test ${Date.now()}`;
let projectId: number;
let version: number;
let stageId: number;
let technicianId: number;
let design: StageAnalysis['operatingPoint'];

const patch = (body: unknown, as: 'designer' | 'technician' | 'reviewer' | 'admin' = 'designer') => call(patchProject, { as, method: 'PATCH', params: { id: String(projectId) }, body });

beforeAll(async () => {
  const created = await call(createProjectRoute, { as: 'designer', method: 'POST', body: { name } });
  expect(created.status).toBe(201);
  projectId = created.json.project.id;
  version = created.json.project.version;
  technicianId = (await User.findOne({ where: { email: 'technician@anodyne.test' } }))!.id;

  // The 12AX7 stage of tube-models.md §6 example A: B+ 330 V, Ra 100 kΩ, Rk 1.5 kΩ.
  const tube = await TubeType.findOne({ where: { designation: '12AX7' } });
  const body = stageBodySchema.parse({ topology: 'common-cathode', tubeId: tube!.id, supply: 330, plateResistor: 100e3, gridResistor: 1e6, bias: { kind: 'cathode', cathodeResistor: 1500, cathodeBypass: 22e-6 } });
  const { tubeId: _t, ...rest } = body;
  const analysis = analyzeStage(stageInputSchema.parse({ ...rest, tube: await getEngineTube(tube!.id) }));
  design = analysis.operatingPoint;
  const stage = await Stage.create({ projectId, position: 1, name: 'V1 input', topology: 'common-cathode', tubeTypeId: tube!.id, tubeModelId: null, supplyNode: null, inputs: body as never, analysis: analysis as never, analysisError: null });
  stageId = stage.id;
});

describe('project review and bench settings', () => {
  it('accepts a tolerance for every quantity the bench check compares, and no other', () => {
    // One list, defined beside the bench arithmetic: the schema's keys are the engine's, and every one is labelled.
    expect(BENCH_TOLERANCE_KEYS).toBe(BENCH_QUANTITY_KEYS);
    expect(BENCH_QUANTITIES.map((q) => q.key)).toEqual([...BENCH_QUANTITY_KEYS]);
  });

  it('lists only active users as watcher candidates', async () => {
    const gone = await User.create({ email: `gone-${Date.now()}@anodyne.test`, displayName: 'Former colleague', role: 'technician', passwordHash: null, active: false });
    const options = await listWatcherOptions();
    expect(options.map((o) => o.id)).toContain(technicianId);
    expect(options.map((o) => o.id)).not.toContain(gone.id);
    expect(options.find((o) => o.id === technicianId)).toEqual({ id: technicianId, displayName: 'Ines Okafor', role: 'technician' });
  });

  it('sets a 5 % plate-current tolerance and a watcher with the version read, and audits the change', async () => {
    const { status, json } = await patch({ version, benchTolerances: { plateCurrent: 0.05 }, watchers: [technicianId] });
    expect(status, JSON.stringify(json)).toBe(200);
    expect(json.project.benchTolerances).toEqual({ plateCurrent: 0.05 });
    expect(json.project.watchers).toEqual([{ id: technicianId, displayName: 'Ines Okafor' }]);
    expect(json.project.version).toBe(version + 1);

    const audit = await AuditEvent.findOne({ where: { action: 'project.update', targetType: 'project', targetId: String(projectId) }, order: [['id', 'DESC']] });
    expect(audit?.projectId).toBe(projectId);
    expect((audit?.details as { fields: string[] }).fields.sort()).toEqual(['benchTolerances', 'watchers']);
    expect(audit?.details).toMatchObject({ version });
    version = json.project.version;

    const read = await call(getProjectRoute, { as: 'technician', params: { id: String(projectId) } });
    expect(read.json.project.benchTolerances).toEqual({ plateCurrent: 0.05 });
  });

  it('refuses a stale version with the current record, and changes nothing', async () => {
    const { status, json } = await patch({ version: version - 1, benchTolerances: { plateCurrent: 0.2 }, watchers: [] });
    expect(status).toBe(409);
    expect(json.error.details.current.benchTolerances).toEqual({ plateCurrent: 0.05 });
    expect(json.error.details.current.version).toBe(version);
    const read = await call(getProjectRoute, { as: 'designer', params: { id: String(projectId) } });
    expect(read.json.project.watchers.map((w: { id: number }) => w.id)).toEqual([technicianId]);
  });

  it('answers out-of-range tolerances and unknown quantities with field messages, never a 500', async () => {
    const zero = await patch({ version, benchTolerances: { plateCurrent: 0 } });
    expect(zero.status).toBe(422);
    expect(zero.json.error.fieldErrors['benchTolerances.plateCurrent']).toEqual(['must be above 0 %']);
    const tooWide = await patch({ version, benchTolerances: { plateVoltage: 1.5 } });
    expect(tooWide.status).toBe(422);
    expect(tooWide.json.error.fieldErrors['benchTolerances.plateVoltage']).toEqual(['must be at most 100 %']);
    const notNumber = await patch({ version, benchTolerances: { cathodeVoltage: '5 %' } });
    expect(notNumber.status).toBe(422);
    expect(notNumber.json.error.fieldErrors['benchTolerances.cathodeVoltage']).toEqual(['must be a number']);
    const unknown = await patch({ version, benchTolerances: { gridVoltage: 0.05 } });
    expect(unknown.status).toBe(422);
    const stranger = await patch({ version, watchers: [99999999] });
    expect(stranger.status).toBe(422);
    expect(stranger.json.error.fieldErrors.watchers).toBeTruthy();
    const technician = await patch({ version, watchers: [] }, 'technician');
    expect(technician.status).toBe(403);
    const read = await call(getProjectRoute, { as: 'designer', params: { id: String(projectId) } });
    expect(read.json.project.version).toBe(version);
  });

  it("judges a bench check against the project's 5 % plate-current tolerance", async () => {
    const ctx = await call(stageChecks, { as: 'technician', params: { id: String(stageId) } });
    expect(ctx.json.context.tolerances.plateCurrent).toEqual({ value: 0.05, source: 'project' });
    expect(ctx.json.context.tolerances.plateVoltage).toEqual({ value: 0.1, source: 'common practice' });

    // Cathode 7 % low → Ia = Vk / 1.5 kΩ is 7 % low: a pass at the ±10 % default (common practice), a check at ±5 %
    // (outside the tolerance, within twice it).
    const body = { supplyVoltage: 330, plateVoltage: design.plateVoltage, cathodeVoltage: design.cathodeVoltage * 0.93 };
    const { status, json } = await call(recordCheck, { as: 'technician', method: 'POST', params: { id: String(stageId) }, body });
    expect(status, JSON.stringify(json)).toBe(201);
    const ia = json.benchCheck.comparisons.find((c: { key: string }) => c.key === 'plateCurrent');
    expect(ia.deviation).toBeCloseTo(-0.07, 2);
    expect(ia.tolerance).toBe(0.05);
    expect(ia.toleranceSource).toBe('project');
    expect(ia.status).toBe('check');
    const va = json.benchCheck.comparisons.find((c: { key: string }) => c.key === 'plateVoltage');
    expect(va.toleranceSource).toBe('common practice');
  });

  it('sends the decision summary with the PDF to the watcher as well as the designer', async () => {
    const sub = await call(submit, { as: 'designer', method: 'POST', params: { id: String(projectId) } });
    expect(sub.status, JSON.stringify(sub.json)).toBe(201);
    const revisionId = sub.json.revision.id;
    const decided = await call(decide, { as: 'reviewer', method: 'POST', params: { id: String(revisionId) }, body: { decision: 'approve', comment: 'Bias checked at ±5 %.' } });
    expect(decided.status, JSON.stringify(decided.json)).toBe(201);

    const subject = `Approved: ${name}, revision 1`;
    const row = await MailOutbox.findOne({ where: { subject } });
    expect(row).not.toBeNull();
    expect([...row!.to].sort()).toEqual(['designer@anodyne.test', 'technician@anodyne.test']);
    // The decision route also hands the mail to deliverSoon, which may hold the row (SKIP LOCKED): drain until sent.
    await waitFor(async () => {
      await deliverDueMail({ ids: [row!.id], ignoreSchedule: true });
      return (await MailOutbox.findByPk(row!.id))!.status === 'sent';
    });

    const msg = await waitFor(async () => (await sinkMessages()).find((m) => m.subject === subject));
    expect(msg.to).toEqual(expect.arrayContaining(['technician@anodyne.test', 'designer@anodyne.test']));
    expect(msg.text).toContain('Bias checked at ±5 %.');
    const pdf = msg.attachments.find((a) => a.filename.endsWith('.pdf'));
    expect(pdf?.contentType).toBe('application/pdf');
    expect(Buffer.from(pdf!.contentBase64!, 'base64').subarray(0, 5).toString()).toBe('%PDF-');
  });

  it('removes the watcher and resets the tolerance to the default', async () => {
    const current = (await call(getProjectRoute, { as: 'designer', params: { id: String(projectId) } })).json.project;
    const { status, json } = await patch({ version: current.version, benchTolerances: {}, watchers: [] });
    expect(status, JSON.stringify(json)).toBe(200);
    expect(json.project.watchers).toEqual([]);
    expect(json.project.benchTolerances).toEqual({});
    const ctx = await call(stageChecks, { as: 'technician', params: { id: String(stageId) } });
    expect(ctx.json.context.tolerances.plateCurrent).toEqual({ value: 0.1, source: 'common practice' });
  });
});
