'use client';

// Input (grid drive) and output voltage over one period at the chosen drive. Separate axes: the output is
// usually tens of times larger than the input.
import { CartesianGrid, ComposedChart, Line, ReferenceLine, XAxis, YAxis } from 'recharts';
import { AXIS_LABEL, AXIS_LINE, COLORS, ChartLegend, EmptyChart, GRID, TICK, niceStep, niceTicks, tickNumber, ChartFrame } from './chart-parts';

export type WaveformChartProps = {
  /** seconds */
  t: number[];
  /** volts, input drive (grid) */
  input: number[];
  /** volts, output swing about its DC level */
  output: number[];
  height?: number;
  stale?: boolean;
};

// Symmetric axis about zero with round ticks: ±55 V peak → −60 … 60 in steps of 20.
function symmetricAxis(values: number[]): { max: number; ticks: number[] } {
  const m = values.reduce((a, v) => Math.max(a, Math.abs(v)), 0) || 1;
  const step = niceStep(2 * m, 4);
  const max = Math.ceil(m / step - 1e-9) * step;
  const ticks: number[] = [];
  for (let v = -max; v <= max + step * 1e-6; v += step) ticks.push(Number(v.toPrecision(10)));
  return { max, ticks };
}

export function WaveformChart({ t, input, output, height = 280, stale = false }: WaveformChartProps) {
  if (t.length === 0) return <EmptyChart height={height}>No waveform: set a drive amplitude.</EmptyChart>;
  const data = t.map((ti, i) => ({ ms: ti * 1e3, input: input[i] ?? 0, output: output[i] ?? 0 }));
  const inAxis = symmetricAxis(input);
  const outAxis = symmetricAxis(output);
  const msEnd = data[data.length - 1]?.ms ?? 1;
  const tTicks = niceTicks(0, msEnd, 5).filter((v) => v <= msEnd + 1e-12);
  return (
    <ChartFrame testId="waveform-chart" label="Input and output waveforms" stale={stale} height={height} footer={
        <ChartLegend
          className="mt-1"
          entries={[
            { label: 'Input (left axis)', color: COLORS.dcline, kind: 'line' },
            { label: 'Output (right axis)', color: COLORS.acline, kind: 'thick' },
          ]}
        />
      }>
      <ComposedChart data={data} margin={{ top: 12, right: 8, bottom: 22, left: 6 }}>
        <CartesianGrid {...GRID} />
        <XAxis
          type="number"
          dataKey="ms"
          domain={[0, msEnd]}
          ticks={tTicks}
          tick={TICK}
          axisLine={AXIS_LINE}
          tickLine={AXIS_LINE}
          tickFormatter={tickNumber}
          label={{ value: 'Time (ms)', position: 'insideBottom', offset: -12, ...AXIS_LABEL }}
        />
        <YAxis
          yAxisId="in"
          type="number"
          domain={[-inAxis.max, inAxis.max]}
          ticks={inAxis.ticks}
          tick={{ ...TICK, fill: COLORS.dcline }}
          axisLine={AXIS_LINE}
          tickLine={AXIS_LINE}
          tickFormatter={tickNumber}
          width={48}
          label={{ value: 'Input (V)', angle: -90, position: 'insideLeft', offset: 12, style: { textAnchor: 'middle' }, ...AXIS_LABEL }}
        />
        <YAxis
          yAxisId="out"
          orientation="right"
          type="number"
          domain={[-outAxis.max, outAxis.max]}
          ticks={outAxis.ticks}
          tick={{ ...TICK, fill: COLORS.acline }}
          axisLine={AXIS_LINE}
          tickLine={AXIS_LINE}
          tickFormatter={tickNumber}
          width={62}
          label={{ value: 'Output (V)', angle: 90, position: 'insideRight', offset: 12, style: { textAnchor: 'middle' }, ...AXIS_LABEL }}
        />
        <ReferenceLine yAxisId="in" y={0} stroke={COLORS.rule} />
        <Line yAxisId="in" dataKey="input" type="monotone" stroke={COLORS.dcline} strokeWidth={1.75} dot={false} activeDot={false} isAnimationActive={false} />
        <Line yAxisId="out" dataKey="output" type="monotone" stroke={COLORS.acline} strokeWidth={2.25} dot={false} activeDot={false} isAnimationActive={false} />
      </ComposedChart>
    </ChartFrame>
  );
}
