'use client';

// The project's global feedback loop: margins in plain words, the figures with and without the loop, the loop
// gain (magnitude and phase), closed- against open-loop response and the square-wave response. The resistor,
// shunt and step-capacitor fields are what-ifs: each change re-solves the loop at once (nothing is saved; the
// stored loop is edited on the output stage).
import { useQuery } from '@tanstack/react-query';
import { useEffect, useState } from 'react';
import { CartesianGrid, ComposedChart, Line, ReferenceLine, XAxis, YAxis } from 'recharts';
import { AXIS_LABEL, AXIS_LINE, COLORS, ChartFrame, ChartLegend, GRID, TICK, tickNumber } from '@/components/charts/chart-parts';
import { Badge } from '@/components/ui/badge';
import { Card, CardBody, CardHeader } from '@/components/ui/card';
import { Input } from '@/components/ui/input';
import type { ProjectFeedback } from '@/lib/projects/feedback';
import { fetchJson } from '@/lib/hooks/fetch-json';
import { formatEng, formatRatio } from '@/lib/format/number';
import { cn } from '@/lib/utils';
import { feedbackQuerySchema } from '@/lib/validation/feedback';

const DECADES = [1, 10, 100, 1000, 10000, 100000, 1000000];

const VERDICT: Record<string, { label: string; tone: string }> = {
  stable: { label: 'stable', tone: 'text-ok border-ok/50' },
  'may-ring': { label: 'may ring', tone: 'text-near border-near/50' },
  'will-oscillate': { label: 'will oscillate', tone: 'text-over border-over/50' },
  'positive-feedback': { label: 'positive feedback', tone: 'text-over border-over/50' },
  'no-loop-gain': { label: 'little loop gain', tone: 'text-muted border-rule' },
};

const num = (v: number | null | undefined, unit: string, digits = 3) => (typeof v === 'number' && Number.isFinite(v) ? formatEng(v, unit, digits) : '–');
const deg = (v: number | null | undefined) => (typeof v === 'number' && Number.isFinite(v) ? `${v.toFixed(1)}°` : 'none');
const db = (v: number | null | undefined) => (typeof v === 'number' && Number.isFinite(v) ? `${v.toFixed(1)} dB` : 'none');

function FreqAxis() {
  return (
    <XAxis
      type="number"
      dataKey="frequency"
      scale="log"
      domain={[1, 1e6]}
      ticks={DECADES}
      allowDataOverflow
      tick={TICK}
      axisLine={AXIS_LINE}
      tickLine={AXIS_LINE}
      tickFormatter={tickNumber}
      label={{ value: 'Frequency (Hz)', position: 'insideBottom', offset: -12, ...AXIS_LABEL }}
    />
  );
}

function LoopGainChart({ loop, stale }: { loop: ProjectFeedback['feedback']; stale: boolean }) {
  const data = loop.loopResponse.map((p) => ({ frequency: p.frequency, mag: Math.max(p.magnitudeDb, -80), phase: p.phaseDeg }));
  const pLo = Math.floor(Math.min(-180, ...data.map((d) => d.phase)) / 90) * 90;
  const pHi = Math.ceil(Math.max(180, ...data.map((d) => d.phase)) / 90) * 90;
  const ticks: number[] = [];
  for (let t = pLo; t <= pHi; t += 90) ticks.push(t);
  const marks = [loop.stability.low.unityGainFrequency, loop.stability.high.unityGainFrequency].filter((f): f is number => typeof f === 'number');
  return (
    <ChartFrame testId="loop-gain-chart" label="Loop gain, magnitude and phase" stale={stale} height={260} footer={
      <ChartLegend className="mt-1" entries={[{ label: 'Loop gain (left axis, dB)', color: COLORS.dcline, kind: 'thick' }, { label: 'Phase (right axis)', color: COLORS.muted, kind: 'dashed' }]} />
    }>
      <ComposedChart data={data} margin={{ top: 12, right: 8, bottom: 22, left: 6 }}>
        <CartesianGrid {...GRID} />
        {FreqAxis()}
        <YAxis yAxisId="mag" type="number" domain={[-80, 60]} ticks={[-80, -60, -40, -20, 0, 20, 40, 60]} allowDataOverflow tick={TICK} axisLine={AXIS_LINE} tickLine={AXIS_LINE} width={44} />
        <YAxis yAxisId="phase" orientation="right" type="number" domain={[pLo, pHi]} ticks={ticks} allowDataOverflow tick={TICK} axisLine={AXIS_LINE} tickLine={AXIS_LINE} width={48} />
        <ReferenceLine yAxisId="mag" y={0} stroke={COLORS.limit} strokeDasharray="4 3" label={{ value: '0 dB', position: 'insideTopLeft', fill: COLORS.muted, fontSize: 10 }} />
        <ReferenceLine yAxisId="phase" y={-180} stroke={COLORS.muted} strokeDasharray="2 4" />
        <ReferenceLine yAxisId="phase" y={180} stroke={COLORS.muted} strokeDasharray="2 4" />
        {marks.map((f) => (
          <ReferenceLine key={f} yAxisId="mag" x={f} stroke={COLORS.heater} strokeDasharray="3 3" />
        ))}
        <Line yAxisId="phase" dataKey="phase" type="monotone" stroke={COLORS.muted} strokeWidth={1.5} strokeDasharray="5 3" dot={false} activeDot={false} isAnimationActive={false} />
        <Line yAxisId="mag" dataKey="mag" type="monotone" stroke={COLORS.dcline} strokeWidth={2.25} dot={false} activeDot={false} isAnimationActive={false} />
      </ComposedChart>
    </ChartFrame>
  );
}

