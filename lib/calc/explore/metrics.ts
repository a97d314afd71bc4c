// What exploration reads from one analysis: a fixed list of scalar metrics.
import type { StageAnalysis } from '../types';

export type MetricKey =
  | 'plateCurrent'
  | 'plateCathodeVoltage'
  | 'plateVoltage'
  | 'cathodeVoltage'
  | 'gridCathodeVoltage'
  | 'screenCurrent'
  | 'plateDissipationShare'
  | 'screenDissipationShare'
  | 'gain'
  | 'headroom'
  | 'thd'
  | 'outputPower'
  | 'splitterBalance';

export type MetricDef = { key: MetricKey; label: string; unit: string; get: (a: StageAnalysis) => number | null };

const ratingPercent = (a: StageAnalysis, key: string) => a.ratings.find((r) => r.key === key)?.percent ?? null;

export const METRICS: MetricDef[] = [
  { key: 'plateCurrent', label: 'Plate current', unit: 'A', get: (a) => a.operatingPoint.plateCurrent },
  { key: 'plateCathodeVoltage', label: 'Plate to cathode', unit: 'V', get: (a) => a.operatingPoint.plateCathodeVoltage },
  { key: 'plateVoltage', label: 'Plate to ground', unit: 'V', get: (a) => a.operatingPoint.plateVoltage },
  { key: 'cathodeVoltage', label: 'Cathode to ground', unit: 'V', get: (a) => a.operatingPoint.cathodeVoltage },
  { key: 'gridCathodeVoltage', label: 'Grid to cathode', unit: 'V', get: (a) => a.operatingPoint.gridCathodeVoltage },
  { key: 'screenCurrent', label: 'Screen current', unit: 'A', get: (a) => a.operatingPoint.screenCurrent },
  { key: 'plateDissipationShare', label: 'Plate dissipation, % of rating', unit: '%', get: (a) => ratingPercent(a, 'plate-dissipation') },
  { key: 'screenDissipationShare', label: 'Screen dissipation, % of rating', unit: '%', get: (a) => ratingPercent(a, 'screen-dissipation') },
  { key: 'gain', label: 'Gain (magnitude)', unit: '', get: (a) => Math.abs(a.smallSignal.gain) },
  { key: 'headroom', label: 'Headroom (grid drive)', unit: 'V', get: (a) => a.largeSignal.headroom.maxDrive },
  { key: 'thd', label: 'THD at the set drive', unit: '%', get: (a) => (a.largeSignal.drive > 0 ? a.largeSignal.thdPercent : null) },
  { key: 'outputPower', label: 'Output power', unit: 'W', get: (a) => a.largeSignal.outputPower },
  { key: 'splitterBalance', label: 'Splitter balance (output ratio)', unit: 'dB', get: (a) => a.balance?.ratioDb ?? null },
];

export const METRIC_BY_KEY = Object.fromEntries(METRICS.map((m) => [m.key, m])) as Record<MetricKey, MetricDef>;

export function metricValue(a: StageAnalysis, key: MetricKey): number {
  const v = METRIC_BY_KEY[key].get(a);
  return v === null || !Number.isFinite(v) ? NaN : v;
}

/** Metrics that have a value for this stage (e.g. no screen current for a triode, no THD without drive). */
export function availableMetrics(a: StageAnalysis): MetricKey[] {
  return METRICS.filter((m) => Number.isFinite(metricValue(a, m.key))).map((m) => m.key);
}
