'use client';

// Harmonic levels relative to the fundamental, orders 2–10, as bars rising from a floor.
import { Bar, BarChart, CartesianGrid, LabelList, XAxis, YAxis } from 'recharts';
import { AXIS_LABEL, AXIS_LINE, COLORS, EmptyChart, GRID, TICK, ChartFrame } from './chart-parts';

export type SpectrumChartProps = {
  /** db: level relative to the fundamental (negative) */
  harmonics: { order: number; db: number }[];
  /** lowest level drawn, dB; automatic when absent */
  floorDb?: number;
  height?: number;
  stale?: boolean;
};

export function spectrumFloor(harmonics: { db: number }[]): number {
  const lowest = harmonics.reduce((m, h) => (Number.isFinite(h.db) && h.db < m ? h.db : m), 0);
  return Math.max(-140, Math.min(-60, Math.floor((lowest - 10) / 20) * 20));
}

export function SpectrumChart({ harmonics, floorDb, height = 280, stale = false }: SpectrumChartProps) {
  const rows = harmonics.filter((h) => h.order >= 2 && h.order <= 10);
  if (rows.length === 0) return <EmptyChart height={height}>No harmonics: set a drive amplitude.</EmptyChart>;
  const floor = floorDb ?? spectrumFloor(rows);
  const data = rows.map((h) => {
    const db = Math.max(floor, h.db);
    return { order: h.order, range: [floor, db] as [number, number], text: h.db <= floor ? `<${floor}` : h.db.toFixed(1) };
  });
  const ticks: number[] = [];
  for (let v = 0; v >= floor; v -= 20) ticks.push(v);
  return (
    <ChartFrame testId="spectrum-chart" label="Harmonic spectrum in dB below the fundamental" stale={stale} height={height}>
      <BarChart data={data} margin={{ top: 18, right: 16, bottom: 22, left: 6 }}>
        <CartesianGrid {...GRID} vertical={false} />
        <XAxis
          dataKey="order"
          type="category"
          tick={TICK}
          axisLine={AXIS_LINE}
          tickLine={AXIS_LINE}
          tickFormatter={(o: number) => `H${o}`}
          label={{ value: 'Harmonic order', position: 'insideBottom', offset: -12, ...AXIS_LABEL }}
        />
        <YAxis
          type="number"
          domain={[floor, 0]}
          ticks={ticks}
          allowDataOverflow
          tick={TICK}
          axisLine={AXIS_LINE}
          tickLine={AXIS_LINE}
          width={52}
          label={{ value: 'dB re fundamental', angle: -90, position: 'insideLeft', offset: 12, style: { textAnchor: 'middle' }, ...AXIS_LABEL }}
        />
        <Bar dataKey="range" fill={COLORS.dcline} isAnimationActive={false} maxBarSize={34} radius={[2, 2, 0, 0]}>
          <LabelList dataKey="text" position="top" fill={COLORS.ink} fontSize={10} />
        </Bar>
      </BarChart>
    </ChartFrame>
  );
}
