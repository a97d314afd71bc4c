// Sign-in limits (policy in README.md, "Sign-in limits"): the client address is the TCP peer unless the peer is a
// trusted proxy; one guesser is stopped without locking the account's owner out; a lock ends when its time is up;
// unknown and existing accounts take the same time to refuse.
import { afterAll, beforeEach, describe, expect, it } from 'vitest';
import { clientAddress, parseTrustedProxies } from '@/lib/auth/client-address';
import { ADDRESS_MAX_FAILURES } from '@/lib/auth/throttle';
import { sequelize } from '@/lib/db';
import { SignInAttempt } from '@/models';
import { DEMO, DEMO_PASSWORD } from '../support/api';
import { signInWithPassword } from '../support/sign-in';

beforeEach(async () => {
  await SignInAttempt.destroy({ where: {} });
});
afterAll(async () => {
  await SignInAttempt.destroy({ where: {} });
});

describe('client address', () => {
  it('ignores X-Forwarded-For from an untrusted peer and reads it from the right behind trusted proxies', () => {
    const none = parseTrustedProxies('');
    expect(clientAddress({ 'x-anodyne-peer': '203.0.113.10', 'x-forwarded-for': '198.51.100.1' }, none)).toBe('203.0.113.10');
    const lb = parseTrustedProxies('10.0.0.0/8, 127.0.0.1');
    expect(clientAddress({ 'x-anodyne-peer': '10.1.2.3', 'x-forwarded-for': '198.51.100.1' }, lb)).toBe('198.51.100.1');
    // a client prepending a forged hop does not change what the proxy appended
    expect(clientAddress({ 'x-anodyne-peer': '10.1.2.3', 'x-forwarded-for': '192.0.2.99, 198.51.100.1' }, lb)).toBe('198.51.100.1');
    expect(clientAddress({ 'x-anodyne-peer': '::ffff:127.0.0.1', 'x-forwarded-for': '198.51.100.1, 10.9.9.9' }, lb)).toBe('198.51.100.1');
    expect(clientAddress({ 'x-anodyne-peer': '198.51.100.5', 'x-forwarded-for': '192.0.2.99' }, lb)).toBe('198.51.100.5');
  });
});

describe('sign-in limits', () => {
  it('rotating X-Forwarded-For does not escape the per-address limit, and naming someone else\'s address does not lock them', async () => {
    const attacker = '203.0.113.66';
    const victim = '198.51.100.200';
    for (let i = 0; i < ADDRESS_MAX_FAILURES; i++) {
      await signInWithPassword(`spray${i}@anodyne.test`, 'guess', attacker, { 'x-forwarded-for': i % 2 ? `192.0.2.${i}` : victim });
    }
    const blocked = await signInWithPassword(DEMO.designer, DEMO_PASSWORD, attacker, { 'x-forwarded-for': '192.0.2.250' });
    expect(blocked.ok).toBe(false);
    expect(blocked.error).toMatch(/Too many failed sign-ins/);
    const owner = await signInWithPassword(DEMO.designer, DEMO_PASSWORD, victim);
    expect(owner.ok).toBe(true);
  });

  it('a guesser is locked out of one account; its owner from elsewhere is not', async () => {
    for (let i = 0; i < 5; i++) await signInWithPassword(DEMO.reviewer, `wrong-${i}`, '203.0.113.77');
    const guesser = await signInWithPassword(DEMO.reviewer, DEMO_PASSWORD, '203.0.113.77');
    expect(guesser.ok).toBe(false);
    expect(guesser.error).toMatch(/locked for \d+ minute/);
    const owner = await signInWithPassword(DEMO.reviewer, DEMO_PASSWORD, '198.51.100.31');
    expect(owner.ok).toBe(true);
  });

  it('a lock ends when its time is up: one wrong guess afterwards does not lock again', async () => {
    for (let i = 0; i < 5; i++) await signInWithPassword(DEMO.technician, `wrong-${i}`, '203.0.113.88');
    expect((await signInWithPassword(DEMO.technician, DEMO_PASSWORD, '203.0.113.88')).ok).toBe(false);
    // the lock runs out (move the clock of the stored rows back past the lock and the window)
    await sequelize.query(`UPDATE sign_in_attempts SET locked_until = locked_until - interval '2 hours', first_failure_at = first_failure_at - interval '2 hours'`);
    const wrong = await signInWithPassword(DEMO.technician, 'wrong-again', '203.0.113.88');
    expect(wrong.error).toMatch(/do not match/);
    const right = await signInWithPassword(DEMO.technician, DEMO_PASSWORD, '203.0.113.88');
    expect(right.ok).toBe(true);
  });

  it('unknown and existing accounts take about the same time to refuse', async () => {
    const time = async (email: string, i: number) => {
      await SignInAttempt.destroy({ where: {} });
      const t = performance.now();
      const r = await signInWithPassword(email, 'definitely-wrong', `198.51.100.${100 + i}`);
      expect(r.ok).toBe(false);
      return performance.now() - t;
    };
    const known: number[] = [];
    const unknown: number[] = [];
    for (let i = 0; i < 8; i++) {
      known.push(await time(DEMO.admin, i));
      unknown.push(await time(`no-such-${i}@anodyne.test`, i));
    }
    const median = (xs: number[]) => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)]!;
    // both run one bcrypt comparison at the same cost; without it an unknown account answers several times faster
    expect(median(unknown) / median(known)).toBeGreaterThan(0.6);
  });
});
