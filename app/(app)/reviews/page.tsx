import type { Metadata } from 'next';
import Link from 'next/link';
import { StatusBadge } from '@/components/ui/badge';
import { Card, CardHeader, PageHeader } from '@/components/ui/card';
import { requirePageUser } from '@/lib/auth/session';
import { listRevisions, type RevisionSummary } from '@/lib/review/service';
import { formatDateTime } from '@/lib/utils';

export const metadata: Metadata = { title: 'Reviews' };
export const dynamic = 'force-dynamic';

function Table({ rows, meId, decided }: { rows: RevisionSummary[]; meId: number; decided: boolean }) {
  if (!rows.length) return <p className="p-4 text-sm text-muted">{decided ? 'No decisions yet.' : 'Nothing is waiting for a decision.'}</p>;
  return (
    <div className="overflow-x-auto">
      <table className="w-full text-sm" data-testid={decided ? 'past-decisions' : 'open-revisions'}>
        <thead className="border-b border-rule text-left text-xs text-muted">
          <tr>
            <th className="px-3 py-2 font-medium">Project</th>
            <th className="px-3 py-2 font-medium">Revision</th>
            <th className="px-3 py-2 font-medium">Stages</th>
            <th className="px-3 py-2 font-medium">Submitted</th>
            <th className="px-3 py-2 font-medium">{decided ? 'Decision' : 'Status'}</th>
            <th className="px-3 py-2 font-medium">Content hash</th>
          </tr>
        </thead>
        <tbody className="divide-y divide-rule">
          {rows.map((r) => (
            <tr key={r.id} className="hover:bg-paper/60">
              <td className="px-3 py-2">
                <Link href={`/reviews/${r.id}`} className="font-medium underline-offset-2 hover:underline">
                  {r.projectName}
                </Link>
              </td>
              <td className="num px-3 py-2">{r.number}</td>
              <td className="num px-3 py-2">{r.stageCount}</td>
              <td className="px-3 py-2 text-xs">
                {r.submittedBy?.displayName ?? 'unknown'}
                {r.submittedBy?.id === meId ? ' (you)' : ''}
                <div className="text-muted">{formatDateTime(r.submittedAt)}</div>
              </td>
              <td className="px-3 py-2 text-xs">
                <StatusBadge status={r.state} />
                {r.decision ? (
                  <div className="mt-0.5 text-muted">
                    by {r.decision.reviewer?.displayName ?? 'unknown'}, {formatDateTime(r.decision.createdAt)}
                  </div>
                ) : r.submittedBy?.id === meId ? (
                  <div className="mt-0.5 text-muted">another reviewer decides</div>
                ) : null}
              </td>
              <td className="num px-3 py-2 text-xs text-muted" title={r.contentHash}>
                {r.contentHash.slice(0, 12)}…
              </td>
            </tr>
          ))}
        </tbody>
      </table>
    </div>
  );
}

export default async function ReviewsPage() {
  const user = await requirePageUser('reviews:read');
  const all = await listRevisions();
  const open = all.filter((r) => r.state === 'submitted');
  const decided = all.filter((r) => r.state !== 'submitted');
  return (
    <div className="space-y-5">
      <PageHeader title="Reviews" subtitle="Revisions are frozen, hash-stamped copies of a project. A reviewer approves them or asks for changes; decisions are permanent." />
      <Card>
        <CardHeader title={`Waiting for a decision (${open.length})`} />
        <Table rows={open} meId={user.id} decided={false} />
      </Card>
      <Card>
        <CardHeader title={`Past decisions (${decided.length})`} />
        <Table rows={decided} meId={user.id} decided />
      </Card>
    </div>
  );
}
