import type { Metadata } from 'next';
import Link from 'next/link';
import { notFound } from 'next/navigation';
import { pageId } from '@/lib/validation/ids';
import { DecisionForm } from '@/components/reviews/decision-form';
import { STATE_WORDS } from '@/components/reviews/labels';
import { FrozenResults } from '@/components/reviews/frozen-results';
import { RevisionDiffView } from '@/components/reviews/revision-diff';
import { ToleranceDigestCard } from '@/components/explore/tolerance-digest-card';
import { Caution } from '@/components/shell/caution';
import { PdfDownloadButton } from '@/components/shell/pdf-download-button';
import { StatusBadge } from '@/components/ui/badge';
import { Card, CardBody, CardHeader, PageHeader } from '@/components/ui/card';
import { ApiError } from '@/lib/api/errors';
import { requirePageUser } from '@/lib/auth/session';
import { toleranceDigests } from '@/lib/explore/service';
import { decisionBlocker, getRevision } from '@/lib/review/service';
import { formatDateTime } from '@/lib/utils';

export const metadata: Metadata = { title: 'Revision' };
export const dynamic = 'force-dynamic';

export default async function RevisionPage({ params, searchParams }: { params: Promise<{ id: string }>; searchParams: Promise<{ compare?: string }> }) {
  const user = await requirePageUser('reviews:read');
  const { id } = await params;
  if (pageId(id) === null) notFound();
  const compareWith = pageId((await searchParams).compare) ?? undefined;
  let rev;
  try {
    rev = await getRevision(Number(id), { compareWith });
  } catch (err) {
    if (err instanceof ApiError && err.code === 'not_found') notFound();
    // an earlier revision that does not exist: fall back to the previous one
    if (err instanceof ApiError && err.code === 'unprocessable_entity') rev = await getRevision(Number(id));
    else throw err;
  }
  const moved = rev.movedOn?.diff.counts;
  const movedWords = moved
    ? `The project has changed since revision ${rev.number} was submitted (${[
        moved.changed ? `${moved.changed} stage${moved.changed === 1 ? '' : 's'} changed` : null,
        moved.added ? `${moved.added} added` : null,
        moved.removed ? `${moved.removed} removed` : null,
        rev.movedOn!.diff.project.length ? 'project settings changed' : null,
      ]
        .filter(Boolean)
        .join(', ')}).`
    : null;
  const blocker = decisionBlocker(user, rev);
  const tolerance = await toleranceDigests(rev.snapshot.stages.map((st) => ({ id: st.id, version: st.version })));
  return (
    <div className="space-y-5">
      <PageHeader
        title={`${rev.projectName} · revision ${rev.number}`}
        subtitle={
          <>
            Submitted by {rev.submittedBy?.displayName ?? 'unknown'} on {formatDateTime(rev.submittedAt)} · <Link href={`/projects/${rev.projectId}`} className="underline underline-offset-2">open the project</Link>
          </>
        }
        actions={
          <PdfDownloadButton href={`/api/revisions/${rev.id}/report`} filename={`anodyne-revision-${rev.number}.pdf`} label="PDF report" size="md" />
        }
      />
      <Caution />
      <div className="grid gap-5 xl:grid-cols-[minmax(0,1fr)_380px]">
        <div className="min-w-0 space-y-5">
          {rev.movedOn ? (
            <div className="space-y-2" data-testid="moved-on">
              <p role="note" className="rounded-md border border-near/40 bg-near/10 px-3 py-2 text-sm">
                {movedWords} The tables below show revision {rev.number} as submitted; this one shows what the designer has changed since.
              </p>
              <RevisionDiffView diff={rev.movedOn.diff} number={rev.number} title={`Changed in the project since revision ${rev.number} was submitted`} afterLabel="Project now" />
            </div>
          ) : null}
          {rev.earlier.length > 1 ? (
            <form method="get" className="flex flex-wrap items-center gap-2 text-sm" data-testid="compare-form">
              <label htmlFor="compare" className="text-muted">
                Compare revision {rev.number} with
              </label>
              <select id="compare" name="compare" defaultValue={rev.base?.number} className="h-9 rounded-md border border-rule bg-sheet px-2">
                {rev.earlier.map((r) => (
                  <option key={r.id} value={r.number}>
                    revision {r.number} ({STATE_WORDS[r.state]})
                  </option>
                ))}
              </select>
              <button type="submit" className="inline-flex h-9 items-center rounded-md border border-rule bg-sheet px-3 font-medium hover:bg-paper">
                Compare
              </button>
            </form>
          ) : null}
          <RevisionDiffView diff={rev.diff} number={rev.number} />
          <FrozenResults snapshot={rev.snapshot} />
        </div>
        <div className="space-y-5">
          <Card>
            <CardHeader title="Revision" actions={<StatusBadge status={rev.state} />} />
            <CardBody className="space-y-2 text-sm">
              <p>
                <span className="text-muted">Content hash (SHA-256)</span>
                <br />
                <span className="num break-all text-xs" data-testid="content-hash">
                  {rev.contentHash}
                </span>
              </p>
              <p className={rev.hashVerified ? 'text-xs text-ok' : 'text-xs text-over'} data-testid="hash-check">
                {rev.hashVerified ? '✓ The stored content matches its hash.' : '✗ The stored content does not match its hash.'}
              </p>
              <p className="text-xs text-muted">
                {rev.state === 'approved'
                  ? 'Approved revisions cannot be changed or deleted. A later edit to the project starts a new draft.'
                  : 'The content of a submitted revision is frozen; later edits to the project do not change it.'}
              </p>
              {rev.base ? (
                <p className="text-xs text-muted">
                  Compared with <Link href={`/reviews/${rev.base.id}`} className="underline underline-offset-2">revision {rev.base.number}</Link> ({STATE_WORDS[rev.base.state]}).
                </p>
              ) : null}
            </CardBody>
          </Card>
          <ToleranceDigestCard digests={tolerance} stages={rev.snapshot.stages} projectId={rev.projectId} />
          {rev.decision ? (
            <Card>
              <CardHeader title="Decision" actions={<StatusBadge status={rev.state} />} />
              <CardBody className="space-y-2 text-sm" data-testid="decision">
                <p>
                  {rev.decision.decision === 'approve' ? 'Approved' : 'Changes requested'} by <b>{rev.decision.reviewer?.displayName ?? 'unknown'}</b> on {formatDateTime(rev.decision.createdAt)}.
                </p>
                {rev.decision.comment ? <blockquote className="whitespace-pre-wrap border-l-4 border-heater bg-paper px-3 py-2">{rev.decision.comment}</blockquote> : null}
              </CardBody>
            </Card>
          ) : (
            <DecisionForm revisionId={rev.id} number={rev.number} blocker={blocker} movedOn={movedWords} />
          )}
        </div>
      </div>
    </div>
  );
}
