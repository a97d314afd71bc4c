'use client';

import Link from 'next/link';
import { useRouter } from 'next/navigation';
import { useState } from 'react';
import { Button } from '@/components/ui/button';
import { Textarea } from '@/components/ui/input';
import { ApiRequestError, fetchJson } from '@/lib/hooks/fetch-json';
import { submitRevisionSchema } from '@/lib/validation/review';

// "Submit for review" on the project page: freezes the project as a revision and tells the reviewers.
export function SubmitForReviewButton({ projectId, status, disabledReason }: { projectId: number; status: string; disabledReason?: string | null }) {
  const router = useRouter();
  const [open, setOpen] = useState(false);
  const [note, setNote] = useState('');
  const [busy, setBusy] = useState(false);
  const [error, setError] = useState<{ message: string; revisionId?: number } | null>(null);

  const reason = disabledReason ?? (status === 'in-review' ? 'This project is waiting for a review decision.' : null);

  async function submit() {
    setBusy(true);
    setError(null);
    try {
      const body = submitRevisionSchema.parse({ note });
      const { revision } = await fetchJson<{ revision: { id: number } }>(`/api/projects/${projectId}/revisions`, { method: 'POST', body });
      router.push(`/reviews/${revision.id}`);
    } catch (err) {
      const details = err instanceof ApiRequestError ? (err.details as { revisionId?: number } | undefined) : undefined;
      setError({ message: err instanceof Error ? err.message : 'Submitting failed.', revisionId: details?.revisionId });
      setBusy(false);
    }
  }

  return (
    <div className="relative flex flex-col items-end gap-1">
      <Button type="button" size="sm" onClick={() => setOpen((o) => !o)} disabled={!!reason} aria-expanded={open} data-testid="submit-for-review">
        Submit for review
      </Button>
      {reason ? <span className="text-xs text-muted">{reason}</span> : null}
      {open ? (
        <div className="absolute right-0 top-full z-20 mt-2 w-96 max-w-[90vw] space-y-2 rounded-lg border border-rule bg-sheet p-3 shadow-lg" data-testid="submit-for-review-panel">
          <p className="text-sm">Freeze the project as it is now (stages, inputs and results) and ask the reviewers to sign it off.</p>
          <label htmlFor="review-note" className="block text-xs font-medium text-muted">
            Note to the reviewers (optional)
          </label>
          <Textarea id="review-note" rows={3} value={note} onChange={(e) => setNote(e.target.value)} maxLength={2000} />
          {error ? (
            <p role="alert" className="text-sm text-over">
              {error.message} {error.revisionId ? <Link href={`/reviews/${error.revisionId}`} className="underline">Open it</Link> : null}
            </p>
          ) : null}
          <div className="flex justify-end gap-2">
            <Button type="button" variant="secondary" size="sm" onClick={() => setOpen(false)} disabled={busy}>
              Cancel
            </Button>
            <Button type="button" size="sm" onClick={submit} disabled={busy}>
              {busy ? 'Submitting…' : 'Submit revision'}
            </Button>
          </div>
        </div>
      ) : null}
    </div>
  );
}
