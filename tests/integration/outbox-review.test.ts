// SMTP down: the decision is still recorded and its mail waits in the outbox; SMTP back: the mail arrives with the PDF.
import { afterAll, describe, expect, it } from 'vitest';
import { GET as outbox } from '@/app/api/admin/outbox/route';
import { POST as decide } from '@/app/api/revisions/[id]/decision/route';
import { POST as submit } from '@/app/api/projects/[id]/revisions/route';
import { analyzeStage } from '@/lib/calc';
import { getEngineTube } from '@/lib/tubes/service';
import { deliverDueMail } from '@/lib/mail/outbox';
import { stageBodySchema, stageInputSchema } from '@/lib/validation/stage';
import { Decision, MailOutbox, Project, ProjectWatcher, Revision, Stage, TubeType, User } from '@/models';
import { call, sinkMessages, waitFor } from '../support/api';

const SINK = process.env.MAIL_SINK_URL!;
const smtp = (what: 'stop' | 'start') => fetch(`${SINK}/smtp/${what}`, { method: 'POST' });

afterAll(async () => {
  await smtp('start');
});

describe('decision mail through the outbox', () => {
  it('keeps the decision when SMTP is down, retries, and delivers the summary with the PDF once SMTP is back', async () => {
    const name = `Outbox test ${Date.now()}`;
    const tube = await TubeType.findOne({ where: { designation: '12AX7' } });
    const designer = await User.findOne({ where: { email: 'designer@anodyne.test' } });
    const technician = await User.findOne({ where: { email: 'technician@anodyne.test' } });
    const project = await Project.create({ name, ownerId: designer!.id });
    await ProjectWatcher.create({ projectId: project.id, userId: technician!.id });
    const body = stageBodySchema.parse({ topology: 'common-cathode', tubeId: tube!.id, supply: 300, plateResistor: 100e3, gridResistor: 1e6, bias: { kind: 'cathode', cathodeResistor: 1500, cathodeBypass: 22e-6 } });
    const { tubeId: _t, ...rest } = body;
    const analysis = analyzeStage(stageInputSchema.parse({ ...rest, tube: await getEngineTube(tube!.id) }));
    await Stage.create({ projectId: project.id, position: 1, name: 'V1', topology: 'common-cathode', tubeTypeId: tube!.id, tubeModelId: null, supplyNode: null, inputs: body as never, analysis: analysis as never, analysisError: null });

    const sub = await call(submit, { as: 'designer', method: 'POST', params: { id: String(project.id) } });
    expect(sub.status).toBe(201);
    const revisionId = sub.json.revision.id;

    expect((await smtp('stop')).ok).toBe(true);
    let mailId: number;
    try {
      const { status } = await call(decide, { as: 'reviewer', method: 'POST', params: { id: String(revisionId) }, body: { decision: 'approve', comment: 'Ready to build.' } });
      expect(status).toBe(201);
      // The decision is recorded whatever happens to the mail.
      expect((await Revision.findByPk(revisionId))!.state).toBe('approved');
      expect(await Decision.count({ where: { revisionId } })).toBe(1);

      const subject = `Approved: ${name}, revision 1`;
      const row = await MailOutbox.findOne({ where: { subject } });
      expect(row).not.toBeNull();
      mailId = row!.id;
      expect([...row!.to].sort()).toEqual(['designer@anodyne.test', 'technician@anodyne.test']);
      await deliverDueMail({ ids: [mailId], ignoreSchedule: true });
      const failed = await MailOutbox.findByPk(mailId);
      expect(failed!.status).toBe('failed');
      expect(failed!.attempts).toBeGreaterThanOrEqual(1);
      expect(failed!.lastError).toBeTruthy();
      // Retried later, with back-off.
      expect(failed!.nextAttemptAt.getTime()).toBeGreaterThan(Date.now());

      const listed = await call(outbox, { as: 'admin' });
      const entry = listed.json.mails.find((m: { id: number }) => m.id === mailId);
      expect(entry).toMatchObject({ status: 'failed', subject, to: expect.arrayContaining(['designer@anodyne.test']) });
      expect(entry.attachments[0]).toMatch(/\.pdf$/);
    } finally {
      await smtp('start');
    }

    await deliverDueMail({ ids: [mailId], ignoreSchedule: true });
    const sent = await MailOutbox.findByPk(mailId);
    expect(sent!.status).toBe('sent');
    expect(sent!.attempts).toBeGreaterThanOrEqual(2);

    const msg = await waitFor(async () => (await sinkMessages()).find((m) => m.subject === `Approved: ${name}, revision 1`));
    expect(msg.to).toEqual(expect.arrayContaining(['designer@anodyne.test', 'technician@anodyne.test']));
    expect(msg.html).toContain('Ready to build.');
    expect(msg.text).toContain('Henrik Vale approved revision 1');
    const pdf = msg.attachments.find((a) => a.filename.endsWith('.pdf'));
    expect(pdf?.contentType).toBe('application/pdf');
    expect(Buffer.from(pdf!.contentBase64!, 'base64').subarray(0, 5).toString()).toBe('%PDF-');

    const listed = await call(outbox, { as: 'admin' });
    expect(listed.json.mails.find((m: { id: number }) => m.id === mailId).status).toBe('sent');
  });
});
