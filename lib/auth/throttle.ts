import 'server-only';
import { Op } from 'sequelize';
import { sequelize } from '@/lib/db';
import { env } from '@/lib/env';
import { SignInAttempt } from '@/models';

// Failed sign-ins are counted per account and per client address in PostgreSQL, so the limit holds
// across app servers. After SLOW_AFTER failures each attempt is slowed; after the maximum the key is
// locked for SIGN_IN_LOCK_MINUTES.
const SLOW_AFTER = 2;
const WINDOW_MS = 30 * 60_000;

export class SignInLockedError extends Error {
  constructor(readonly minutes: number) {
    super(`Too many failed sign-ins. Sign-in is locked for ${minutes} minute${minutes === 1 ? '' : 's'}; try again later or ask an admin.`);
  }
}

export function throttleKeys(email: string, ip: string | null) {
  return [`email:${email.toLowerCase()}`, ...(ip ? [`ip:${ip}`] : [])];
}

export async function assertNotLocked(keys: string[], now = new Date()) {
  const rows = await SignInAttempt.findAll({ where: { key: { [Op.in]: keys }, lockedUntil: { [Op.gt]: now } } });
  if (rows.length) {
    const until = Math.max(...rows.map((r) => r.lockedUntil!.getTime()));
    throw new SignInLockedError(Math.max(1, Math.ceil((until - now.getTime()) / 60_000)));
  }
  const prior = await SignInAttempt.findAll({ where: { key: { [Op.in]: keys } } });
  const failures = Math.max(0, ...prior.filter((r) => now.getTime() - r.firstFailureAt.getTime() < WINDOW_MS).map((r) => r.failures));
  if (failures > SLOW_AFTER) {
    await new Promise((r) => setTimeout(r, Math.min(4000, 400 * (failures - SLOW_AFTER))));
  }
}

export async function recordFailure(keys: string[], now = new Date()) {
  const lockUntil = new Date(now.getTime() + env.SIGN_IN_LOCK_MINUTES * 60_000);
  for (const key of keys) {
    // One statement per key: a concurrent failure cannot be lost between read and write.
    await sequelize.query(
      `INSERT INTO sign_in_attempts (key, failures, first_failure_at, locked_until) VALUES (:key, 1, :now::timestamptz, NULL)
       ON CONFLICT (key) DO UPDATE SET
         failures = CASE WHEN sign_in_attempts.first_failure_at < :windowStart::timestamptz OR sign_in_attempts.locked_until < :now::timestamptz
                         THEN 1 ELSE sign_in_attempts.failures + 1 END,
         first_failure_at = CASE WHEN sign_in_attempts.first_failure_at < :windowStart::timestamptz OR sign_in_attempts.locked_until < :now::timestamptz
                         THEN :now::timestamptz ELSE sign_in_attempts.first_failure_at END,
         locked_until = CASE WHEN sign_in_attempts.failures + 1 >= :max AND NOT (sign_in_attempts.first_failure_at < :windowStart::timestamptz)
                         THEN :lockUntil::timestamptz ELSE NULL END`,
      { replacements: { key, now, windowStart: new Date(now.getTime() - WINDOW_MS), max: env.SIGN_IN_MAX_FAILURES, lockUntil } },
    );
  }
}

export async function clearFailures(keys: string[]) {
  await SignInAttempt.destroy({ where: { key: { [Op.in]: keys.filter((k) => k.startsWith('email:')) } } });
}
