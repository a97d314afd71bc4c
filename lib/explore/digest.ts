// The short form of a stage's latest tolerance run, for the design report and the review screens (pure data).
import type { ToleranceSummary } from '../calc/explore/tolerance';

export type ToleranceDigest = {
  runId: number;
  stageId: number | null;
  trials: number;
  failed: number;
  seed: number;
  overRatingShare: number;
  outsideBenchShare: number;
  finishedAt: string | null;
  metrics: { key: string; label: string; unit: string; nominal: number | null; p1: number; p50: number; p99: number }[];
  topFactors: { label: string; rho: number }[];
};

const PICK = ['plateCurrent', 'plateDissipationShare', 'gain', 'headroom', 'thd', 'outputPower'];

export function digestOf(runId: number, stageId: number | null, finishedAt: string | null, summary: ToleranceSummary): ToleranceDigest {
  return {
    runId,
    stageId,
    trials: summary.completed,
    failed: summary.failed,
    seed: summary.seed,
    overRatingShare: summary.overRatingShare,
    outsideBenchShare: summary.outsideBenchShare,
    finishedAt,
    metrics: summary.metrics
      .filter((m) => PICK.includes(m.key) && m.stats)
      .map((m) => ({ key: m.key, label: m.label, unit: m.unit, nominal: m.nominal, p1: m.stats!.percentiles[0]!.value, p50: m.stats!.percentiles[2]!.value, p99: m.stats!.percentiles[4]!.value })),
    topFactors: (summary.sensitivity.find((x) => x.metric === 'plateCurrent')?.ranking ?? []).slice(0, 3).map((f) => ({ label: f.label, rho: f.rho })),
  };
}
