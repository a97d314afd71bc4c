'use client';

// Plate curve family Ia(Va) with load lines, Pa(max) and the operating point. It only draws what it is given.
import { CartesianGrid, ComposedChart, Line, ReferenceDot, ResponsiveContainer, Scatter, XAxis, YAxis } from 'recharts';
import { AXIS_LABEL, AXIS_LINE, COLORS, ChartLegend, EmptyChart, GRID, TICK, niceTicks, tickNumber, type LegendEntry } from './chart-parts';

/** Currents in A, voltages in V (the chart shows mA). */
export type VaIa = { va: number; ia: number };
export type PlateCurveSeries = { label: string; vg: number; points: VaIa[]; emphasis?: boolean };
export type MeasuredPoint = { va: number; ia: number; vg: number };

export type PlateCurvesChartProps = {
  curves: PlateCurveSeries[];
  paMax?: VaIa[];
  dcLoadLine?: VaIa[];
  acLoadLine?: VaIa[];
  operatingPoint?: VaIa;
  measured?: MeasuredPoint[];
  /** axis end in V; automatic when absent */
  vaMax?: number;
  /** axis end in A; automatic when absent */
  iaMax?: number;
  height?: number;
  /** faded while a newer result is being computed */
  stale?: boolean;
  className?: string;
};

type Row = { va: number; ia: number };
const toMa = (pts: VaIa[] | undefined): Row[] => (pts ?? []).map((p) => ({ va: p.va, ia: p.ia * 1e3 }));
const maxOf = (pts: VaIa[] | undefined, key: 'va' | 'ia') => (pts ?? []).reduce((m, p) => (p[key] > m ? p[key] : m), 0);

export { gridLabel, curveSeriesFromPlot } from './series';

export function plateAxisRange(p: Pick<PlateCurvesChartProps, 'curves' | 'dcLoadLine' | 'acLoadLine' | 'operatingPoint' | 'measured' | 'vaMax' | 'iaMax'>) {
  const vaData = Math.max(maxOf(p.dcLoadLine, 'va'), ...p.curves.map((c) => maxOf(c.points, 'va')), maxOf(p.measured, 'va'));
  const vaMax = p.vaMax ?? (vaData > 0 ? vaData : 100);
  // The current axis follows where the tube works (AC load line swing, twice the quiescent current, measured
  // points). A DC load line through a transformer's small winding resistance climbs to amperes within a few
  // volts; it only counts while it stays near that range, otherwise it is clipped at the frame.
  const working = Math.max(maxOf(p.acLoadLine, 'ia'), 2 * (p.operatingPoint?.ia ?? 0), maxOf(p.measured, 'ia'));
  const dc = maxOf(p.dcLoadLine, 'ia');
  let ia = working > 0 ? Math.max(working * 1.25, dc <= working * 1.5 ? dc : 0) : dc;
  if (!(ia > 0)) ia = Math.max(...p.curves.map((c) => maxOf(c.points, 'ia')), 1e-3);
  const iaMax = p.iaMax ?? ia * 1.05;
  return { vaMax, iaMax };
}

// Where a curve leaves the plot (or ends): the spot for its grid-voltage label.
function labelSpot(points: Row[], vaMax: number, iaMaxMa: number): Row | null {
  let last: Row | null = null;
  for (const p of points) {
    if (p.va > vaMax) break;
    if (p.ia > iaMaxMa) {
      return last ? { va: last.va, ia: Math.min(last.ia, iaMaxMa) } : null;
    }
    last = p;
  }
  if (!last || last.ia < iaMaxMa * 0.04) return null;
  return last;
}

type CurveLabel = { key: string; text: string; va: number; ia: number; top: boolean; emphasis: boolean };

// One label per curve where it leaves the plot; labels that would collide with a neighbour are dropped
// (the bias curve's label always stays).
function curveLabels(curves: PlateCurveSeries[], vaMax: number, iaMaxMa: number): CurveLabel[] {
  const all: CurveLabel[] = [];
  for (const c of curves) {
    const spot = labelSpot(toMa(c.points), vaMax, iaMaxMa);
    // a label squeezed against the current axis would sit on its tick numbers
    if (spot && spot.va >= vaMax * 0.08) all.push({ key: `l${c.vg}${c.emphasis ? 'b' : ''}`, text: c.label, va: spot.va, ia: spot.ia, top: spot.ia >= iaMaxMa * 0.97, emphasis: !!c.emphasis });
  }
  const kept: CurveLabel[] = [];
  const near = (a: CurveLabel, b: CurveLabel) =>
    a.top && b.top ? Math.abs(a.va - b.va) < vaMax * 0.1 : !a.top && !b.top ? Math.abs(a.ia - b.ia) < iaMaxMa * 0.05 : false;
  for (const l of [...all].sort((a, b) => Number(b.emphasis) - Number(a.emphasis))) {
    if (!kept.some((k) => near(k, l))) kept.push(l);
  }
  return kept;
}

