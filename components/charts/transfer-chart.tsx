'use client';

// Transfer curve Ia(Vg) at the operating plate voltage, with the bias point.
import { CartesianGrid, ComposedChart, Line, ReferenceDot, ReferenceLine, XAxis, YAxis } from 'recharts';
import { AXIS_LABEL, AXIS_LINE, COLORS, ChartLegend, EmptyChart, GRID, TICK, niceTicks, tickNumber, ChartFrame } from './chart-parts';

export type TransferChartProps = {
  /** vg in V, ia in A */
  points: { vg: number; ia: number }[];
  biasPoint?: { vg: number; ia: number };
  /** the plate voltage the curve is drawn at, for the caption */
  plateVoltage?: number;
  height?: number;
  stale?: boolean;
};

export function TransferChart({ points, biasPoint, plateVoltage, height = 280, stale = false }: TransferChartProps) {
  if (points.length === 0) return <EmptyChart height={height}>No transfer curve to draw.</EmptyChart>;
  const data = points.map((p) => ({ vg: p.vg, ia: p.ia * 1e3 }));
  const vgMin = Math.min(...points.map((p) => p.vg));
  const vgMax = Math.max(0, ...points.map((p) => p.vg));
  // the data's own ends bound the x axis (ticks inside it); the y axis starts at zero on a round number
  const xTicks = niceTicks(vgMin, vgMax, 6).filter((t) => t >= vgMin - 1e-9 && t <= vgMax + 1e-9);
  const yTicks = niceTicks(0, Math.max(...data.map((d) => d.ia), (biasPoint?.ia ?? 0) * 1e3) * 1.02, 5);
  const iaMax = yTicks[yTicks.length - 1] ?? 1;
  return (
    <ChartFrame testId="transfer-chart" label="Transfer curve: plate current against grid voltage" stale={stale} height={height} footer={
        <ChartLegend
          className="mt-1"
          entries={[
            { label: plateVoltage !== undefined ? `Ia(Vg) at Va = ${Number(plateVoltage.toPrecision(3))} V` : 'Ia(Vg)', color: COLORS.ink, kind: 'thick' },
            ...(biasPoint ? [{ label: 'Bias point', color: COLORS.heater, kind: 'dot' as const }] : []),
          ]}
        />
      }>
      <ComposedChart data={data} margin={{ top: 12, right: 24, bottom: 22, left: 6 }}>
        <CartesianGrid {...GRID} />
        <XAxis
          type="number"
          dataKey="vg"
          domain={[vgMin, vgMax]}
          ticks={xTicks}
          tick={TICK}
          axisLine={AXIS_LINE}
          tickLine={AXIS_LINE}
          tickFormatter={tickNumber}
          label={{ value: 'Grid–cathode voltage Vg (V)', position: 'insideBottom', offset: -12, ...AXIS_LABEL }}
        />
        <YAxis
          type="number"
          domain={[0, iaMax]}
          ticks={yTicks}
          allowDataOverflow
          tick={TICK}
          axisLine={AXIS_LINE}
          tickLine={AXIS_LINE}
          tickFormatter={tickNumber}
          width={52}
          label={{ value: 'Plate current Ia (mA)', angle: -90, position: 'insideLeft', offset: 12, style: { textAnchor: 'middle' }, ...AXIS_LABEL }}
        />
        <Line dataKey="ia" type="monotone" stroke={COLORS.ink} strokeWidth={2} dot={false} activeDot={false} isAnimationActive={false} />
        {biasPoint ? (
          <>
            <ReferenceLine x={biasPoint.vg} stroke={COLORS.heater} strokeDasharray="3 3" />
            <ReferenceDot x={biasPoint.vg} y={biasPoint.ia * 1e3} r={6} fill={COLORS.heater} stroke={COLORS.sheet} strokeWidth={2} />
          </>
        ) : null}
      </ComposedChart>
    </ChartFrame>
  );
}
