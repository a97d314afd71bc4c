'use client';

// Downloads a rendered PDF with visible progress: the report takes a few seconds to render on the server, and a
// plain link gives no sign that anything is happening. Errors are shown in words, never as a broken file.
import { useState } from 'react';
import { buttonVariants } from '@/components/ui/button';
import { cn } from '@/lib/utils';

export function PdfDownloadButton({ href, filename, label = 'PDF report', size = 'sm' }: { href: string; filename: string; label?: string; size?: 'sm' | 'md' }) {
  const [busy, setBusy] = useState(false);
  const [error, setError] = useState<string | null>(null);

  async function download() {
    setBusy(true);
    setError(null);
    try {
      const res = await fetch(href);
      if (!res.ok) {
        const body = (await res.json().catch(() => null)) as { error?: { message?: string } } | null;
        throw new Error(body?.error?.message ?? `The report could not be made (${res.status}).`);
      }
      const url = URL.createObjectURL(await res.blob());
      const a = document.createElement('a');
      a.href = url;
      a.download = filename;
      document.body.appendChild(a);
      a.click();
      a.remove();
      setTimeout(() => URL.revokeObjectURL(url), 1000);
    } catch (err) {
      setError(err instanceof Error ? err.message : 'The report could not be made.');
    } finally {
      setBusy(false);
    }
  }

  return (
    <span className="inline-flex flex-col items-end gap-1">
      <button type="button" className={cn(buttonVariants({ variant: 'secondary', size }), 'gap-2')} onClick={download} disabled={busy} aria-busy={busy} data-testid="pdf-download">
        {busy ? <span className="inline-block size-3 animate-spin rounded-full border-2 border-heater border-t-transparent" aria-hidden /> : null}
        {busy ? 'Rendering the PDF…' : label}
      </button>
      <span role="status" aria-live="polite" className={cn('text-xs', error ? 'text-over' : 'sr-only')}>
        {error ?? (busy ? 'Rendering the PDF report on the server; the download starts when it is ready.' : '')}
      </span>
    </span>
  );
}
