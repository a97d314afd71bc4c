'use client';

import { Button } from '@/components/ui/button';

export default function AppError({ error, reset }: { error: Error & { digest?: string }; reset: () => void }) {
  return (
    <div className="mx-auto max-w-lg rounded-lg border border-over/40 bg-sheet p-6">
      <h1 className="text-lg font-semibold">This screen could not be shown</h1>
      <p className="mt-1 text-sm text-muted">
        Nothing you saved is lost. Try again; if it keeps happening, tell an admin{error.digest ? ` and quote reference ${error.digest}` : ''}.
      </p>
      <Button className="mt-4" onClick={reset}>Try again</Button>
    </div>
  );
}
