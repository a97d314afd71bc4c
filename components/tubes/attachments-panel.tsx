'use client';

import { useQueryClient } from '@tanstack/react-query';
import { useRef, useState } from 'react';
import { Button } from '@/components/ui/button';
import { Card, CardBody, CardHeader } from '@/components/ui/card';
import type { TubeDetail } from '@/lib/tubes/service';
import { formatDateTime } from '@/lib/utils';
import { MAX_ATTACHMENT_BYTES } from '@/lib/validation/tube';
import { formatMaybe } from '@/lib/format/number';
import { tubeQueryKey } from './labels';

export function AttachmentsPanel({ tube, canWrite }: { tube: TubeDetail; canWrite: boolean }) {
  const qc = useQueryClient();
  const fileRef = useRef<HTMLInputElement>(null);
  const [busy, setBusy] = useState(false);
  const [error, setError] = useState<string | null>(null);
  const upload = async () => {
    const file = fileRef.current?.files?.[0];
    setError(null);
    if (!file) return setError('Choose a PDF file.');
    if (file.size > MAX_ATTACHMENT_BYTES) return setError(`The file is larger than ${MAX_ATTACHMENT_BYTES / 1048576} MB.`);
    setBusy(true);
    const body = new FormData();
    body.set('file', file);
    body.set('kind', 'datasheet');
    const res = await fetch(`/api/tubes/${tube.id}/attachments`, { method: 'POST', body }).catch(() => null);
    setBusy(false);
    if (!res?.ok) {
      const json = (await res?.json().catch(() => null)) as { error?: { message: string } } | null;
      return setError(json?.error?.message ?? 'Upload failed.');
    }
    if (fileRef.current) fileRef.current.value = '';
    await qc.invalidateQueries({ queryKey: tubeQueryKey(tube.id) });
  };
  return (
    <Card>
      <CardHeader title="Datasheets" />
      <CardBody className="space-y-3">
        {tube.attachments.length === 0 ? <p className="text-sm text-muted">No datasheet attached.</p> : null}
        <ul className="space-y-1.5 text-sm" data-testid="attachments">
          {tube.attachments.map((a) => (
            <li key={a.id} className="flex flex-wrap items-baseline gap-x-2">
              <a href={a.url} className="text-dcline hover:underline" download>
                {a.fileName}
              </a>
              <span className="num text-xs text-muted">{formatMaybe(a.byteSize, 'B')}</span>
              <span className="text-xs text-muted">
                {a.uploadedBy ? `${a.uploadedBy}, ` : ''}
                {formatDateTime(a.createdAt)}
              </span>
            </li>
          ))}
        </ul>
        {canWrite ? (
          <div className="space-y-2 border-t border-rule pt-3">
            <label htmlFor="datasheet-file" className="block text-xs font-medium text-muted">
              Attach a datasheet (PDF, up to {MAX_ATTACHMENT_BYTES / 1048576} MB)
            </label>
            <input id="datasheet-file" ref={fileRef} type="file" accept="application/pdf,.pdf" className="block w-full text-sm text-ink file:mr-3 file:rounded-md file:border file:border-rule file:bg-sheet file:px-2.5 file:py-1.5 file:text-sm file:text-ink" />
            {error ? <p role="alert" className="text-sm text-over">{error}</p> : null}
            <Button size="sm" variant="secondary" onClick={upload} disabled={busy}>
              {busy ? 'Uploading…' : 'Attach PDF'}
            </Button>
          </div>
        ) : null}
      </CardBody>
    </Card>
  );
}
