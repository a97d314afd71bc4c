import { describe, expect, it } from 'vitest';
import { POST as invite } from '@/app/api/admin/invitations/route';
import { GET as invitationState } from '@/app/api/invitations/[token]/route';
import { POST as accept } from '@/app/api/invitations/accept/route';
import { deliverDueMail } from '@/lib/mail/outbox';
import { MailOutbox } from '@/models';
import { call, DEMO, sinkMessages, waitFor } from '../support/api';
import { signInWithPassword } from '../support/sign-in';

describe('invitations', () => {
  it('invite → mail in the SMTP sink → link sets a password → sign-in works → link refused the second time', async () => {
    const email = `new.bench.${Date.now()}@anodyne.test`;
    const res = await call(invite, { as: 'admin', method: 'POST', body: { email: email.toUpperCase(), displayName: 'Ada Winding', role: 'technician' } });
    expect(res.status).toBe(201);
    expect(res.json.invitation.email).toBe(email);
    const expires = new Date(res.json.invitation.expiresAt).getTime();
    expect(expires - Date.now()).toBeGreaterThan(47.9 * 3600_000);
    expect(expires - Date.now()).toBeLessThanOrEqual(48 * 3600_000);

    await deliverDueMail({ ignoreSchedule: true });
    const mail = await waitFor(async () => (await sinkMessages()).find((m) => m.to.includes(email)));
    expect(mail.subject).toMatch(/invited to Anodyne/);
    const token = mail.text.match(/\/invitations\/([A-Za-z0-9_-]+)/)?.[1];
    expect(token).toBeTruthy();
    const row = await waitFor(async () => {
      const r = await MailOutbox.findOne({ where: { subject: mail.subject }, order: [['id', 'DESC']] });
      return r?.status === 'sent' ? r : null;
    });
    expect(row.to).toEqual([email]);
    // the immediate delivery and the forced drain above raced for the same row: it must still go out once
    await deliverDueMail({ ignoreSchedule: true });
    expect((await sinkMessages()).filter((m) => m.to.includes(email))).toHaveLength(1);

    const state = await call(invitationState as never, { params: { token: token! } });
    expect(state.json).toMatchObject({ state: 'valid', email, role: 'technician' });

    const short = await call(accept, { method: 'POST', body: { token, password: 'short', confirm: 'short' } });
    expect(short.status).toBe(422);
    expect(short.json.error.fieldErrors.password).toBeTruthy();

    const ok = await call(accept, { method: 'POST', body: { token, password: 'plate-load-100k', confirm: 'plate-load-100k' } });
    expect(ok.status).toBe(200);
    const signedIn = await signInWithPassword(email, 'plate-load-100k', '203.0.113.200');
    expect(signedIn.ok).toBe(true);

    const twice = await call(accept, { method: 'POST', body: { token, password: 'another-pass-99', confirm: 'another-pass-99' } });
    expect(twice.status).toBe(409);
    expect(twice.json.error.message).toMatch(/already been used/);
    const stillOld = await signInWithPassword(email, 'another-pass-99', '203.0.113.201');
    expect(stillOld.ok).toBe(false);
  });

  it('answers 409 for an address that already has an account', async () => {
    const res = await call(invite, { as: 'admin', method: 'POST', body: { email: DEMO.designer, displayName: 'Again', role: 'designer' } });
    expect(res.status).toBe(409);
    expect(res.json.error.fieldErrors.email[0]).toMatch(/already has an account/);
  });

  it('refuses an unknown token', async () => {
    const res = await call(accept, { method: 'POST', body: { token: 'x'.repeat(43), password: 'plate-load-100k', confirm: 'plate-load-100k' } });
    expect(res.status).toBe(404);
  });
});
