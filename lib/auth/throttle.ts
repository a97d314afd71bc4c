import 'server-only';
import { Op } from 'sequelize';
import { sequelize } from '@/lib/db';
import { env } from '@/lib/env';
import { SignInAttempt } from '@/models';

// Failed sign-ins, counted in PostgreSQL so the limits hold across app servers (policy in README.md,
// "Sign-in limits"):
// - per account + client address: SIGN_IN_MAX_FAILURES failures in the window lock that pair for
//   SIGN_IN_LOCK_MINUTES – one guesser is stopped, the account's owner elsewhere is not;
// - per client address: ADDRESS_MAX_FAILURES failures over any accounts lock the address for SIGN_IN_LOCK_MINUTES;
// - per account: never locked (anyone could lock anyone out), only slowed: after SLOW_AFTER failures each attempt
//   waits, doubling, up to MAX_DELAY_MS.
// A lock ends when its time is up and the count starts afresh; a success clears the account's counters.
const SLOW_AFTER = 2;
const MAX_DELAY_MS = 3000;
const WINDOW_MS = 30 * 60_000;
export const ADDRESS_MAX_FAILURES = 30;

export class SignInLockedError extends Error {
  constructor(readonly minutes: number) {
    super(`Too many failed sign-ins from this address. Sign-in is locked for ${minutes} minute${minutes === 1 ? '' : 's'}; try again later or ask an admin.`);
  }
}

export type ThrottleKey = { key: string; max: number | null };

export function throttleKeys(email: string, ip: string | null): ThrottleKey[] {
  const account = email.toLowerCase();
  return [
    { key: `email:${account}`, max: null },
    ...(ip
      ? [
          { key: `pair:${ip}|${account}`, max: env.SIGN_IN_MAX_FAILURES },
          { key: `ip:${ip}`, max: ADDRESS_MAX_FAILURES },
        ]
      : []),
  ];
}

/** The wait before checking a password on an account with this many recent failures. */
export function accountDelayMs(failures: number): number {
  if (failures <= SLOW_AFTER) return 0;
  return Math.min(MAX_DELAY_MS, 250 * 2 ** (failures - SLOW_AFTER - 1));
}

export async function assertNotLocked(keys: ThrottleKey[], now = new Date()) {
  const rows = await SignInAttempt.findAll({ where: { key: { [Op.in]: keys.map((k) => k.key) } } });
  const locked = rows.filter((r) => !r.key.startsWith('email:') && r.lockedUntil && r.lockedUntil > now);
  if (locked.length) {
    const until = Math.max(...locked.map((r) => r.lockedUntil!.getTime()));
    throw new SignInLockedError(Math.max(1, Math.ceil((until - now.getTime()) / 60_000)));
  }
  const account = rows.find((r) => r.key.startsWith('email:') && now.getTime() - r.firstFailureAt.getTime() < WINDOW_MS);
  const delay = accountDelayMs(account?.failures ?? 0);
  if (delay) await new Promise((r) => setTimeout(r, delay));
}

export async function recordFailure(keys: ThrottleKey[], now = new Date()) {
  const lockUntil = new Date(now.getTime() + env.SIGN_IN_LOCK_MINUTES * 60_000);
  for (const { key, max } of keys) {
    // One statement per key: a concurrent failure cannot be lost between read and write. A count whose window
    // has passed, or whose lock has run out, starts again at 1.
    await sequelize.query(
      `INSERT INTO sign_in_attempts AS s (key, failures, first_failure_at, locked_until)
       VALUES (:key, 1, :now::timestamptz, CASE WHEN :max::int IS NOT NULL AND 1 >= :max::int THEN :lockUntil::timestamptz END)
       ON CONFLICT (key) DO UPDATE SET
         failures = CASE WHEN s.first_failure_at < :windowStart::timestamptz OR s.locked_until <= :now::timestamptz THEN 1 ELSE s.failures + 1 END,
         first_failure_at = CASE WHEN s.first_failure_at < :windowStart::timestamptz OR s.locked_until <= :now::timestamptz THEN :now::timestamptz ELSE s.first_failure_at END,
         locked_until = CASE
           WHEN :max::int IS NULL THEN NULL
           WHEN (CASE WHEN s.first_failure_at < :windowStart::timestamptz OR s.locked_until <= :now::timestamptz THEN 1 ELSE s.failures + 1 END) >= :max::int THEN :lockUntil::timestamptz
           ELSE NULL END`,
      { replacements: { key, now, windowStart: new Date(now.getTime() - WINDOW_MS), max, lockUntil } },
    );
  }
}

export async function clearFailures(keys: ThrottleKey[]) {
  await SignInAttempt.destroy({ where: { key: { [Op.in]: keys.filter((k) => !k.key.startsWith('ip:')).map((k) => k.key) } } });
}
