import 'server-only';
import { env } from '@/lib/env';
import { MailOutbox } from '@/models';
import '@/lib/db';

export type OutboxRow = {
  id: number;
  to: string[];
  subject: string;
  status: 'queued' | 'sent' | 'failed';
  attempts: number;
  lastError: string | null;
  nextAttemptAt: string;
  sentAt: string | null;
  createdAt: string;
  attachments: string[];
};

export async function listOutbox(limit = 200): Promise<OutboxRow[]> {
  const rows = await MailOutbox.findAll({ order: [['id', 'DESC']], limit, attributes: { exclude: ['html', 'text'] } });
  return rows.map((r) => ({
    id: r.id,
    to: r.to,
    subject: r.subject,
    status: r.status,
    attempts: r.attempts,
    lastError: r.lastError,
    nextAttemptAt: r.nextAttemptAt.toISOString(),
    sentAt: r.sentAt?.toISOString() ?? null,
    createdAt: r.createdAt.toISOString(),
    attachments: r.attachments.map((a) => a.filename),
  }));
}

export type SinkMessage = { id: string; receivedAt: string; from: string; to: string[]; subject: string; text: string; html: string; attachments: { filename: string; contentType: string; size: number }[] };

// The local SMTP sink's received mail (development and tests only; absent when MAIL_SINK_URL is unset).
export async function listSinkMessages(): Promise<SinkMessage[] | null> {
  const base = env.MAIL_SINK_URL;
  if (!base) return null;
  try {
    const res = await fetch(`${base}/messages`, { cache: 'no-store' });
    if (!res.ok) return null;
    const body = (await res.json()) as { messages: SinkMessage[] };
    return body.messages.reverse();
  } catch {
    return null;
  }
}
