'use client';

import { useRouter } from 'next/navigation';
import { useState } from 'react';
import { Button } from '@/components/ui/button';
import { Card, CardBody, CardHeader } from '@/components/ui/card';
import { Field } from '@/components/ui/field';
import { Textarea } from '@/components/ui/input';
import { ApiRequestError, fetchJson } from '@/lib/hooks/fetch-json';
import { decisionSchema } from '@/lib/validation/review';

export function DecisionForm({ revisionId, number, blocker, movedOn = null }: { revisionId: number; number: number; blocker: string | null; movedOn?: string | null }) {
  const router = useRouter();
  const [comment, setComment] = useState('');
  const [fieldError, setFieldError] = useState<string | null>(null);
  const [error, setError] = useState<string | null>(null);
  const [busy, setBusy] = useState<null | 'approve' | 'request-changes'>(null);

  async function send(decision: 'approve' | 'request-changes') {
    setError(null);
    setFieldError(null);
    const parsed = decisionSchema.safeParse({ decision, comment });
    if (!parsed.success) {
      setFieldError(parsed.error.issues.find((i) => i.path[0] === 'comment')?.message ?? null);
      return;
    }
    setBusy(decision);
    try {
      await fetchJson(`/api/revisions/${revisionId}/decision`, { method: 'POST', body: parsed.data });
      router.refresh();
    } catch (err) {
      if (err instanceof ApiRequestError && err.fieldErrors?.comment) setFieldError(err.fieldErrors.comment[0] ?? null);
      setError(err instanceof Error ? err.message : 'The decision was not recorded.');
    } finally {
      setBusy(null);
    }
  }

  return (
    <Card>
      <CardHeader title={`Decide on revision ${number}`} />
      <CardBody className="space-y-3">
        {blocker ? (
          <p role="note" className="rounded-md border border-near/40 bg-near/10 px-3 py-2 text-sm" data-testid="decision-blocked">
            {blocker}
          </p>
        ) : null}
        {movedOn && !blocker ? (
          <p role="note" className="rounded-md border border-near/40 bg-near/10 px-3 py-2 text-sm" data-testid="decision-moved-on">
            {movedOn} A decision applies to revision {number} as it was submitted, not to the project as it is now.
          </p>
        ) : null}
        <Field label="Comment (required when asking for changes)" htmlFor="decision-comment" error={fieldError ?? undefined}>
          <Textarea id="decision-comment" rows={5} value={comment} disabled={!!blocker} onChange={(e) => setComment(e.target.value)} aria-invalid={!!fieldError} />
        </Field>
        {error ? (
          <p role="alert" className="text-sm text-over">
            {error}
          </p>
        ) : null}
        {busy ? (
          <p role="status" aria-live="polite" className="flex items-center gap-2 text-sm text-muted" data-testid="decision-progress">
            <span className="inline-block size-3 animate-spin rounded-full border-2 border-heater border-t-transparent" aria-hidden />
            Recording the decision and rendering the PDF report for the mail; this takes a few seconds…
          </p>
        ) : null}
        <div className="flex flex-wrap gap-2">
          <Button type="button" disabled={!!blocker || busy !== null} onClick={() => send('approve')}>
            {busy === 'approve' ? 'Approving…' : 'Approve'}
          </Button>
          <Button type="button" variant="danger" disabled={!!blocker || busy !== null} onClick={() => send('request-changes')}>
            {busy === 'request-changes' ? 'Sending…' : 'Request changes'}
          </Button>
        </div>
        <p className="text-xs text-muted">A decision is permanent. The designer and the project’s watchers get a summary by e-mail with the PDF report attached.</p>
      </CardBody>
    </Card>
  );
}
