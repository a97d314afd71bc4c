// Submitting, reviewing and deciding revisions through the route handlers, and their immutability in the API and in SQL.
import { PDFParse } from 'pdf-parse';
import { QueryTypes } from 'sequelize';
import { beforeAll, describe, expect, it } from 'vitest';
import { POST as decide } from '@/app/api/revisions/[id]/decision/route';
import { GET as report } from '@/app/api/revisions/[id]/report/route';
import { DELETE as withdraw, GET as getRevision } from '@/app/api/revisions/[id]/route';
import { GET as listAll } from '@/app/api/revisions/route';
import { GET as listForProject, POST as submit } from '@/app/api/projects/[id]/revisions/route';
import { PATCH as patchStage } from '@/app/api/stages/[id]/route';
import { analyzeStage } from '@/lib/calc';
import { sequelize } from '@/lib/db';
import { getEngineTube } from '@/lib/tubes/service';
import { revisionHash } from '@/lib/review/content';
import { stageBodySchema, stageInputSchema } from '@/lib/validation/stage';
import { AuditEvent, Decision, MailOutbox, Project, Revision, Stage, TubeType, User } from '@/models';
import { call } from '../support/api';

let projectId: number;
let stageId: number;

async function makeProject(name: string) {
  const tube = await TubeType.findOne({ where: { designation: '12AX7' } });
  const designer = await User.findOne({ where: { email: 'designer@anodyne.test' } });
  const project = await Project.create({ name, ownerId: designer!.id });
  const body = stageBodySchema.parse({ topology: 'common-cathode', tubeId: tube!.id, supply: 330, plateResistor: 100e3, gridResistor: 1e6, bias: { kind: 'cathode', cathodeResistor: 1500, cathodeBypass: 22e-6 } });
  const { tubeId: _t, ...rest } = body;
  const analysis = analyzeStage(stageInputSchema.parse({ ...rest, tube: await getEngineTube(tube!.id) }));
  const stage = await Stage.create({ projectId: project.id, position: 1, name: 'V1 input', topology: 'common-cathode', tubeTypeId: tube!.id, tubeModelId: null, supplyNode: null, inputs: body as never, analysis: analysis as never, analysisError: null });
  return { project, stage };
}

beforeAll(async () => {
  const { project, stage } = await makeProject(`Review test ${Date.now()}`);
  projectId = project.id;
  stageId = stage.id;
});

const sql = (text: string, replacements: Record<string, unknown>) => sequelize.query(text, { replacements, type: QueryTypes.RAW });

