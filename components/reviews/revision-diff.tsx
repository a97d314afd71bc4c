import { Card, CardBody, CardHeader } from '@/components/ui/card';
import type { RevisionDiff, StageDiff, ValueChange } from '@/lib/review/diff';
import { cn } from '@/lib/utils';
import { formatValue } from '@/lib/format/number';
import type { MagnitudeChange } from '@/lib/review/diff';

/** Signed values stay in their columns; this column says which way the magnitude moved, in words. */
function magnitudeWords(m: MagnitudeChange | null): string {
  if (!m) return 'changed';
  if (m.direction === 'sign-changed') return 'sign reversed';
  if (m.direction === 'same') return 'magnitude ±0 %';
  const arrow = m.direction === 'larger' ? 'larger' : 'smaller';
  if (m.percent === null) return `magnitude ${arrow}`;
  const p = Math.abs(m.percent);
  return `magnitude ${arrow} by ${p.toFixed(p < 10 ? 1 : 0)} %`;
}

function Rows({ changes, showSame }: { changes: ValueChange[]; showSame: boolean }) {
  const rows = showSame ? changes : changes.filter((c) => c.change !== 'same');
  if (!rows.length) return null;
  return (
    <tbody className="divide-y divide-rule">
      {rows.map((c) => (
        <tr key={c.path} data-path={c.path} className={c.change === 'same' ? 'text-muted' : undefined}>
          <td className="py-1.5 pr-3">{c.label}</td>
          <td className={cn('num py-1.5 pr-3 text-right', c.change !== 'same' && 'bg-over/5')}>{formatValue(c.before, c.unit)}</td>
          <td className={cn('num py-1.5 pr-3 text-right', c.change !== 'same' && 'bg-ok/5 font-medium')}>{formatValue(c.after, c.unit)}</td>
          <td className="num py-1.5 text-right text-xs text-muted">{c.change === 'changed' ? magnitudeWords(c.magnitude) : c.change === 'same' ? '' : c.change}</td>
        </tr>
      ))}
    </tbody>
  );
}

function Head({ base, number, after }: { base: string; number: number; after?: string }) {
  return (
    <thead className="border-b border-rule text-left text-xs text-muted">
      <tr>
        <th className="py-1.5 pr-3 font-medium">Quantity</th>
        <th className="py-1.5 pr-3 text-right font-medium">{base}</th>
        <th className="py-1.5 pr-3 text-right font-medium">{after ?? `Revision ${number}`}</th>
        <th className="py-1.5 text-right font-medium">Change</th>
      </tr>
    </thead>
  );
}

function StageBlock({ s, base, number, after }: { s: StageDiff; base: string; number: number; after?: string }) {
  return (
    <section className="space-y-2" data-testid={`diff-stage-${s.stageId}`} data-change={s.change}>
      <h3 className="flex flex-wrap items-center gap-2 text-sm font-semibold">
        {s.name} <span className="num text-xs font-normal text-muted">{s.tubeDesignation}</span>
        <span className={cn('rounded px-1.5 py-0.5 text-xs font-medium', s.change === 'added' ? 'bg-ok/15 text-ok' : s.change === 'removed' ? 'bg-over/15 text-over' : s.change === 'changed' ? 'bg-near/15 text-near' : 'bg-rule/50 text-ink')}>
          {s.change}
        </span>
      </h3>
      {s.change === 'unchanged' ? (
        <p className="text-xs text-muted">No change to the inputs or the results.</p>
      ) : (
        <div className="overflow-x-auto">
          <table className="w-full min-w-[520px] text-sm">
            <Head base={base} number={number} after={after} />
            {s.inputs.length ? (
              <>
                <tbody>
                  <tr>
                    <td colSpan={4} className="pt-2 text-xs font-semibold text-muted">Inputs changed</td>
                  </tr>
                </tbody>
                <Rows changes={s.inputs} showSame={false} />
              </>
            ) : null}
            <tbody>
              <tr>
                <td colSpan={4} className="pt-3 text-xs font-semibold text-muted">Results</td>
              </tr>
            </tbody>
            <Rows changes={s.results} showSame />
          </table>
        </div>
      )}
    </section>
  );
}

export function RevisionDiffView({ diff, number, title, afterLabel }: { diff: RevisionDiff; number: number; title?: string; afterLabel?: string }) {
  const base = diff.base ? `Revision ${diff.base.number}` : 'Before';
  if (!diff.base) {
    return (
      <Card>
        <CardHeader title="What changed" />
        <CardBody data-testid="revision-diff">
          <p className="text-sm">
            This is the project&apos;s first revision, so there is nothing earlier to compare with: everything in revision {number} is new. Its {diff.stages.length} stage
            {diff.stages.length === 1 ? '' : 's'} ({diff.stages.map((s) => s.name).join(', ')}) are shown below with their frozen inputs and results.
          </p>
        </CardBody>
      </Card>
    );
  }
  return (
    <Card>
      <CardHeader
        title={title ?? `What changed since revision ${diff.base.number}`}
        actions={
          <span className="text-xs text-muted">
            {diff.counts.changed} changed · {diff.counts.added} added · {diff.counts.removed} removed · {diff.counts.unchanged} unchanged
          </span>
        }
      />
      <CardBody className="space-y-6" data-testid="revision-diff">
        {diff.project.length ? (
          <section className="space-y-2">
            <h3 className="text-sm font-semibold">Project</h3>
            <div className="overflow-x-auto">
              <table className="w-full min-w-[520px] text-sm">
                <Head base={base} number={number} after={afterLabel} />
                <Rows changes={diff.project} showSame={false} />
              </table>
            </div>
          </section>
        ) : null}
        {diff.stages.map((s) => (
          <StageBlock key={s.stageId} s={s} base={base} number={number} after={afterLabel} />
        ))}
      </CardBody>
    </Card>
  );
}
