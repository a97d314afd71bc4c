// The chain's level sweep drawn for the PDF report: output level (dBV) and THD (%) against input level (dBV),
// the clip point marked. Numbered axes with their units.
import { Circle, Line, Polyline, Svg, Text, View } from '@react-pdf/renderer';
import type { LevelSweep } from '@/lib/calc/chain/sweep';

const INK = '#1f2328';
const MUTED = '#6a6358';
const RULE = '#d9d0bf';
const OUT = '#1f6fb2';
const THD = '#c2362b';

/** Round ticks covering lo…hi, 1, 2 or 5 times a power of ten apart, about `count` of them (negative spans too). */
export function spanTicks(lo: number, hi: number, count = 5): number[] {
  if (!(hi > lo) || !Number.isFinite(lo) || !Number.isFinite(hi)) return [lo];
  const raw = (hi - lo) / count;
  const p = 10 ** Math.floor(Math.log10(raw));
  const step = [1, 2, 5, 10].map((k) => k * p).find((s) => s >= raw) ?? 10 * p;
  const out: number[] = [];
  for (let v = Math.ceil(lo / step - 1e-9) * step; v <= hi + step * 1e-6; v += step) out.push(Number(v.toPrecision(12)));
  return out;
}

/** Output level and THD against input level, with the clip point. Nothing when the sweep has under two levels. */
export function SweepPlot({ sweep, width = 420, height = 150 }: { sweep: LevelSweep; width?: number; height?: number }) {
  const pts = sweep.points.filter((q) => Number.isFinite(q.inputDbv) && Number.isFinite(q.outputDbv) && Number.isFinite(q.thdPercent));
  if (pts.length < 2) return null;
  const m = { l: 30, r: 30, t: 8, b: 22 };
  const W = width - m.l - m.r;
  const H = height - m.t - m.b;
  const xTicks = spanTicks(Math.min(...pts.map((q) => q.inputDbv)), Math.max(...pts.map((q) => q.inputDbv)), 6);
  const x0 = Math.min(xTicks[0]!, ...pts.map((q) => q.inputDbv));
  const x1 = Math.max(xTicks.at(-1)!, ...pts.map((q) => q.inputDbv));
  const yTicks = spanTicks(Math.floor(Math.min(...pts.map((q) => q.outputDbv))), Math.ceil(Math.max(...pts.map((q) => q.outputDbv))), 5);
  const y0 = Math.min(yTicks[0]!, ...pts.map((q) => q.outputDbv));
  const y1 = Math.max(yTicks.at(-1)!, ...pts.map((q) => q.outputDbv));
  const thdTicks = spanTicks(0, Math.max(1, ...pts.map((q) => q.thdPercent)), 4);
  const tMax = Math.max(thdTicks.at(-1)!, ...pts.map((q) => q.thdPercent));
  const x = (v: number) => m.l + ((v - x0) / (x1 - x0 || 1)) * W;
  const y = (v: number) => m.t + H - ((v - y0) / (y1 - y0 || 1)) * H;
  const yt = (v: number) => m.t + H - (v / (tMax || 1)) * H;
  const label = (v: number) => (Math.abs(v) < 1e-9 ? '0' : String(v));
  const clip = sweep.clip && sweep.clip.inputDbv >= x0 && sweep.clip.inputDbv <= x1 ? sweep.clip : null;
  // the output level at the clip point, read off the swept curve
  let clipOut: number | null = null;
  if (clip) {
    for (let i = 1; i < pts.length; i++) {
      const a = pts[i - 1]!;
      const b = pts[i]!;
      if (clip.inputDbv >= a.inputDbv && clip.inputDbv <= b.inputDbv) {
        const f = (clip.inputDbv - a.inputDbv) / (b.inputDbv - a.inputDbv || 1);
        clipOut = a.outputDbv + f * (b.outputDbv - a.outputDbv);
        break;
      }
    }
  }
  return (
    <View wrap={false} style={{ marginTop: 4 }}>
      <Svg width={width} height={height}>
        {yTicks.map((v) => (
          <Line key={`g${v}`} x1={m.l} y1={y(v)} x2={m.l + W} y2={y(v)} stroke={RULE} strokeWidth={0.4} />
        ))}
        <Line x1={m.l} y1={m.t + H} x2={m.l + W} y2={m.t + H} stroke={INK} strokeWidth={0.6} />
        <Line x1={m.l} y1={m.t} x2={m.l} y2={m.t + H} stroke={OUT} strokeWidth={0.6} />
        <Line x1={m.l + W} y1={m.t} x2={m.l + W} y2={m.t + H} stroke={THD} strokeWidth={0.6} />
        {xTicks.map((v) => (
          <Text key={`x${v}`} x={x(v)} y={m.t + H + 8} style={{ fontSize: 5.5 }} fill={MUTED} textAnchor="middle">{label(v)}</Text>
        ))}
        <Text x={m.l + W / 2} y={m.t + H + 17} style={{ fontSize: 6 }} fill={INK} textAnchor="middle">input level (dBV)</Text>
        {yTicks.map((v) => (
          <Text key={`y${v}`} x={m.l - 2} y={y(v) + 2} style={{ fontSize: 5.5 }} fill={OUT} textAnchor="end">{label(v)}</Text>
        ))}
        {thdTicks.map((v) => (
          <Text key={`t${v}`} x={m.l + W + 2} y={yt(v) + 2} style={{ fontSize: 5.5 }} fill={THD} textAnchor="start">{label(v)}</Text>
        ))}
        <Text x={m.l + 2} y={m.t + 6} style={{ fontSize: 6 }} fill={OUT}>output (dBV)</Text>
        <Text x={m.l + W - 2} y={m.t + 6} style={{ fontSize: 6 }} fill={THD} textAnchor="end">THD (%)</Text>
        <Polyline points={pts.map((q) => `${x(q.inputDbv).toFixed(1)},${y(q.outputDbv).toFixed(1)}`).join(' ')} stroke={OUT} strokeWidth={1.1} fill="none" />
        <Polyline points={pts.map((q) => `${x(q.inputDbv).toFixed(1)},${yt(Math.min(q.thdPercent, tMax)).toFixed(1)}`).join(' ')} stroke={THD} strokeWidth={0.9} strokeDasharray="3,1.5" fill="none" />
        {clip ? <Line x1={x(clip.inputDbv)} y1={m.t} x2={x(clip.inputDbv)} y2={m.t + H} stroke={INK} strokeWidth={0.5} strokeDasharray="2,2" /> : null}
        {clip && clipOut !== null ? <Circle cx={x(clip.inputDbv)} cy={y(clipOut)} r={2.4} fill="#d9822b" /> : null}
        {clip ? (
          <Text x={x(clip.inputDbv) + 3} y={m.t + H - 4} style={{ fontSize: 5.5 }} fill={INK}>{`clip ${clip.inputDbv.toFixed(1)} dBV (${clip.stage})`}</Text>
        ) : null}
      </Svg>
      <Text style={{ fontSize: 7, color: MUTED }}>
        Blue: output level in dBV (left axis); red dashed: THD in % (right axis); amber dot and dashed line: the clip point.
      </Text>
    </View>
  );
}