function ClosedOpenChart({ loop, stale }: { loop: ProjectFeedback['feedback']; stale: boolean }) {
  const data = loop.closedResponse.map((p, i) => ({ frequency: p.frequency, closed: p.magnitudeDb, open: loop.openResponse[i]?.magnitudeDb ?? null }));
  const all = data.flatMap((d) => [d.closed, d.open ?? d.closed]);
  const hi = Math.ceil((Math.max(...all) + 3) / 10) * 10;
  return (
    <ChartFrame testId="closed-open-chart" label="Response with and without the loop" stale={stale} height={240} footer={
      <ChartLegend className="mt-1" entries={[{ label: 'With the loop (dB, speaker per input volt)', color: COLORS.dcline, kind: 'thick' }, { label: 'Without the loop', color: COLORS.acline, kind: 'dashed' }]} />
    }>
      <ComposedChart data={data} margin={{ top: 12, right: 8, bottom: 22, left: 6 }}>
        <CartesianGrid {...GRID} />
        {FreqAxis()}
        <YAxis type="number" domain={[hi - 60, hi]} allowDataOverflow tick={TICK} axisLine={AXIS_LINE} tickLine={AXIS_LINE} width={44} />
        <Line dataKey="open" type="monotone" stroke={COLORS.acline} strokeWidth={1.5} strokeDasharray="5 3" dot={false} activeDot={false} isAnimationActive={false} />
        <Line dataKey="closed" type="monotone" stroke={COLORS.dcline} strokeWidth={2.25} dot={false} activeDot={false} isAnimationActive={false} />
      </ComposedChart>
    </ChartFrame>
  );
}

function SquareChart({ wave, stale }: { wave: ProjectFeedback['feedback']['squareWaves'][number]; stale: boolean }) {
  const period = 1 / wave.frequency;
  const data = wave.t.map((t, i) => ({ us: (t / period) * 100, v: wave.output[i] ?? 0 }));
  return (
    <ChartFrame testId={`square-${wave.frequency}`} label={`Square wave at ${formatEng(wave.frequency, 'Hz')}`} stale={stale} height={170} footer={
      <p className="mt-1 text-xs text-muted">
        {formatEng(wave.frequency, 'Hz')}: overshoot <span className="num">{wave.overshootPercent.toFixed(1)} %</span>, tilt <span className="num">{wave.tiltPercent !== null ? `${wave.tiltPercent.toFixed(1)} %` : 'still rising at a quarter period'}</span>
      </p>
    }>
      <ComposedChart data={data} margin={{ top: 8, right: 8, bottom: 6, left: 6 }}>
        <CartesianGrid {...GRID} />
        <XAxis type="number" dataKey="us" domain={[0, 100]} ticks={[0, 25, 50, 75, 100]} tick={TICK} axisLine={AXIS_LINE} tickLine={AXIS_LINE} tickFormatter={(v: number) => `${v}%`} />
        <YAxis type="number" domain={[-1.6, 1.6]} ticks={[-1.5, -1, 0, 1, 1.5]} allowDataOverflow tick={TICK} axisLine={AXIS_LINE} tickLine={AXIS_LINE} width={36} />
        <Line dataKey="v" type="linear" stroke={COLORS.curve} strokeWidth={1.75} dot={false} activeDot={false} isAnimationActive={false} />
      </ComposedChart>
    </ChartFrame>
  );
}

