// Bench checks through the route handlers, against the real test database and the local S3 fake.
import { beforeAll, describe, expect, it } from 'vitest';
import { GET as getCheck } from '@/app/api/bench-checks/[id]/route';
import { GET as getPhoto } from '@/app/api/bench-checks/[id]/photos/[photoId]/route';
import { POST as postPhoto } from '@/app/api/bench-checks/[id]/photos/route';
import { GET as projectChecks } from '@/app/api/projects/[id]/bench-checks/route';
import { GET as stageChecks, POST as recordCheck } from '@/app/api/stages/[id]/bench-checks/route';
import { analyzeStage, type StageAnalysis } from '@/lib/calc';
import { getEngineTube } from '@/lib/tubes/service';
import { stageBodySchema, stageInputSchema } from '@/lib/validation/stage';
import { AuditEvent, Project, Stage, TubeType, User } from '@/models';
import { call } from '../support/api';

let projectId: number;
let stageId: number;
let design: StageAnalysis['operatingPoint'];

beforeAll(async () => {
  const tube = await TubeType.findOne({ where: { designation: '12AX7' } });
  if (!tube) throw new Error('the seeded tube library has no 12AX7');
  const designer = await User.findOne({ where: { email: 'designer@anodyne.test' } });
  const project = await Project.create({ name: `Bench test ${Date.now()}`, ownerId: designer!.id });
  // The 12AX7 stage of tube-models.md §6 example A: B+ 330 V, Ra 100 kΩ, Rk 1.5 kΩ.
  const body = stageBodySchema.parse({ topology: 'common-cathode', tubeId: tube.id, supply: 330, plateResistor: 100e3, gridResistor: 1e6, bias: { kind: 'cathode', cathodeResistor: 1500, cathodeBypass: 22e-6 } });
  const { tubeId: _t, ...rest } = body;
  const analysis = analyzeStage(stageInputSchema.parse({ ...rest, tube: await getEngineTube(tube.id) }));
  const stage = await Stage.create({ projectId: project.id, position: 1, name: 'V1 input', topology: 'common-cathode', tubeTypeId: tube.id, tubeModelId: null, supplyNode: null, inputs: body as never, analysis: analysis as never, analysisError: null });
  projectId = project.id;
  stageId = stage.id;
  design = analysis.operatingPoint;
});

