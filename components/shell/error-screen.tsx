'use client';

import { useRouter } from 'next/navigation';
import { startTransition, useEffect, useState } from 'react';
import { Button } from '@/components/ui/button';

type Probe = 'checking' | 'unavailable' | 'available';

// A screen that failed to render asks the API whether the database is reachable (any route answers 503 when it
// is not). While it is away the screen says so plainly and tries again on its own; once it is back the screen
// reloads itself.
export function ErrorScreen({ error, reset }: { error: Error & { digest?: string }; reset: () => void }) {
  const router = useRouter();
  const [probe, setProbe] = useState<Probe>('checking');

  useEffect(() => {
    let stop = false;
    let timer: ReturnType<typeof setTimeout> | undefined;
    const check = async () => {
      const res = await fetch('/api/me', { cache: 'no-store' }).catch(() => null);
      if (stop) return;
      const away = !res || res.status === 503;
      setProbe((was) => {
        if (was === 'unavailable' && !away) {
          startTransition(() => {
            router.refresh();
            reset();
          });
        }
        return away ? 'unavailable' : 'available';
      });
      if (away) timer = setTimeout(check, Number(res?.headers.get('retry-after') ?? 5) * 1000);
    };
    void check();
    return () => {
      stop = true;
      if (timer) clearTimeout(timer);
    };
  }, [reset, router]);

  if (probe === 'unavailable') {
    return (
      <div role="alert" className="mx-auto max-w-lg rounded-lg border border-near/40 bg-sheet p-6">
        <h1 className="text-lg font-semibold">Anodyne is temporarily unavailable</h1>
        <p className="mt-1 text-sm text-muted">
          The database cannot be reached at the moment. Nothing you saved is lost. This page tries again every few seconds
          and comes back by itself.
        </p>
      </div>
    );
  }
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
