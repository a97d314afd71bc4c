import Link from 'next/link';
import { Badge } from '@/components/ui/badge';
import { Card, CardBody, CardHeader } from '@/components/ui/card';
import type { ToleranceDigest } from '@/lib/explore/digest';
import { formatMetric, percent } from './format';

/** The latest tolerance run of each stage made for exactly these stage versions (a revision's), in short. */
export function ToleranceDigestCard({ digests, stages, projectId }: { digests: ToleranceDigest[]; stages: { id: number; name: string }[]; projectId: number }) {
  return (
    <Card data-testid="tolerance-digests">
      <CardHeader title="Tolerance runs" />
      <CardBody className="space-y-3 text-sm">
        {digests.length === 0 ? (
          <p className="text-muted">No tolerance run was made for the stage versions of this revision.</p>
        ) : (
          digests.map((d) => {
            const ia = d.metrics.find((m) => m.key === 'plateCurrent');
            const pd = d.metrics.find((m) => m.key === 'plateDissipationShare');
            const name = stages.find((s) => s.id === d.stageId)?.name ?? `stage ${d.stageId}`;
            return (
              <div key={d.runId} className="space-y-0.5">
                <p className="font-medium">
                  <Link className="underline underline-offset-2" href={`/projects/${projectId}/stages/${d.stageId}/explore`}>{name}</Link>{' '}
                  <span className="num text-xs text-muted">{d.trials.toLocaleString('en')} builds</span>
                </p>
                {ia ? <p className="num text-xs">Ia {formatMetric(ia.p1, 'A')} … {formatMetric(ia.p99, 'A')} (p1–p99)</p> : null}
                {pd ? <p className="num text-xs">Pa {formatMetric(pd.p1, '%')} … {formatMetric(pd.p99, '%')} of rating</p> : null}
                <p className="text-xs">
                  over a rating <Badge tone={d.overRatingShare > 0.01 ? 'over' : d.overRatingShare > 0 ? 'near' : 'ok'}>{percent(d.overRatingShare)}</Badge> · outside bench tolerance{' '}
                  <span className="num">{percent(d.outsideBenchShare)}</span>
                </p>
                {d.topFactors.length ? <p className="text-xs text-muted">Matters most for Ia: {d.topFactors.map((f) => f.label).join(', ')}</p> : null}
              </div>
            );
          })
        )}
      </CardBody>
    </Card>
  );
}
