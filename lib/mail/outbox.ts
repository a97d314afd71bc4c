import 'server-only';
import { Op, type Transaction } from 'sequelize';
import { sequelize } from '@/lib/db';
import { env } from '@/lib/env';
import { MailOutbox, type MailAttachmentRecord } from '@/models';
import { mailTransport } from './transport';

export type OutgoingMail = {
  to: string[];
  subject: string;
  html: string;
  text: string;
  attachments?: MailAttachmentRecord[];
};

// Mail is written to the outbox in the caller's transaction and delivered afterwards, so a decision or an
// invitation is never lost because the SMTP server is down; delivery retries with exponential back-off.
export async function enqueueMail(transaction: Transaction | null, mail: OutgoingMail) {
  return MailOutbox.create(
    { to: mail.to, subject: mail.subject, html: mail.html, text: mail.text, attachments: mail.attachments ?? [], status: 'queued', attempts: 0, nextAttemptAt: new Date() },
    { transaction: transaction ?? undefined },
  );
}

export function backoffMs(attempts: number) {
  return Math.min(15 * 60_000, 2_000 * 2 ** Math.max(0, attempts - 1));
}

async function deliver(row: MailOutbox) {
  try {
    await mailTransport().sendMail({
      from: env.MAIL_FROM,
      to: row.to.join(', '),
      subject: row.subject,
      html: row.html,
      text: row.text,
      attachments: row.attachments.map((a) => ({ filename: a.filename, contentType: a.contentType, content: Buffer.from(a.contentBase64, 'base64') })),
    });
    await row.update({ status: 'sent', attempts: row.attempts + 1, sentAt: new Date(), lastError: null });
    return true;
  } catch (err) {
    const attempts = row.attempts + 1;
    await row.update({
      status: 'failed',
      attempts,
      lastError: err instanceof Error ? err.message : String(err),
      nextAttemptAt: new Date(Date.now() + backoffMs(attempts)),
    });
    return false;
  }
}

export async function deliverDueMail(opts: { ids?: number[]; ignoreSchedule?: boolean } = {}) {
  const where: Record<string | symbol, unknown> = { status: { [Op.in]: ['queued', 'failed'] } };
  if (!opts.ignoreSchedule) where.nextAttemptAt = { [Op.lte]: new Date() };
  if (opts.ids) where.id = { [Op.in]: opts.ids };
  // SKIP LOCKED lets several app servers drain the outbox without sending a mail twice.
  return sequelize.transaction(async (transaction) => {
    const rows = await MailOutbox.findAll({ where, order: [['id', 'ASC']], limit: 20, lock: transaction.LOCK.UPDATE, skipLocked: true, transaction });
    let sent = 0;
    for (const row of rows) if (await deliver(row)) sent++;
    return { attempted: rows.length, sent };
  });
}

export function deliverSoon(ids: number[]) {
  void deliverDueMail({ ids }).catch((err) => console.error('[mail] delivery failed', err));
}
