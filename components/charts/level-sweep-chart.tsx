'use client';

// Output level and THD against input level for a whole chain (levels in dBV, rms), the clip point marked.
// Every point is a solved large-signal level: past the clip point the curve bends as the chain really does.
import { CartesianGrid, ComposedChart, Line, ReferenceLine, XAxis, YAxis } from 'recharts';
import { AXIS_LABEL, AXIS_LINE, COLORS, ChartFrame, ChartLegend, EmptyChart, GRID, TICK, niceTicks, tickNumber } from './chart-parts';

export type LevelSweepChartProps = {
  points: { inputDbv: number; outputDbv: number; thdPercent: number; clipped: boolean }[];
  clip: { inputDbv: number } | null;
  /** the chain input currently chosen, dBV */
  inputDbv?: number | null;
  height?: number;
  stale?: boolean;
};

export function LevelSweepChart({ points, clip, inputDbv = null, height = 260, stale = false }: LevelSweepChartProps) {
  if (points.length < 2) return <EmptyChart height={height}>No level sweep for this chain.</EmptyChart>;
  const data = points.map((p) => ({ x: p.inputDbv, out: p.outputDbv, thd: Math.max(p.thdPercent, 1e-4) }));
  const xMin = points[0]!.inputDbv;
  const xMax = points[points.length - 1]!.inputDbv;
  const outs = points.map((p) => p.outputDbv);
  const yTicks = niceTicks(Math.min(...outs), Math.max(...outs), 5);
  const thdMax = Math.max(...points.map((p) => p.thdPercent), 1);
  const thdTicks = niceTicks(0, thdMax, 4);
  return (
    <ChartFrame
      testId="level-sweep-chart"
      label="Output level and distortion against input level"
      stale={stale}
      height={height}
      footer={
        <ChartLegend
          className="mt-1"
          entries={[
            { label: 'Output level, dBV (left axis)', color: COLORS.acline, kind: 'thick' },
            { label: 'THD, % (right axis)', color: COLORS.dcline, kind: 'dashed' },
            ...(clip ? [{ label: 'Clip point', color: COLORS.limit, kind: 'line' as const }] : []),
          ]}
        />
      }
    >
      <ComposedChart data={data} margin={{ top: 12, right: 8, bottom: 22, left: 6 }}>
        <CartesianGrid {...GRID} />
        <XAxis
          type="number"
          dataKey="x"
          domain={[xMin, xMax]}
          ticks={niceTicks(xMin, xMax, 5).filter((v) => v >= xMin - 1e-9 && v <= xMax + 1e-9)}
          tick={TICK}
          axisLine={AXIS_LINE}
          tickLine={AXIS_LINE}
          tickFormatter={tickNumber}
          label={{ value: 'Input (dBV)', position: 'insideBottom', offset: -12, ...AXIS_LABEL }}
        />
        <YAxis yAxisId="out" domain={[yTicks[0]!, yTicks[yTicks.length - 1]!]} ticks={yTicks} tick={TICK} axisLine={AXIS_LINE} tickLine={AXIS_LINE} tickFormatter={tickNumber} width={44} />
        <YAxis yAxisId="thd" orientation="right" domain={[0, thdTicks[thdTicks.length - 1]!]} ticks={thdTicks} tick={TICK} axisLine={AXIS_LINE} tickLine={AXIS_LINE} tickFormatter={tickNumber} width={40} />
        {clip ? <ReferenceLine yAxisId="out" x={clip.inputDbv} stroke={COLORS.limit} strokeWidth={1.5} label={{ value: 'clip', position: 'insideTopRight', ...AXIS_LABEL }} /> : null}
        {inputDbv !== null && inputDbv >= xMin && inputDbv <= xMax ? <ReferenceLine yAxisId="out" x={inputDbv} stroke={COLORS.heater} strokeDasharray="3 3" /> : null}
        <Line yAxisId="out" type="linear" dataKey="out" stroke={COLORS.acline} strokeWidth={2.5} dot={false} isAnimationActive={false} />
        <Line yAxisId="thd" type="linear" dataKey="thd" stroke={COLORS.dcline} strokeWidth={1.75} strokeDasharray="4 3" dot={false} isAnimationActive={false} />
      </ComposedChart>
    </ChartFrame>
  );
}
