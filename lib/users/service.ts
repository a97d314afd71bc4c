import 'server-only';
import { createHash, randomBytes } from 'node:crypto';
import bcrypt from 'bcryptjs';
import { Op } from 'sequelize';
import { ApiError } from '@/lib/api/errors';
import { env } from '@/lib/env';
import { enqueueMail, deliverSoon } from '@/lib/mail/outbox';
import { invitationMail } from '@/lib/mail/templates';
import type { InviteInput, UpdateUserInput } from '@/lib/validation/auth';
import { inviteSchema } from '@/lib/validation/auth';
import { Invitation, User, type Role } from '@/models';
import { recordAudit } from '@/lib/db/audit';
import { sequelize } from '@/lib/db';

export const INVITATION_TTL_MS = 48 * 60 * 60 * 1000;

export type UserRow = { id: number; email: string; displayName: string; role: Role; active: boolean; createdAt: string; pendingInvitation: boolean };

export function hashToken(token: string) {
  return createHash('sha256').update(token).digest('hex');
}

export async function listUsers(): Promise<UserRow[]> {
  const users = await User.findAll({ order: [['id', 'ASC']] });
  return users.map((u) => ({
    id: u.id,
    email: u.email,
    displayName: u.displayName,
    role: u.role,
    active: u.active,
    createdAt: u.createdAt.toISOString(),
    pendingInvitation: u.passwordHash === null,
  }));
}

export async function inviteUser(actorId: number, input: InviteInput, now = new Date()) {
  const data = inviteSchema.parse(input);
  const existing = await User.findOne({ where: { email: data.email } });
  if (existing) throw new ApiError('conflict', `An account for ${data.email} already exists.`, { fieldErrors: { email: ['This address already has an account.'] } });
  const token = randomBytes(32).toString('base64url');
  const link = `${env.APP_URL}/invitations/${token}`;
  const result = await sequelize.transaction(async (transaction) => {
    const user = await User.create({ email: data.email, displayName: data.displayName, role: data.role, passwordHash: null, active: true }, { transaction });
    const invitation = await Invitation.create(
      { email: data.email, role: data.role, tokenHash: hashToken(token), expiresAt: new Date(now.getTime() + INVITATION_TTL_MS), usedAt: null, invitedById: actorId, userId: user.id },
      { transaction },
    );
    const mail = await enqueueMail(transaction, invitationMail({ to: data.email, name: data.displayName, role: data.role, link }));
    await recordAudit(transaction, { actorId, action: 'user.invite', targetType: 'user', targetId: user.id, details: { email: data.email, role: data.role } });
    return { user, invitation, mailId: mail.id };
  });
  deliverSoon([result.mailId]);
  return { id: result.user.id, email: result.user.email, role: result.user.role, expiresAt: result.invitation.expiresAt.toISOString(), link };
}

export async function findInvitation(token: string, now = new Date()) {
  const inv = await Invitation.findOne({ where: { tokenHash: hashToken(token) } });
  if (!inv) return { state: 'unknown' as const };
  if (inv.usedAt) return { state: 'used' as const };
  if (inv.expiresAt <= now) return { state: 'expired' as const };
  return { state: 'valid' as const, email: inv.email, role: inv.role };
}

export async function acceptInvitation(token: string, password: string, now = new Date()) {
  const hash = await bcrypt.hash(password, 10);
  return sequelize.transaction(async (transaction) => {
    const inv = await Invitation.findOne({ where: { tokenHash: hashToken(token) }, lock: transaction.LOCK.UPDATE, transaction });
    if (!inv) throw new ApiError('not_found', 'This invitation link is not valid.');
    if (inv.usedAt) throw new ApiError('conflict', 'This invitation link has already been used. Sign in instead.');
    if (inv.expiresAt <= now) throw new ApiError('conflict', 'This invitation link has expired (links last 48 hours). Ask an admin for a new one.');
    const user = await User.findOne({ where: { email: inv.email }, transaction });
    if (!user) throw new ApiError('not_found', 'The invited account no longer exists.');
    await user.update({ passwordHash: hash }, { transaction });
    await inv.update({ usedAt: now }, { transaction });
    await recordAudit(transaction, { actorId: user.id, action: 'user.accept-invitation', targetType: 'user', targetId: user.id });
    return { email: user.email };
  });
}

export async function updateUser(actorId: number, id: number, patch: UpdateUserInput) {
  return sequelize.transaction(async (transaction) => {
    const user = await User.findByPk(id, { transaction, lock: transaction.LOCK.UPDATE });
    if (!user) throw new ApiError('not_found', 'No such user.');
    if (id === actorId && (patch.active === false || (patch.role && patch.role !== 'admin'))) {
      throw new ApiError('conflict', 'You cannot deactivate yourself or remove your own admin role.');
    }
    if ((patch.active === false || (patch.role && patch.role !== 'admin')) && user.role === 'admin') {
      const admins = await User.count({ where: { role: 'admin', active: true, id: { [Op.ne]: id } }, transaction });
      if (admins === 0) throw new ApiError('conflict', 'Anodyne needs at least one active admin.');
    }
    const before = { role: user.role, active: user.active, displayName: user.displayName };
    await user.update(patch, { transaction });
    const action = patch.active === false ? 'user.deactivate' : patch.active === true ? 'user.reactivate' : 'user.update';
    await recordAudit(transaction, { actorId, action, targetType: 'user', targetId: id, details: { before, after: patch } });
    return { id: user.id, email: user.email, displayName: user.displayName, role: user.role, active: user.active };
  });
}
