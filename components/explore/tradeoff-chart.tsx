'use client';

import { CartesianGrid, ResponsiveContainer, Scatter, ScatterChart, Tooltip, XAxis, YAxis, ZAxis } from 'recharts';
import { AXIS_LINE, ChartLegend, COLORS, GRID, TICK } from '@/components/charts/chart-parts';
import { formatMetric } from './format';

type Pt = { x: number; y: number };

/** The trade-off between two objectives: every sampled candidate (feasible or not) and the Pareto front. */
export function TradeoffChart({ sample, front, xLabel, yLabel, xUnit, yUnit }: { sample: Pt[]; front: Pt[]; xLabel: string; yLabel: string; xUnit: string; yUnit: string }) {
  const frontSorted = [...front].sort((a, b) => a.x - b.x);
  return (
    <figure aria-label={`Trade-off between ${xLabel} and ${yLabel}`} className="space-y-1">
      <div className="h-72 w-full">
        <ResponsiveContainer width="100%" height="100%">
          <ScatterChart margin={{ top: 8, right: 12, bottom: 18, left: 8 }}>
            <CartesianGrid {...GRID} />
            <XAxis dataKey="x" type="number" name={xLabel} domain={['auto', 'auto']} tick={TICK} axisLine={AXIS_LINE} tickFormatter={(v: number) => formatMetric(v, xUnit)} label={{ value: xLabel, position: 'insideBottom', offset: -10, fill: COLORS.muted, fontSize: 11 }} />
            <YAxis dataKey="y" type="number" name={yLabel} domain={['auto', 'auto']} tick={TICK} axisLine={AXIS_LINE} tickFormatter={(v: number) => formatMetric(v, yUnit)} width={64} />
            <ZAxis range={[14, 14]} />
            <Tooltip
              formatter={(v, name) => [formatMetric(Number(v), name === xLabel ? xUnit : yUnit), String(name)]}
              contentStyle={{ background: 'var(--sheet)', border: '1px solid var(--rule)', fontSize: 12 }}
            />
            <Scatter name="candidates" data={sample} fill={COLORS.curve} isAnimationActive={false} />
            <Scatter name="Pareto front" data={frontSorted} fill={COLORS.heater} line={{ stroke: COLORS.heater }} isAnimationActive={false} />
          </ScatterChart>
        </ResponsiveContainer>
      </div>
      <ChartLegend
        entries={[
          { label: 'candidates analysed (sample)', color: COLORS.curve, kind: 'dot' },
          { label: 'Pareto front (feasible, not bettered in both)', color: COLORS.heater, kind: 'line' },
        ]}
      />
    </figure>
  );
}
