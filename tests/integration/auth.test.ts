import { afterAll, beforeEach, describe, expect, it } from 'vitest';
import { GET as me } from '@/app/api/me/route';
import { PATCH as patchUser } from '@/app/api/admin/users/[id]/route';
import { ADDRESS_MAX_FAILURES } from '@/lib/auth/throttle';
import { sequelize } from '@/lib/db';
import { SignInAttempt, User } from '@/models';
import { call, DEMO, DEMO_PASSWORD } from '../support/api';
import { signInWithPassword } from '../support/sign-in';

describe('sign-in', () => {
  beforeEach(async () => {
    await SignInAttempt.destroy({ where: {} });
  });
  afterAll(async () => {
    await SignInAttempt.destroy({ where: {} });
  });

  it('signs a demo user in with the right password and the session works on a guarded route', async () => {
    const r = await signInWithPassword(DEMO.designer, DEMO_PASSWORD);
    expect(r.error).toBeNull();
    expect(r.ok).toBe(true);
    const res = await call(me, { headers: { cookie: r.sessionCookie! } });
    expect(res.status).toBe(200);
    expect(res.json.user).toMatchObject({ email: DEMO.designer, role: 'designer' });
  });

  it('refuses a wrong password with a clear message and no session', async () => {
    const r = await signInWithPassword(DEMO.reviewer, 'not-the-password');
    expect(r.ok).toBe(false);
    expect(r.sessionCookie).toBeNull();
    expect(r.error).toMatch(/do not match/);
  });

  it('slows an account after repeated failures from many addresses, but never locks its owner out', async () => {
    const started = Date.now();
    for (let i = 0; i < 5; i++) {
      const r = await signInWithPassword(DEMO.technician, `wrong-${i}`, `198.51.100.${i}`);
      expect(r.ok).toBe(false);
    }
    // failures 4 and 5 were delayed (250 ms and 500 ms)
    expect(Date.now() - started).toBeGreaterThanOrEqual(750);
    const owner = await signInWithPassword(DEMO.technician, DEMO_PASSWORD, '198.51.100.99');
    expect(owner.ok).toBe(true);
  });

  it('locks a client address that tries many accounts', async () => {
    for (let i = 0; i < ADDRESS_MAX_FAILURES; i++) await signInWithPassword(`nobody${i}@anodyne.test`, 'x', '192.0.2.50');
    const r = await signInWithPassword(DEMO.admin, DEMO_PASSWORD, '192.0.2.50');
    expect(r.error).toMatch(/Too many failed sign-ins/);
    const other = await signInWithPassword(DEMO.admin, DEMO_PASSWORD, '192.0.2.51');
    expect(other.ok).toBe(true);
  });
});

describe('deactivation', () => {
  it('refuses sign-in and ends an open session at its next request; reactivation restores it', async () => {
    const email = `deact-${Date.now()}@anodyne.test`;
    const bcrypt = (await import('bcryptjs')).default;
    const u = await User.create({ email, displayName: 'Temp Bench Hand', role: 'technician', passwordHash: await bcrypt.hash('temporary-pass-1', 4) });
    const session = await signInWithPassword(email, 'temporary-pass-1');
    expect(session.ok).toBe(true);
    expect((await call(me, { headers: { cookie: session.sessionCookie! } })).status).toBe(200);

    const off = await call(patchUser, { as: 'admin', method: 'PATCH', params: { id: String(u.id) }, body: { active: false } });
    expect(off.status).toBe(200);
    expect((await call(me, { headers: { cookie: session.sessionCookie! } })).status).toBe(401);
    const again = await signInWithPassword(email, 'temporary-pass-1');
    expect(again.ok).toBe(false);
    expect(again.error).toMatch(/deactivated/);

    const on = await call(patchUser, { as: 'admin', method: 'PATCH', params: { id: String(u.id) }, body: { active: true } });
    expect(on.status).toBe(200);
    expect((await call(me, { headers: { cookie: session.sessionCookie! } })).status).toBe(200);
    const [rows] = await sequelize.query(`SELECT action FROM audit_events WHERE target_type = 'user' AND target_id = '${u.id}' ORDER BY id`);
    expect((rows as { action: string }[]).map((r) => r.action)).toEqual(expect.arrayContaining(['user.deactivate', 'user.reactivate']));
  });

  it('keeps at least one admin and refuses self-deactivation', async () => {
    const admin = await User.findOne({ where: { email: DEMO.admin } });
    const res = await call(patchUser, { as: 'admin', method: 'PATCH', params: { id: String(admin!.id) }, body: { active: false } });
    expect(res.status).toBe(409);
    expect(res.json.error.message).toMatch(/cannot deactivate yourself/);
  });

  it('answers a bad body with 422 and field messages', async () => {
    const res = await call(patchUser, { as: 'admin', method: 'PATCH', params: { id: '1' }, body: { role: 'wizard' } });
    expect(res.status).toBe(422);
    expect(res.json.error.fieldErrors.role[0]).toBeTruthy();
    const notJson = await call(patchUser, { as: 'admin', method: 'PATCH', params: { id: '1' }, body: '{not json' });
    expect(notJson.status).toBe(400);
    const badId = await call(patchUser, { as: 'admin', method: 'PATCH', params: { id: 'abc' }, body: { role: 'designer' } });
    expect(badId.status).toBe(404);
  });
});
