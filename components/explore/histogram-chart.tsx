'use client';

import { Bar, BarChart, CartesianGrid, ReferenceLine, ResponsiveContainer, Tooltip, XAxis, YAxis } from 'recharts';
import { AXIS_LINE, COLORS, GRID, TICK } from '@/components/charts/chart-parts';
import type { DistributionStats } from '@/lib/calc/explore/stats';
import { formatMetric } from './format';

/** Histogram of one metric over the builds, with the nominal design and the 1st / 99th percentiles marked. */
export function HistogramChart({ stats, unit, nominal, label }: { stats: DistributionStats; unit: string; nominal: number | null; label: string }) {
  const data = stats.histogram.map((b) => ({ x: (b.from + b.to) / 2, count: b.count, from: b.from, to: b.to }));
  const p1 = stats.percentiles[0]?.value;
  const p99 = stats.percentiles[4]?.value;
  return (
    <figure aria-label={`Histogram of ${label}`} className="h-40 w-full">
      <ResponsiveContainer width="100%" height="100%">
        <BarChart data={data} margin={{ top: 6, right: 8, bottom: 2, left: 0 }} barCategoryGap={1}>
          <CartesianGrid {...GRID} vertical={false} />
          <XAxis dataKey="x" type="number" domain={[stats.min, stats.max]} tick={TICK} axisLine={AXIS_LINE} tickFormatter={(v: number) => formatMetric(v, unit, 3)} tickCount={4} />
          <YAxis tick={TICK} axisLine={AXIS_LINE} width={36} allowDecimals={false} />
          <Tooltip
            formatter={(v) => [String(v), 'builds']}
            labelFormatter={(_, p) => {
              const d = p?.[0]?.payload as { from: number; to: number } | undefined;
              return d ? `${formatMetric(d.from, unit)} … ${formatMetric(d.to, unit)}` : '';
            }}
            contentStyle={{ background: 'var(--sheet)', border: '1px solid var(--rule)', fontSize: 12 }}
          />
          <Bar dataKey="count" fill={COLORS.dcline} isAnimationActive={false} />
          {nominal !== null && Number.isFinite(nominal) ? <ReferenceLine x={nominal} stroke={COLORS.heater} strokeWidth={2} /> : null}
          {typeof p1 === 'number' ? <ReferenceLine x={p1} stroke={COLORS.muted} strokeDasharray="3 3" /> : null}
          {typeof p99 === 'number' ? <ReferenceLine x={p99} stroke={COLORS.muted} strokeDasharray="3 3" /> : null}
        </BarChart>
      </ResponsiveContainer>
    </figure>
  );
}
