'use client';

import { Badge } from '@/components/ui/badge';
import { Button } from '@/components/ui/button';
import type { ExploreRunDTO } from '@/lib/explore/service';
import { useCancelRun } from './use-run';

const TONE = { queued: 'info', running: 'accent', completed: 'ok', failed: 'over', cancelled: 'neutral' } as const;

/** Status, progress bar and cancel button of one run. */
export function RunStatus({ run, canRun }: { run: ExploreRunDTO; canRun: boolean }) {
  const cancel = useCancelRun();
  const active = run.status === 'queued' || run.status === 'running';
  const pct = run.progress.total > 0 ? Math.min(100, (100 * run.progress.done) / run.progress.total) : 0;
  return (
    <div className="space-y-2" data-testid="run-status" data-status={run.status}>
      <div className="flex flex-wrap items-center gap-3 text-sm">
        <Badge tone={TONE[run.status]}>{run.status}</Badge>
        <span className="num text-muted">
          {run.progress.done.toLocaleString('en')} / {run.progress.total.toLocaleString('en')}
        </span>
        {run.elapsedMs !== null ? <span className="num text-muted">{(run.elapsedMs / 1000).toFixed(1)} s</span> : null}
        {run.worker ? <span className="text-xs text-muted">worker {run.worker}{run.attempt > 1 ? ` (attempt ${run.attempt})` : ''}</span> : null}
        {run.current === false ? <Badge tone="near">made for stage version {run.designVersion}; the stage has changed since</Badge> : null}
        {active && canRun ? (
          <Button type="button" variant="danger" size="sm" disabled={cancel.isPending || run.cancelRequested} onClick={() => cancel.mutate(run.id)}>
            {run.cancelRequested ? 'Cancelling…' : 'Cancel'}
          </Button>
        ) : null}
      </div>
      {active ? (
        <div className="h-2 w-full overflow-hidden rounded bg-rule/40" role="progressbar" aria-valuemin={0} aria-valuemax={100} aria-valuenow={Math.round(pct)} aria-label="Progress">
          <div className="h-full bg-heater transition-[width]" style={{ width: `${pct}%` }} />
        </div>
      ) : null}
      {run.error ? <p role="alert" className="text-sm text-over">{run.error.message}</p> : null}
      {cancel.isError ? <p role="alert" className="text-sm text-over">{cancel.error.message}</p> : null}
    </div>
  );
}