export function PlateCurvesChart(props: PlateCurvesChartProps) {
  const { curves, paMax, dcLoadLine, acLoadLine, operatingPoint, measured, height = 420, stale = false, className } = props;
  if (curves.length === 0 && !dcLoadLine?.length) return <EmptyChart height={height}>No curves to draw yet.</EmptyChart>;
  const ordered = [...curves].sort((a, b) => Number(!!a.emphasis) - Number(!!b.emphasis));
  const range = plateAxisRange(props);
  const xTicks = niceTicks(0, range.vaMax * 0.999, 6);
  const yTicks = niceTicks(0, range.iaMax * 1e3, 5);
  const vaMax = xTicks[xTicks.length - 1] ?? range.vaMax;
  const iaMaxMa = yTicks[yTicks.length - 1] ?? range.iaMax * 1e3;
  const labels = curveLabels(ordered, vaMax, iaMaxMa);
  const legend: LegendEntry[] = [
    { label: 'Plate curves (Vg)', color: COLORS.curve, kind: 'line' },
    ...(curves.some((c) => c.emphasis) ? [{ label: 'Bias curve', color: COLORS.ink, kind: 'thick' as const }] : []),
    ...(dcLoadLine?.length ? [{ label: 'DC load line', color: COLORS.dcline, kind: 'thick' as const }] : []),
    ...(acLoadLine?.length ? [{ label: 'AC load line', color: COLORS.acline, kind: 'thick' as const }] : []),
    ...(paMax?.length ? [{ label: 'Pa(max)', color: COLORS.limit, kind: 'dashed' as const }] : []),
    ...(operatingPoint ? [{ label: 'Operating point', color: COLORS.heater, kind: 'dot' as const }] : []),
    ...(measured?.length ? [{ label: 'Measured', color: COLORS.ink, kind: 'cross' as const }] : []),
  ];
  return (
    <figure
      className={className}
      data-testid="plate-curves-chart"
      data-stale={stale ? 'true' : 'false'}
      data-op={operatingPoint ? `${operatingPoint.va.toFixed(2)},${(operatingPoint.ia * 1e3).toFixed(4)}` : ''}
      aria-label="Plate curves: plate current against plate voltage"
    >
      <div style={{ height }} className={stale ? 'opacity-60 transition-opacity' : 'transition-opacity'}>
        <ResponsiveContainer width="100%" height="100%" initialDimension={{ width: 600, height }}>
          <ComposedChart margin={{ top: 12, right: 24, bottom: 22, left: 6 }}>
            <CartesianGrid {...GRID} />
            <XAxis
              type="number"
              dataKey="va"
              domain={[0, vaMax]}
              allowDataOverflow
              ticks={xTicks}
              tick={TICK}
              axisLine={AXIS_LINE}
              tickLine={AXIS_LINE}
              tickFormatter={tickNumber}
              label={{ value: 'Plate voltage Va (V)', position: 'insideBottom', offset: -12, ...AXIS_LABEL }}
            />
            <YAxis
              type="number"
              dataKey="ia"
              domain={[0, iaMaxMa]}
              allowDataOverflow
              ticks={yTicks}
              tick={TICK}
              axisLine={AXIS_LINE}
              tickLine={AXIS_LINE}
              tickFormatter={tickNumber}
              width={52}
              label={{ value: 'Plate current Ia (mA)', angle: -90, position: 'insideLeft', offset: 12, style: { textAnchor: 'middle' }, ...AXIS_LABEL }}
            />
            {ordered.map((c) => (
              <Line
                key={`c${c.vg}${c.emphasis ? 'b' : ''}`}
                data={toMa(c.points)}
                dataKey="ia"
                name={c.label}
                type="linear"
                stroke={c.emphasis ? COLORS.ink : COLORS.curve}
                strokeWidth={c.emphasis ? 2.25 : 1.1}
                dot={false}
                activeDot={false}
                isAnimationActive={false}
                legendType="none"
              />
            ))}
            {paMax?.length ? (
              <Line data={toMa(paMax)} dataKey="ia" name="Pa(max)" type="monotone" stroke={COLORS.limit} strokeWidth={1.6} strokeDasharray="6 4" dot={false} activeDot={false} isAnimationActive={false} legendType="none" />
            ) : null}
            {dcLoadLine?.length ? (
              <Line data={toMa(dcLoadLine)} dataKey="ia" name="DC load line" type="linear" stroke={COLORS.dcline} strokeWidth={2} dot={false} activeDot={false} isAnimationActive={false} legendType="none" />
            ) : null}
            {acLoadLine?.length ? (
              <Line data={toMa(acLoadLine)} dataKey="ia" name="AC load line" type="linear" stroke={COLORS.acline} strokeWidth={2} strokeDasharray="10 3" dot={false} activeDot={false} isAnimationActive={false} legendType="none" />
            ) : null}
            {measured?.length ? (
              <Scatter data={toMa(measured)} dataKey="ia" name="Measured" fill={COLORS.ink} shape={MeasuredMark} isAnimationActive={false} legendType="none" />
            ) : null}
            {labels.map((l) => (
              <ReferenceDot
                key={l.key}
                x={l.va}
                y={l.ia}
                r={0}
                ifOverflow="hidden"
                label={{ value: l.text, position: l.top ? 'insideTopRight' : 'insideBottomRight', fill: l.emphasis ? COLORS.ink : COLORS.muted, fontSize: 10, offset: 4 }}
              />
            ))}
            {operatingPoint ? (
              <ReferenceDot x={operatingPoint.va} y={operatingPoint.ia * 1e3} r={6} fill={COLORS.heater} stroke={COLORS.sheet} strokeWidth={2} ifOverflow="extendDomain" />
            ) : null}
          </ComposedChart>
        </ResponsiveContainer>
      </div>
      <ChartLegend entries={legend} className="mt-1" />
    </figure>
  );
}

function MeasuredMark(props: { cx?: number; cy?: number }) {
  const { cx, cy } = props;
  if (cx === undefined || cy === undefined) return <g />;
  return (
    <g stroke={COLORS.ink} strokeWidth={1.3}>
      <line x1={cx - 3} y1={cy - 3} x2={cx + 3} y2={cy + 3} />
      <line x1={cx - 3} y1={cy + 3} x2={cx + 3} y2={cy - 3} />
    </g>
  );
}
