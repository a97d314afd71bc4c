// Drawing-data helpers of the plate-curve chart, kept apart from the chart so pages can shape series without
// loading the charting library before the chart itself is shown.
import type { PlateCurveSeries, VaIa } from './plate-curves-chart';

/** Grid-voltage label as practitioners write it on a curve: "−1.5 V". */
export function gridLabel(vg: number): string {
  return `${Number(vg.toPrecision(3))} V`.replace('-', '−');
}

/** Turns the engine's `analysis.plot.curves` into chart series (drawing data only). */
export function curveSeriesFromPlot(curves: { gridVoltage: number; bias: boolean; points: VaIa[] }[]): PlateCurveSeries[] {
  return curves.map((c) => ({ label: gridLabel(c.gridVoltage), vg: c.gridVoltage, points: c.points, emphasis: c.bias }));
}

// Hue and dash both differ, so the types stay apart in print and for colour-blind readers (the compare chart's
// series, and the legend drawn beside it). Colours are the theme's CSS variables, as in chart-parts' COLORS.
export const COMPARE_STYLES = [
  { color: 'var(--dcline)', dash: undefined, kind: 'line' as const },
  { color: 'var(--acline)', dash: '8 4', kind: 'dashed' as const },
  { color: 'var(--ink)', dash: '2 3', kind: 'dashed' as const },
];
