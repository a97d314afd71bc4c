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
    await row.update({ status: 'sent', attempts: row.attempts + 1, sentAt: new Date(), lastError: null, claimedUntil: null });
    return true;
  } catch (err) {
    const attempts = row.attempts + 1;
    await row.update({
      status: 'failed',
      attempts,
      lastError: err instanceof Error ? err.message : String(err),
      nextAttemptAt: new Date(Date.now() + backoffMs(attempts)),
      claimedUntil: null,
    });
    return false;
  }
}

export async function deliverDueMail(opts: { ids?: number[]; ignoreSchedule?: boolean } = {}) {
  // Claim due rows for a minute under SKIP LOCKED, so several app servers (or a forced retry) never send the
  // same mail twice; the sending itself happens outside the claiming statement.
  const [claimed] = await sequelize.query(
    `UPDATE mail_outbox SET claimed_until = now() + interval '60 seconds', updated_at = now()
      WHERE id IN (SELECT id FROM mail_outbox
                    WHERE status IN ('queued', 'failed')
                      AND (claimed_until IS NULL OR claimed_until < now())
                      AND (:ignoreSchedule OR next_attempt_at <= now())
                      AND (:noIds OR id IN (:ids))
                    ORDER BY id LIMIT 20 FOR UPDATE SKIP LOCKED)
      RETURNING id`,
    { replacements: { ignoreSchedule: !!opts.ignoreSchedule, noIds: !opts.ids?.length, ids: opts.ids?.length ? opts.ids : [0] } },
  );
  const ids = (claimed as { id: number }[]).map((r) => r.id);
  if (!ids.length) return { attempted: 0, sent: 0 };
  const rows = await MailOutbox.findAll({ where: { id: { [Op.in]: ids } }, order: [['id', 'ASC']] });
  let sent = 0;
  for (const row of rows) if (await deliver(row)) sent++;
  return { attempted: rows.length, sent };
}

export function deliverSoon(ids: number[]) {
  void deliverDueMail({ ids }).catch((err) => console.error('[mail] delivery failed', err));
}