describe('bench checks', () => {
  it('shows the design values to expect beside each reading', async () => {
    const { status, json } = await call(stageChecks, { as: 'technician', params: { id: String(stageId) } });
    expect(status).toBe(200);
    expect(json.context.expected.plateVoltage).toBeCloseTo(design.plateVoltage, 6);
    expect(json.context.expected.cathodeVoltage).toBeCloseTo(design.cathodeVoltage, 6);
    expect(json.context.expected.heaterVoltage).toBe(6.3); // seeded 12AX7 heater, parallel connection
    expect(json.context.plateCurrentRoute).toBe('cathode');
    expect(json.context.tolerances.plateCurrent).toEqual({ value: 0.1, source: 'common practice' });
  });

  it('records readings close to the design as a pass, with the derived quantities, and audits it', async () => {
    // Readings 1 % off the design point: Ia = Vk / 1.5 kΩ stays within ±10 %.
    const body = { supplyVoltage: 330, plateVoltage: (design.plateVoltage * 1.01).toFixed(1), cathodeVoltage: String(design.cathodeVoltage * 0.99), heaterVoltage: 6.2, tubeSerial: 'JJ-2291', notes: 'Cold start, 10 min warm-up' };
    const { status, json } = await call(recordCheck, { as: 'technician', method: 'POST', params: { id: String(stageId) }, body });
    expect(status, JSON.stringify(json)).toBe(201);
    const check = json.benchCheck;
    expect(check.verdict).toBe('pass');
    expect(check.readings.plateCurrentMethod).toBe('cathode');
    const ia = check.comparisons.find((c: { key: string }) => c.key === 'plateCurrent');
    expect(ia.measured).toBeCloseTo((design.cathodeVoltage * 0.99) / 1500, 9);
    expect(ia.deviation).toBeCloseTo(-0.01, 2);
    const pa = check.comparisons.find((c: { key: string }) => c.key === 'plateDissipation');
    expect(pa.limit).toBeGreaterThan(0); // the 12AX7's plate dissipation rating from the stored analysis
    expect(check.technician.displayName).toBe('Ines Okafor');
    const audit = await AuditEvent.findOne({ where: { action: 'bench-check.record', targetId: String(check.id) } });
    expect(audit?.projectId).toBe(projectId);
    expect(audit?.details).toMatchObject({ verdict: 'pass', stageId });
  });

  it('fails a hot bias with words on what to look at, and filters the history to the failing checks', async () => {
    // Cathode at 1.4 × design: Ia 40 % above design, beyond twice the ±10 % tolerance → fail.
    const body = { supplyVoltage: 330, plateVoltage: design.plateVoltage - 40, cathodeVoltage: design.cathodeVoltage * 1.4 };
    const { status, json } = await call(recordCheck, { as: 'technician', method: 'POST', params: { id: String(stageId) }, body });
    expect(status).toBe(201);
    expect(json.benchCheck.verdict).toBe('fail');
    expect(json.benchCheck.summary[0]).toMatch(/^Plate current 40 % above design: check the cathode resistor/);

    const all = await call(projectChecks, { as: 'designer', params: { id: String(projectId) }, path: `/api/projects/${projectId}/bench-checks` });
    expect(all.json.checks.map((c: { verdict: string }) => c.verdict)).toEqual(['fail', 'pass']);
    const failing = await call(projectChecks, { as: 'reviewer', params: { id: String(projectId) }, path: `/api/projects/${projectId}/bench-checks?failing=1` });
    expect(failing.json.checks).toHaveLength(1);
    expect(failing.json.checks[0].verdict).toBe('fail');
    const history = await call(stageChecks, { as: 'technician', params: { id: String(stageId) }, path: `/api/stages/${stageId}/bench-checks?verdict=pass` });
    expect(history.json.checks).toHaveLength(1);
  });

  it("uses the project's own tolerance when it has one", async () => {
    await Project.update({ benchTolerances: { plateCurrent: 0.005 } }, { where: { id: projectId } });
    // 2 % low on the cathode → −2 % plate current against ±0.5 %: beyond twice the tolerance (1 %) → fail.
    const body = { supplyVoltage: 330, plateVoltage: design.plateVoltage, cathodeVoltage: design.cathodeVoltage * 0.98 };
    const { json } = await call(recordCheck, { as: 'admin', method: 'POST', params: { id: String(stageId) }, body });
    const ia = json.benchCheck.comparisons.find((c: { key: string }) => c.key === 'plateCurrent');
    expect(ia.tolerance).toBe(0.005);
    expect(ia.toleranceSource).toBe('project');
    expect(ia.status).toBe('fail');
    await Project.update({ benchTolerances: {} }, { where: { id: projectId } });
  });

  it('answers bad readings with field messages, never a 500', async () => {
    const notNumber = await call(recordCheck, { as: 'technician', method: 'POST', params: { id: String(stageId) }, body: { supplyVoltage: 330, plateVoltage: 'two hundred', cathodeVoltage: 1.6 } });
    expect(notNumber.status).toBe(422);
    expect(notNumber.json.error.fieldErrors.plateVoltage[0]).toMatch(/is not a number/);
    const aboveSupply = await call(recordCheck, { as: 'technician', method: 'POST', params: { id: String(stageId) }, body: { supplyVoltage: 250, plateVoltage: 300, cathodeVoltage: 1.6 } });
    expect(aboveSupply.status).toBe(422);
    expect(aboveSupply.json.error.fieldErrors.plateVoltage[0]).toMatch(/above the supply/);
    const missing = await call(recordCheck, { as: 'technician', method: 'POST', params: { id: String(stageId) }, body: { plateVoltage: 200 } });
    expect(Object.keys(missing.json.error.fieldErrors).sort()).toEqual(['cathodeVoltage', 'supplyVoltage']);
    const noStage = await call(recordCheck, { as: 'technician', method: 'POST', params: { id: '99999999' }, body: { supplyVoltage: 330, plateVoltage: 200, cathodeVoltage: 1.6 } });
    expect(noStage.status).toBe(404);
  });

  it('stores a photo through the S3 client and serves it back; refuses a file that is not an image', async () => {
    const { json } = await call(recordCheck, { as: 'technician', method: 'POST', params: { id: String(stageId) }, body: { supplyVoltage: 330, plateVoltage: design.plateVoltage, cathodeVoltage: design.cathodeVoltage } });
    const checkId = String(json.benchCheck.id);
    // A 1×1 PNG.
    const png = Buffer.from('iVBORw0KGgoAAAANSUhEUgAAAAEAAAABCAYAAAAfFcSJAAAADUlEQVR42mP8z8BQDwAEhQGAhKmMIQAAAABJRU5ErkJggg==', 'base64');
    const form = new FormData();
    form.set('file', new File([png], 'v1-socket.png', { type: 'image/png' }));
    const up = await call(postPhoto, { as: 'technician', method: 'POST', params: { id: checkId }, form });
    expect(up.status, JSON.stringify(up.json)).toBe(201);
    expect(up.json.photo.contentType).toBe('image/png');

    const got = await call(getPhoto, { as: 'designer', params: { id: checkId, photoId: String(up.json.photo.id) } });
    expect(got.status).toBe(200);
    expect(got.res.headers.get('content-type')).toBe('image/png');
    expect(Buffer.from(await got.res.arrayBuffer()).equals(png)).toBe(true);

    const detail = await call(getCheck, { as: 'reviewer', params: { id: checkId } });
    expect(detail.json.benchCheck.photos).toEqual([expect.objectContaining({ fileName: 'v1-socket.png', url: `/api/bench-checks/${checkId}/photos/${up.json.photo.id}` })]);

    const bad = new FormData();
    bad.set('file', new File(['not an image'], 'notes.txt', { type: 'text/plain' }));
    const refused = await call(postPhoto, { as: 'technician', method: 'POST', params: { id: checkId }, form: bad });
    expect(refused.status).toBe(415);
    expect(refused.json.error.fieldErrors.file).toBeTruthy();
  });
});
