'use client';

// Small-signal frequency response: magnitude (dB) and phase (degrees) over a log frequency axis.
import { CartesianGrid, ComposedChart, Line, ReferenceLine, XAxis, YAxis } from 'recharts';
import { AXIS_LABEL, AXIS_LINE, COLORS, ChartLegend, EmptyChart, GRID, TICK, tickNumber, ChartFrame } from './chart-parts';

export type ResponseChartProps = {
  points: { frequency: number; magnitudeDb: number; phaseDeg: number }[];
  /** −3 dB points in Hz, marked when given */
  lowCutoff?: number | null;
  highCutoff?: number | null;
  height?: number;
  stale?: boolean;
};

const DECADES = [10, 100, 1000, 10000, 100000];

function magnitudeDomain(values: number[]): [number, number] {
  const hi = Math.max(...values);
  const lo = Math.min(...values);
  const top = Math.ceil((hi + 1) / 6) * 6;
  const bottom = Math.min(top - 12, Math.floor((lo - 1) / 6) * 6);
  return [bottom, top];
}

/** Removes ±360° jumps so the phase reads as one continuous curve (display only). */
export function unwrapPhase(deg: number[]): number[] {
  const out: number[] = [];
  let offset = 0;
  deg.forEach((d, i) => {
    if (i > 0) {
      const prev = (deg[i - 1] ?? d) + offset;
      while (d + offset - prev > 180) offset -= 360;
      while (d + offset - prev < -180) offset += 360;
    }
    out.push(d + offset);
  });
  return out;
}

function phaseAxis(values: number[]): { domain: [number, number]; ticks: number[] } {
  let lo = Math.floor(Math.min(...values) / 90) * 90;
  let hi = Math.ceil(Math.max(...values) / 90) * 90;
  if (hi - lo < 180) {
    const mid = (hi + lo) / 2;
    lo = Math.floor((mid - 90) / 90) * 90;
    hi = lo + 180;
  }
  const ticks: number[] = [];
  for (let t = lo; t <= hi; t += 90) ticks.push(t);
  return { domain: [lo, hi], ticks };
}

export function ResponseChart({ points, lowCutoff, highCutoff, height = 280, stale = false }: ResponseChartProps) {
  const positive = points.filter((p) => p.frequency > 0);
  const phase = unwrapPhase(positive.map((p) => p.phaseDeg));
  const data = positive.map((p, i) => ({ ...p, phaseDeg: phase[i] ?? p.phaseDeg }));
  if (data.length === 0) return <EmptyChart height={height}>No frequency response to draw.</EmptyChart>;
  const fMin = Math.min(10, data[0]?.frequency ?? 10);
  const fMax = Math.max(100000, data[data.length - 1]?.frequency ?? 100000);
  const [magLo, magHi] = magnitudeDomain(data.map((d) => d.magnitudeDb));
  const phaseScale = phaseAxis(phase);
  const inRange = (f: number | null | undefined): f is number => typeof f === 'number' && f >= fMin && f <= fMax;
  return (
    <ChartFrame testId="response-chart" label="Frequency response, magnitude and phase" stale={stale} height={height} footer={
        <ChartLegend
          className="mt-1"
          entries={[
            { label: 'Magnitude (left axis)', color: COLORS.dcline, kind: 'thick' },
            { label: 'Phase (right axis)', color: COLORS.muted, kind: 'dashed' },
          ]}
        />
      }>
      <ComposedChart data={data} margin={{ top: 12, right: 8, bottom: 22, left: 6 }}>
        <CartesianGrid {...GRID} />
        <XAxis
          type="number"
          dataKey="frequency"
          scale="log"
          domain={[fMin, fMax]}
          ticks={DECADES.filter((d) => d >= fMin && d <= fMax)}
          allowDataOverflow
          tick={TICK}
          axisLine={AXIS_LINE}
          tickLine={AXIS_LINE}
          tickFormatter={tickNumber}
          label={{ value: 'Frequency (Hz)', position: 'insideBottom', offset: -12, ...AXIS_LABEL }}
        />
        <YAxis
          yAxisId="mag"
          type="number"
          domain={[magLo, magHi]}
          allowDataOverflow
          tick={TICK}
          axisLine={AXIS_LINE}
          tickLine={AXIS_LINE}
          width={48}
          label={{ value: 'Gain (dB)', angle: -90, position: 'insideLeft', offset: 12, style: { textAnchor: 'middle' }, ...AXIS_LABEL }}
        />
        <YAxis
          yAxisId="phase"
          orientation="right"
          type="number"
          domain={phaseScale.domain}
          ticks={phaseScale.ticks}
          allowDataOverflow
          tick={TICK}
          axisLine={AXIS_LINE}
          tickLine={AXIS_LINE}
          width={62}
          label={{ value: 'Phase (°)', angle: 90, position: 'insideRight', offset: 12, style: { textAnchor: 'middle' }, ...AXIS_LABEL }}
        />
        {inRange(lowCutoff) ? <ReferenceLine yAxisId="mag" x={lowCutoff} stroke={COLORS.muted} strokeDasharray="3 3" label={{ value: '−3 dB', position: 'insideTopRight', fill: COLORS.muted, fontSize: 10 }} /> : null}
        {inRange(highCutoff) ? <ReferenceLine yAxisId="mag" x={highCutoff} stroke={COLORS.muted} strokeDasharray="3 3" label={{ value: '−3 dB', position: 'insideTopLeft', fill: COLORS.muted, fontSize: 10 }} /> : null}
        <Line yAxisId="phase" dataKey="phaseDeg" type="monotone" stroke={COLORS.muted} strokeWidth={1.5} strokeDasharray="5 3" dot={false} activeDot={false} isAnimationActive={false} />
        <Line yAxisId="mag" dataKey="magnitudeDb" type="monotone" stroke={COLORS.dcline} strokeWidth={2.25} dot={false} activeDot={false} isAnimationActive={false} />
      </ComposedChart>
    </ChartFrame>
  );
}
