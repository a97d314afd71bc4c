import type { Metadata } from 'next';
import { StatusBadge } from '@/components/ui/badge';
import { Card, CardBody, CardHeader, PageHeader } from '@/components/ui/card';
import { requirePageUser } from '@/lib/auth/session';
import { listOutbox, listSinkMessages } from '@/lib/mail/outbox-view';
import { formatDateTime } from '@/lib/utils';

export const metadata: Metadata = { title: 'Outbox' };
export const dynamic = 'force-dynamic';

export default async function OutboxPage() {
  await requirePageUser('outbox:read');
  const [mails, sink] = await Promise.all([listOutbox(), listSinkMessages()]);
  return (
    <div className="space-y-5">
      <PageHeader title="Outbox" subtitle="Every e-mail Anodyne has queued, with its delivery state. Failed mail is retried with back-off until it is sent." />
      <Card>
        <CardHeader title={`Queued and sent mail (${mails.length})`} />
        <div className="overflow-x-auto">
          <table className="w-full text-sm" data-testid="outbox-table">
            <thead className="border-b border-rule text-left text-xs text-muted">
              <tr><th className="px-3 py-2">Status</th><th className="px-3 py-2">To</th><th className="px-3 py-2">Subject</th><th className="px-3 py-2">Attachments</th><th className="px-3 py-2">Attempts</th><th className="px-3 py-2">Queued</th><th className="px-3 py-2">Sent / next try</th></tr>
            </thead>
            <tbody className="divide-y divide-rule">
              {mails.map((m) => (
                <tr key={m.id}>
                  <td className="px-3 py-2"><StatusBadge status={m.status} /></td>
                  <td className="num px-3 py-2 text-xs">{m.to.join(', ')}</td>
                  <td className="px-3 py-2">{m.subject}{m.lastError && m.status !== 'sent' ? <div className="text-xs text-over">{m.lastError}</div> : null}</td>
                  <td className="px-3 py-2 text-xs">{m.attachments.join(', ') || '—'}</td>
                  <td className="num px-3 py-2">{m.attempts}</td>
                  <td className="px-3 py-2 text-xs text-muted">{formatDateTime(m.createdAt)}</td>
                  <td className="px-3 py-2 text-xs text-muted">{m.sentAt ? formatDateTime(m.sentAt) : formatDateTime(m.nextAttemptAt)}</td>
                </tr>
              ))}
              {mails.length === 0 ? <tr><td colSpan={7} className="px-3 py-6 text-center text-muted">No mail yet.</td></tr> : null}
            </tbody>
          </table>
        </div>
      </Card>
      {sink ? (
        <Card>
          <CardHeader title={`Received by the local SMTP sink (${sink.length})`} />
          <CardBody className="space-y-2">
            <p className="text-xs text-muted">Development and test installations deliver to a local sink instead of real mailboxes. This is what it received.</p>
            <ul className="divide-y divide-rule" data-testid="sink-messages">
              {sink.map((m) => (
                <li key={m.id} className="py-2">
                  <details>
                    <summary className="cursor-pointer text-sm">
                      <b>{m.subject}</b> <span className="num text-xs text-muted">→ {m.to.join(', ')} · {formatDateTime(m.receivedAt)}</span>
                      {m.attachments.length ? <span className="text-xs text-muted"> · 📎 {m.attachments.map((a) => a.filename).join(', ')}</span> : null}
                    </summary>
                    <pre className="mt-2 whitespace-pre-wrap rounded bg-paper p-3 text-xs">{m.text}</pre>
                  </details>
                </li>
              ))}
            </ul>
          </CardBody>
        </Card>
      ) : null}
    </div>
  );
}
