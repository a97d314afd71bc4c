'use client';

// Two or three tube types overlaid on common axes: plate curves Ia(Va) or transfer curves Ia(Vg). Draws only.
import { CartesianGrid, ComposedChart, Line, ResponsiveContainer, XAxis, YAxis } from 'recharts';
import { AXIS_LABEL, AXIS_LINE, COLORS, ChartLegend, EmptyChart, GRID, TICK, tickNumber, type LegendEntry } from './chart-parts';
import { COMPARE_STYLES } from './series';

export type CompareSeriesInput = {
  label: string;
  /** plate curves: x = va; transfer: x = vg. Currents in A. */
  curves: { key: string; points: { x: number; ia: number }[] }[];
};

export { COMPARE_STYLES };

/** 1, 2 or 5 times a power of ten, giving about `count` intervals over `span`. */
function niceStep(span: number, count: number): number {
  const raw = span / count;
  const p = 10 ** Math.floor(Math.log10(raw));
  const m = raw / p;
  return (m < 1.5 ? 1 : m < 3.5 ? 2 : m < 7.5 ? 5 : 10) * p;
}

function ticks(from: number, to: number, step: number): number[] {
  const out: number[] = [];
  for (let v = from; v <= to + step * 1e-6; v += step) out.push(Number(v.toPrecision(6)));
  return out;
}

export function CompareChart({ series, mode, xMax, height = 420 }: { series: CompareSeriesInput[]; mode: 'plate' | 'transfer'; xMax?: number; height?: number }) {
  if (series.length === 0) return <EmptyChart height={height}>Choose two or three types.</EmptyChart>;
  const xs = series.flatMap((s) => s.curves.flatMap((c) => c.points.map((p) => p.x)));
  const x1Raw = mode === 'plate' ? (xMax ?? Math.max(...xs)) : 0;
  const span = mode === 'plate' ? x1Raw : -Math.min(...xs);
  const xStep = niceStep(span, 7);
  const x0 = mode === 'plate' ? 0 : -Math.ceil(span / xStep - 1e-9) * xStep;
  const x1 = mode === 'plate' ? Math.ceil(x1Raw / xStep - 1e-9) * xStep : 0;
  const xTicks = ticks(x0, x1, xStep);
  // Plate curves: scale to the biggest current at mid-range so one large tube does not flatten the others entirely.
  const iaAll = series.flatMap((s) => s.curves.flatMap((c) => c.points.map((p) => p.ia * 1e3)));
  const iaStep = niceStep(Math.max(...iaAll, 0.1) * 1.05, 5);
  const iaMax = Math.ceil((Math.max(...iaAll, 0.1) * 1.05) / iaStep) * iaStep;
  const iaTicks = ticks(0, iaMax, iaStep);
  const legend: LegendEntry[] = series.map((s, i) => ({ label: s.label, color: COMPARE_STYLES[i]!.color, kind: i === 0 ? 'thick' : 'dashed' }));
  return (
    <figure data-testid="compare-chart" aria-label={mode === 'plate' ? 'Plate curves of the compared types' : 'Transfer curves of the compared types'}>
      <div style={{ height }}>
        <ResponsiveContainer width="100%" height="100%" initialDimension={{ width: 700, height }}>
          <ComposedChart margin={{ top: 12, right: 24, bottom: 22, left: 6 }}>
            <CartesianGrid {...GRID} />
            <XAxis
              type="number"
              dataKey="x"
              domain={[x0, x1]}
              ticks={xTicks}
              allowDataOverflow
              tick={TICK}
              axisLine={AXIS_LINE}
              tickLine={AXIS_LINE}
              tickFormatter={tickNumber}
              label={{ value: mode === 'plate' ? 'Plate voltage Va (V)' : 'Grid–cathode voltage Vg (V)', position: 'insideBottom', offset: -12, ...AXIS_LABEL }}
            />
            <YAxis
              type="number"
              dataKey="ia"
              domain={[0, iaMax]}
              ticks={iaTicks}
              allowDataOverflow
              tick={TICK}
              axisLine={AXIS_LINE}
              tickLine={AXIS_LINE}
              tickFormatter={tickNumber}
              width={52}
              label={{ value: 'Plate current Ia (mA)', angle: -90, position: 'insideLeft', offset: 12, style: { textAnchor: 'middle' }, ...AXIS_LABEL }}
            />
            {series.flatMap((s, i) =>
              s.curves.map((c) => (
                <Line
                  key={`${i}-${c.key}`}
                  data={c.points.map((p) => ({ x: p.x, ia: p.ia * 1e3 }))}
                  dataKey="ia"
                  name={`${s.label} ${c.key}`}
                  type="linear"
                  stroke={COMPARE_STYLES[i]!.color}
                  strokeDasharray={COMPARE_STYLES[i]!.dash}
                  strokeWidth={1.6}
                  dot={false}
                  activeDot={false}
                  isAnimationActive={false}
                  legendType="none"
                />
              )),
            )}
          </ComposedChart>
        </ResponsiveContainer>
      </div>
      <ChartLegend entries={legend} className="mt-1" />
    </figure>
  );
}