function Row({ label, open, closed, testId }: { label: string; open: string; closed: string; testId?: string }) {
  return (
    <tr className="border-t border-rule/60">
      <th scope="row" className="py-1 pr-3 text-left text-xs font-normal text-muted">
        {label}
      </th>
      <td className="num py-1 pr-3 text-right text-sm">{open}</td>
      <td className="num py-1 text-right text-sm" data-testid={testId}>
        {closed}
      </td>
    </tr>
  );
}

export function FeedbackPanel({ projectId, inputRms, version }: { projectId: number; inputRms: number; version: string }) {
  const [fields, setFields] = useState<{ resistor: string; shuntResistor: string; capacitor: string } | null>(null);
  const [query, setQuery] = useState<string>('');
  const parsed = fields ? feedbackQuerySchema.safeParse({ input: inputRms, resistor: fields.resistor, shuntResistor: fields.shuntResistor, capacitor: fields.capacitor.trim() === '' ? 'none' : fields.capacitor }) : null;
  const fieldError = parsed && !parsed.success ? (parsed.error.issues[0] ? `${parsed.error.issues[0].path.join('.')} ${parsed.error.issues[0].message}` : 'Not a value') : null;
  useEffect(() => {
    if (!fields || !parsed?.success) return;
    const q = new URLSearchParams({ resistor: fields.resistor, shuntResistor: fields.shuntResistor, capacitor: fields.capacitor.trim() === '' ? 'none' : fields.capacitor });
    const t = setTimeout(() => setQuery(q.toString()), 250);
    return () => clearTimeout(t);
  }, [fields?.resistor, fields?.shuntResistor, fields?.capacitor]); // eslint-disable-line react-hooks/exhaustive-deps

  const loop = useQuery<ProjectFeedback | null>({
    queryKey: ['project', projectId, 'feedback', inputRms, query, version],
    queryFn: ({ signal }) => fetchJson<{ loop: ProjectFeedback | null }>(`/api/projects/${projectId}/feedback?input=${inputRms}${query ? `&${query}` : ''}`, { signal }).then((r) => r.loop),
    placeholderData: (prev: ProjectFeedback | null | undefined) => prev,
    retry: false,
  });
  const data = loop.data;
  useEffect(() => {
    if (data && !fields) {
      setFields({ resistor: formatEng(data.used.resistor, '', 4).replace(/\s+/g, ''), shuntResistor: formatEng(data.used.shuntResistor, '', 4).replace(/\s+/g, ''), capacitor: data.used.capacitor ? formatEng(data.used.capacitor, '', 4).replace(/\s+/g, '').replace('µ', 'u') : '' });
    }
  }, [data, fields]);
  if (loop.isSuccess && data === null) return null;
  const fb = data?.feedback;
  const stale = loop.isFetching;
  const v = fb ? (VERDICT[fb.stability.verdict] ?? VERDICT.stable!) : null;
  return (
    <Card data-testid="feedback-panel">
      <CardHeader
        title="Global feedback loop"
        actions={
          <span className="flex items-center gap-2 text-xs text-muted">
            {data ? (
              <>
                {data.from.name} speaker → {data.to.name} cathode
              </>
            ) : null}
            {stale ? <span aria-live="polite">updating…</span> : null}
          </span>
        }
      />
      <CardBody className="space-y-4">
        {loop.isError ? <p role="alert" className="text-sm text-over">{loop.error.message}</p> : null}
        {fields ? (
          <div className="flex flex-wrap items-end gap-3 text-xs text-muted">
            {(
              [
                ['resistor', 'Feedback resistor', 'Ω'],
                ['shuntResistor', 'Shunt resistor', 'Ω'],
                ['capacitor', 'Step capacitor (empty: none)', 'F'],
              ] as const
            ).map(([key, label, unit]) => (
              <label key={key} className="flex flex-col gap-1" htmlFor={`fb-${key}`}>
                {label}
                <span className="flex items-center gap-1">
                  <Input id={`fb-${key}`} className="num h-8 w-24" value={fields[key]} onChange={(e) => setFields({ ...fields, [key]: e.target.value })} aria-invalid={Boolean(fieldError)} />
                  {unit}
                </span>
              </label>
            ))}
            <span className="pb-2">What-if values: the loop stored on the output stage is unchanged.</span>
          </div>
        ) : null}
        {fieldError ? <p role="alert" className="text-xs text-over">{fieldError}</p> : null}
        {!fb || !v ? (
          <div className="h-40 animate-pulse rounded bg-rule/30" aria-busy="true" />
        ) : (
          <div className={cn('space-y-4', stale && 'opacity-80')}>
            <div className="rounded-md border border-rule bg-paper/50 px-3 py-2 text-sm" data-testid="feedback-verdict" data-verdict={fb.stability.verdict}>
              <div className="flex flex-wrap items-center gap-2">
                <Badge className={cn('border', v.tone)}>{v.label}</Badge>
                <span>
                  Phase margin <b className="num" data-testid="phase-margin">{deg(fb.phaseMargin)}</b> · gain margin <b className="num" data-testid="gain-margin">{db(fb.gainMargin)}</b> · loop gain at 1 kHz{' '}
                  <b className="num" data-testid="loop-gain">{fb.loopGainDb.toFixed(1)} dB</b>
                </span>
              </div>
              <p className="mt-1">{fb.stability.message}</p>
              {fb.stability.remedies.length ? (
                <ul className="mt-1 list-disc pl-5 text-xs">
                  {fb.stability.remedies.map((r) => (
                    <li key={r}>{r}</li>
                  ))}
                </ul>
              ) : null}
              <p className="mt-1 text-xs text-muted">
                Low end: unity gain {num(fb.stability.low.unityGainFrequency, 'Hz')}, phase margin {deg(fb.stability.low.phaseMargin)}, gain margin {db(fb.stability.low.gainMargin)}. High end: unity gain{' '}
                {num(fb.stability.high.unityGainFrequency, 'Hz')}, phase margin {deg(fb.stability.high.phaseMargin)}, gain margin {db(fb.stability.high.gainMargin)}. Closed-loop peak{' '}
                {fb.closedLoopPeak.db > 0.05 ? `+${fb.closedLoopPeak.db.toFixed(1)} dB at ${formatEng(fb.closedLoopPeak.frequency, 'Hz')}` : 'none'}.
              </p>
            </div>
            <table className="w-full max-w-xl">
              <thead>
                <tr className="text-[11px] text-muted">
                  <th />
                  <th className="pr-3 text-right font-semibold">Without the loop</th>
                  <th className="text-right font-semibold">With the loop</th>
                </tr>
              </thead>
              <tbody>
                <Row label="Gain, speaker per input volt" open={`${formatRatio(fb.openLoopGain)} ×`} closed={`${formatRatio(fb.closedLoopGain)} ×`} testId="closed-gain" />
                <Row label="Output impedance at the speaker" open={num(fb.outputImpedance.open, 'Ω')} closed={num(fb.outputImpedance.closed, 'Ω')} />
                <Row label="Damping factor (1 kHz)" open={formatRatio(fb.dampingFactor.open)} closed={formatRatio(fb.dampingFactor.closed)} testId="damping-closed" />
                <Row
                  label={`THD at ${num(fb.distortion.outputPower, 'W')} into the speaker`}
                  open={`${fb.distortion.open.thdPercent.toFixed(3)} %`}
                  closed={fb.distortion.closed ? `${fb.distortion.closed.thdPercent.toFixed(3)} %` : '–'}
                  testId="thd-closed"
                />
                <Row label="Bandwidth (−3 dB)" open={`${num(fb.bandwidth.open.low, 'Hz')} – ${num(fb.bandwidth.open.high, 'Hz')}`} closed={`${num(fb.bandwidth.closed.low, 'Hz')} – ${num(fb.bandwidth.closed.high, 'Hz')}`} />
              </tbody>
            </table>
            <p className="text-xs text-muted">
              Feedback factor (divider) <span className="num">{formatRatio(fb.feedbackFactor)}</span>, amount of feedback <span className="num">{fb.feedbackDb.toFixed(1)} dB</span>; lowest damping factor 20 Hz–20 kHz{' '}
              <span className="num">{formatRatio(fb.minDampingFactor.value)}</span> at {formatEng(fb.minDampingFactor.frequency, 'Hz')}. Distortion with the loop is the whole circuit solved in the time domain, not the open-loop
              figure divided by the loop gain.
            </p>
            {fb.warnings.length ? (
              <ul className="space-y-1 text-xs text-near">
                {fb.warnings.map((w) => (
                  <li key={w}>{w}</li>
                ))}
              </ul>
            ) : null}
            <div className="grid gap-4 lg:grid-cols-2">
              <LoopGainChart loop={fb} stale={stale} />
              <ClosedOpenChart loop={fb} stale={stale} />
            </div>
            {fb.squareWaves.length ? (
              <div className="grid gap-4 sm:grid-cols-2">
                {fb.squareWaves.map((w) => (
                  <SquareChart key={w.frequency} wave={w} stale={stale} />
                ))}
              </div>
            ) : null}
          </div>
        )}
      </CardBody>
    </Card>
  );
}
