import 'server-only';
import { randomUUID } from 'node:crypto';
import { QueryTypes } from 'sequelize';
import { sequelize } from '@/lib/db';

// Server-side record of each signed-in session (user_sessions). The JWT carries the row's id as `sid`.
export const SESSION_MAX_AGE_S = 12 * 60 * 60;

export async function openSession(userId: number): Promise<string> {
  const id = randomUUID();
  await sequelize.query(`INSERT INTO user_sessions (id, user_id, expires_at) VALUES (:id, :userId, now() + make_interval(secs => :age))`, {
    replacements: { id, userId, age: SESSION_MAX_AGE_S },
  });
  // tidy: a user's long-expired rows
  await sequelize.query(`DELETE FROM user_sessions WHERE user_id = :userId AND expires_at < now() - interval '1 day'`, { replacements: { userId } });
  return id;
}

export async function revokeSession(id: string) {
  await sequelize.query(`UPDATE user_sessions SET revoked_at = now() WHERE id = :id AND revoked_at IS NULL`, { replacements: { id } });
}

export async function revokeUserSessions(userId: number) {
  await sequelize.query(`UPDATE user_sessions SET revoked_at = now() WHERE user_id = :userId AND revoked_at IS NULL`, { replacements: { userId } });
}

const UUID = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i;

/** The active user behind a session, read in one query (role and active flag fresh from the database). */
export async function sessionUser(uid: number, sid: string) {
  if (!UUID.test(sid)) return null;
  const rows = await sequelize.query<{ id: number; email: string; display_name: string; role: string }>(
    `SELECT u.id, u.email, u.display_name, u.role FROM user_sessions s JOIN users u ON u.id = s.user_id
      WHERE s.id = :sid AND s.user_id = :uid AND s.revoked_at IS NULL AND s.expires_at > now() AND u.active`,
    { type: QueryTypes.SELECT, replacements: { sid, uid } },
  );
  return rows[0] ?? null;
}