describe('revisions: submit, review, decide', () => {
  let first: number;

  it('freezes the project with a content hash, marks it in review and tells the reviewers', async () => {
    const { status, json } = await call(submit, { as: 'designer', method: 'POST', params: { id: String(projectId) }, body: { note: 'First pass at the input stage.' } });
    expect(status, JSON.stringify(json)).toBe(201);
    const rev = json.revision;
    first = rev.id;
    expect(rev).toMatchObject({ number: 1, state: 'submitted', hashVerified: true, base: null });
    expect(rev.contentHash).toMatch(/^[0-9a-f]{64}$/);
    expect(rev.contentHash).toBe(revisionHash(rev.snapshot));
    expect(rev.snapshot.stages[0].inputs.plateResistor).toBe(100e3);
    expect(rev.snapshot.stages[0].analysis.operatingPoint.plateCurrent).toBeGreaterThan(0);
    expect((await Project.findByPk(projectId))!.status).toBe('in-review');
    const audit = await AuditEvent.findOne({ where: { action: 'revision.submit', targetId: String(rev.id) } });
    expect(audit?.projectId).toBe(projectId);
    const mail = await MailOutbox.findOne({ where: { subject: `Review requested: ${rev.projectName}, revision 1` } });
    expect(mail?.to).toEqual(['reviewer@anodyne.test']);
    expect(mail?.html).toContain('First pass at the input stage.');
  });

  it('refuses a second submission while one is waiting', async () => {
    const { status, json } = await call(submit, { as: 'designer', method: 'POST', params: { id: String(projectId) } });
    expect(status).toBe(409);
    expect(json.error.message).toMatch(/Revision 1 of this project is still waiting/);
  });

  it('lists the open revision for reviewers and tells the designer they cannot decide', async () => {
    const open = await call(listAll, { as: 'reviewer', path: '/api/revisions?state=submitted' });
    expect(open.json.revisions.some((r: { id: number }) => r.id === first)).toBe(true);
    const asReviewer = await call(getRevision, { as: 'reviewer', params: { id: String(first) } });
    expect(asReviewer.json.canDecide).toBe(true);
    const asDesigner = await call(getRevision, { as: 'designer', params: { id: String(first) } });
    expect(asDesigner.json.canDecide).toBe(false);
    expect(asDesigner.json.cannotDecideReason).toMatch(/Only reviewers/);
  });

  it('asks for a comment when requesting changes, and refuses an unknown decision', async () => {
    const noComment = await call(decide, { as: 'reviewer', method: 'POST', params: { id: String(first) }, body: { decision: 'request-changes' } });
    expect(noComment.status).toBe(422);
    expect(noComment.json.error.fieldErrors.comment).toEqual(['Say what should change.']);
    const unknown = await call(decide, { as: 'reviewer', method: 'POST', params: { id: String(first) }, body: { decision: 'maybe' } });
    expect(unknown.status).toBe(422);
    expect(unknown.json.error.fieldErrors.decision).toBeTruthy();
  });

  it('approves: the decision, the revision state and the project status change together, with an audit row and a mail', async () => {
    const { status, json } = await call(decide, { as: 'reviewer', method: 'POST', params: { id: String(first) }, body: { decision: 'approve', comment: 'Bias point is sensible.' } });
    expect(status, JSON.stringify(json)).toBe(201);
    expect(json.revision.state).toBe('approved');
    expect(json.revision.decision).toMatchObject({ decision: 'approve', comment: 'Bias point is sensible.', reviewer: { displayName: 'Henrik Vale' } });
    expect((await Project.findByPk(projectId))!.status).toBe('approved');
    expect(await Decision.count({ where: { revisionId: first } })).toBe(1);
    expect(await AuditEvent.count({ where: { action: 'revision.approve', targetId: String(first), projectId } })).toBe(1);
    const mail = await MailOutbox.findOne({ where: { subject: `Approved: ${json.revision.projectName}, revision 1` } });
    expect(mail?.to).toEqual(['designer@anodyne.test']);
    expect(mail?.attachments[0]?.filename).toMatch(/revision-1\.pdf$/);
    expect(Buffer.from(mail!.attachments[0]!.contentBase64, 'base64').subarray(0, 5).toString()).toBe('%PDF-');
  });

  it('keeps an approved revision through the API: no second decision, no withdrawal', async () => {
    const again = await call(decide, { as: 'admin', method: 'POST', params: { id: String(first) }, body: { decision: 'request-changes', comment: 'Second thoughts' } });
    expect(again.status).toBe(409);
    const del = await call(withdraw, { as: 'designer', method: 'DELETE', params: { id: String(first) } });
    expect(del.status).toBe(409);
    expect(del.json.error.message).toMatch(/approved revisions cannot be changed or deleted/);
    expect(await Revision.findByPk(first)).not.toBeNull();
    const pdf = await call(report, { as: 'designer', params: { id: String(first) } });
    expect(pdf.res.headers.get('content-type')).toBe('application/pdf');
    // The report is rendered from the frozen snapshot and carries the revision's number and hash.
    const text = (await new PDFParse({ data: new Uint8Array(await pdf.res.arrayBuffer()) }).getText()).text;
    const rev = await Revision.findByPk(first);
    expect(text).toContain('V1 input');
    expect(text.replace(/\s+/g, '')).toContain(rev!.contentHash.slice(0, 16));
    // One renderer serves the design report and the revision summary: who submitted it and the decision are on it.
    expect(text).toContain('Revision 1 (approved)');
    expect(text).toMatch(/Submitted by .+ on \d{4}-\d\d-\d\d \d\d:\d\d UTC/);
    expect(text).toMatch(/Approved by .+ on \d{4}-\d\d-\d\d \d\d:\d\d UTC/);
  });

  it('keeps an approved revision in SQL too: the database refuses updates and deletes', async () => {
    await expect(sql(`UPDATE revisions SET snapshot = '{}'::jsonb WHERE id = :id`, { id: first })).rejects.toThrow(/approved revision \d+ is immutable/);
    await expect(sql(`UPDATE revisions SET state = 'submitted' WHERE id = :id`, { id: first })).rejects.toThrow(/immutable/);
    await expect(sql(`DELETE FROM revisions WHERE id = :id`, { id: first })).rejects.toThrow(/immutable/);
    await expect(sql(`UPDATE decisions SET comment = 'edited' WHERE revision_id = :id`, { id: first })).rejects.toThrow(/decisions are permanent/);
    await expect(sql(`DELETE FROM decisions WHERE revision_id = :id`, { id: first })).rejects.toThrow(/decisions are permanent/);
    const [row] = await sequelize.query<{ content_hash: string; state: string }>('SELECT content_hash, state FROM revisions WHERE id = :id', { type: QueryTypes.SELECT, replacements: { id: first } });
    expect(row).toMatchObject({ state: 'approved' });
  });

  it('a later edit starts a new draft; the next revision shows what changed since the approved one', async () => {
    const stage = await Stage.findByPk(stageId);
    const edit = await call(patchStage, { as: 'designer', method: 'PATCH', params: { id: String(stageId) }, body: { version: stage!.version, inputs: { bias: { kind: 'cathode', cathodeResistor: 2200, cathodeBypass: 22e-6 } } } });
    expect(edit.status, JSON.stringify(edit.json)).toBe(200);
    expect((await Project.findByPk(projectId))!.status).toBe('draft');

    const { status, json } = await call(submit, { as: 'designer', method: 'POST', params: { id: String(projectId) } });
    expect(status).toBe(201);
    const rev = json.revision;
    expect(rev.number).toBe(2);
    expect(rev.base).toMatchObject({ id: first, number: 1 });
    const s = rev.diff.stages.find((d: { stageId: number }) => d.stageId === stageId);
    expect(s.change).toBe('changed');
    expect(s.inputs).toEqual([expect.objectContaining({ path: 'inputs.bias.cathodeResistor', before: 1500, after: 2200 })]);
    // A larger cathode resistor biases the tube colder: less plate current (common practice).
    const ia = s.results.find((r: { path: string }) => r.path === 'analysis.operatingPoint.plateCurrent');
    expect(ia.after).toBeLessThan(ia.before);

    // The reviewer sends it back; the designer withdraws nothing (decided revisions stay).
    const back = await call(decide, { as: 'reviewer', method: 'POST', params: { id: String(rev.id) }, body: { decision: 'request-changes', comment: 'Gain is now too low for the input stage.' } });
    expect(back.status).toBe(201);
    expect((await Project.findByPk(projectId))!.status).toBe('changes-requested');
    const list = await call(listForProject, { as: 'designer', params: { id: String(projectId) } });
    expect(list.json.revisions.map((r: { number: number; state: string }) => [r.number, r.state])).toEqual([
      [2, 'changes-requested'],
      [1, 'approved'],
    ]);
  });

  it('lets the submitter withdraw an undecided revision, which reopens the draft', async () => {
    const { json } = await call(submit, { as: 'designer', method: 'POST', params: { id: String(projectId) } });
    const id = String(json.revision.id);
    // The submitted revision's content is frozen in SQL as well.
    await expect(sql(`UPDATE revisions SET content_hash = 'x' WHERE id = :id`, { id })).rejects.toThrow(/content is frozen/);
    const del = await call(withdraw, { as: 'designer', method: 'DELETE', params: { id } });
    expect(del.status).toBe(204);
    expect(await Revision.findByPk(id)).toBeNull();
    expect((await Project.findByPk(projectId))!.status).toBe('draft');
  });

  it('refuses to submit a design identical to the last approved revision', async () => {
    const { project } = await makeProject(`Unchanged ${Date.now()}`);
    const one = await call(submit, { as: 'designer', method: 'POST', params: { id: String(project.id) } });
    await call(decide, { as: 'reviewer', method: 'POST', params: { id: String(one.json.revision.id) }, body: { decision: 'approve' } });
    const two = await call(submit, { as: 'designer', method: 'POST', params: { id: String(project.id) } });
    expect(two.status).toBe(409);
    expect(two.json.error.message).toBe('Nothing has changed since revision 1 was approved.');
  });

  it('does not let anyone decide on a revision they submitted', async () => {
    const { project } = await makeProject(`Own submission ${Date.now()}`);
    const mine = await call(submit, { as: 'admin', method: 'POST', params: { id: String(project.id) } });
    expect(mine.status).toBe(201);
    const own = await call(decide, { as: 'admin', method: 'POST', params: { id: String(mine.json.revision.id) }, body: { decision: 'approve' } });
    expect(own.status).toBe(403);
    expect(own.json.error.message).toMatch(/You submitted this revision/);
    const view = await call(getRevision, { as: 'admin', params: { id: String(mine.json.revision.id) } });
    expect(view.json.canDecide).toBe(false);
  });
});
