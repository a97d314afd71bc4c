'use client';

// Operating point, small- and large-signal results and every rating check, as the engine returned them.
import { StatusBadge } from '@/components/ui/badge';
import type { RatingCheck, StageAnalysis, TransformerAnalysis } from '@/lib/calc';
import { formatEng, formatMaybe, formatRatio } from '@/lib/format/number';
import { cn } from '@/lib/utils';

const LIMITED_BY: Record<string, string> = {
  'grid-conduction': 'grid starts to conduct',
  cutoff: 'plate current cuts off',
  'plate-saturation': 'plate bottoms out',
  none: 'no limit found in range',
};

function Row({ label, value, testId, title }: { label: string; value: React.ReactNode; testId?: string; title?: string }) {
  return (
    <div className="flex items-baseline justify-between gap-3 py-1" title={title}>
      <dt className="text-xs text-muted">{label}</dt>
      <dd className="num text-right text-sm" data-testid={testId}>
        {value}
      </dd>
    </div>
  );
}

function Section({ title, children }: { title: string; children: React.ReactNode }) {
  return (
    <section className="border-t border-rule px-4 py-3 first:border-t-0">
      <h3 className="mb-1 text-[11px] font-semibold text-muted">{title}</h3>
      <dl className="divide-y divide-rule/60">{children}</dl>
    </section>
  );
}

const pct = (v: number) => `${v < 10 ? v.toFixed(2) : v.toFixed(1)} %`;

export function ResultsPanel({ analysis, stale }: { analysis: StageAnalysis; stale: boolean }) {
  const op = analysis.operatingPoint;
  const ss = analysis.smallSignal;
  const ls = analysis.largeSignal;
  const pushPull = analysis.topology === 'push-pull-output';
  return (
    <div className={cn('transition-opacity', stale && 'opacity-60')} data-testid="results-panel" data-stale={stale ? 'true' : 'false'}>
      <Section title={pushPull ? 'Operating point (each tube, idle)' : 'Operating point'}>
        <Row label="Plate to cathode, Vak" value={formatMaybe(op.plateCathodeVoltage, 'V')} testId="op-vak" />
        <Row label="Plate current, Ia" value={formatMaybe(op.plateCurrent, 'A')} testId="op-ia" />
        <Row label="Grid to cathode, Vgk" value={formatMaybe(op.gridCathodeVoltage, 'V')} testId="op-vgk" />
        <Row label="Plate to ground" value={formatMaybe(op.plateVoltage, 'V')} />
        <Row label="Cathode voltage" value={formatMaybe(op.cathodeVoltage, 'V')} />
        {op.screenVoltage !== null ? <Row label="Screen voltage" value={formatMaybe(op.screenVoltage, 'V')} /> : null}
        {op.screenCurrent !== null ? <Row label="Screen current" value={formatMaybe(op.screenCurrent, 'A')} /> : null}
        <Row label="Plate dissipation" value={formatMaybe(op.plateDissipation, 'W')} />
      </Section>
      <Section title="Small signal">
        <Row label="Transconductance, gm" value={`${formatRatio(ss.gm * 1e3)} mA/V`} />
        <Row label="Plate resistance, ra" value={formatMaybe(ss.ra, 'Ω')} />
        <Row label="Amplification factor, µ" value={formatRatio(ss.mu)} />
        <Row label="Voltage gain" value={`${formatRatio(ss.gain)} × (${ss.gainDb.toFixed(1)} dB)`} testId="gain" />
        <Row label="Output impedance" value={formatMaybe(ss.outputImpedance, 'Ω')} />
        <Row label="Low −3 dB point" value={formatMaybe(ss.lowCutoff, 'Hz')} />
        <Row label="High −3 dB point" value={formatMaybe(ss.highCutoff, 'Hz')} />
      </Section>
      <Section title={`Large signal at ${formatEng(ls.drive, 'V')} peak drive`}>
        <Row label="Output amplitude" value={`${formatMaybe(ls.outputAmplitude, 'V')} peak`} />
        <Row label="Headroom (max drive)" value={`${formatMaybe(ls.headroom.maxDrive, 'V')} peak`} title={LIMITED_BY[ls.headroom.limitedBy]} />
        <Row label="Limited by" value={<span className="font-sans text-xs">{LIMITED_BY[ls.headroom.limitedBy] ?? ls.headroom.limitedBy}</span>} />
        <Row label="Output swing at the limit" value={`${formatMaybe(ls.headroom.outputSwing, 'V')} peak`} />
        <Row label="THD (FFT)" value={pct(ls.thdPercent)} testId="thd" />
        <Row label="THD, 3-point estimate" value={pct(ls.thd3PointPercent)} />
        <Row label="THD, 5-point estimate" value={pct(ls.thd5PointPercent)} />
        <Row label="Average current shift" value={formatMaybe(ls.dcShift, 'A')} />
        {ls.outputPower !== null ? <Row label="Output power" value={formatMaybe(ls.outputPower, 'W')} testId="output-power" /> : null}
      </Section>
      {analysis.outputs ? <OutputsSection analysis={analysis} /> : null}
      {analysis.transformer ? <TransformerSection x={analysis.transformer} /> : null}
      {analysis.warnings.length ? (
        <section className="border-t border-rule px-4 py-3">
          <h3 className="mb-1 text-[11px] font-semibold text-muted">Notes from the calculation</h3>
          <ul className="list-disc space-y-1 pl-4 text-xs">
            {analysis.warnings.map((w) => (
              <li key={w}>{w}</li>
            ))}
          </ul>
        </section>
      ) : null}
    </div>
  );
}

const OUTPUT_LABEL: Record<string, string> = {
  inverting: 'Inverting output (plate 1)',
  'non-inverting': 'Non-inverting output (plate 2)',
  plate: 'Plate output',
  cathode: 'Cathode output',
};

/** Phase splitters: each output and the balance between them. */
function OutputsSection({ analysis }: { analysis: StageAnalysis }) {
  const entries = Object.entries(analysis.outputs ?? {});
  const b = analysis.balance;
  const hr = analysis.largeSignal.headroom;
  return (
    <>
      {entries.map(([name, o]) =>
        o ? (
          <Section key={name} title={OUTPUT_LABEL[name] ?? name}>
            <div data-testid={`output-${name}`}>
              <Row label="Gain from the grid" value={`${formatRatio(o.gain)} ×`} testId={`output-${name}-gain`} />
              <Row label="Amplitude at the drive" value={`${formatMaybe(o.amplitude, 'V')} peak`} />
              <Row label="Phase" value={`${o.phaseDeg.toFixed(1)}°`} />
              <Row label="THD (FFT)" value={pct(o.thdPercent)} />
              <Row label="Output impedance" value={formatMaybe(o.outputImpedance, 'Ω')} />
              <Row label="DC at the output" value={formatMaybe(o.dcVoltage, 'V')} />
            </div>
          </Section>
        ) : null,
      )}
      <Section title="Balance">
        {b ? (
          <>
            <Row label={`Amplitude ratio at ${formatEng(b.frequency, 'Hz')}`} value={`${b.ratioDb >= 0 ? '+' : ''}${b.ratioDb.toFixed(2)} dB`} testId="balance-ratio" />
            <Row label="Phase error from antiphase" value={`${b.phaseErrorDeg.toFixed(2)}°`} testId="balance-phase" />
          </>
        ) : null}
        {analysis.tailCurrent !== undefined ? (
          <Row label={analysis.topology === 'long-tailed-pair' ? 'Tail current' : 'Cathode current'} value={formatMaybe(analysis.tailCurrent, 'A')} />
        ) : null}
        {hr.explanation ? <p className="py-1 text-xs text-muted" data-testid="headroom-explanation">{hr.explanation}</p> : null}
      </Section>
    </>
  );
}

const BAR: Record<RatingCheck['status'], string> = { ok: 'bg-ok', near: 'bg-near', over: 'bg-over', 'not-checked': 'bg-rule' };

export function RatingsPanel({ ratings, stale }: { ratings: RatingCheck[]; stale: boolean }) {
  return (
    <ul className={cn('divide-y divide-rule transition-opacity', stale && 'opacity-60')} data-testid="ratings">
      {ratings.map((r) => (
        <li key={r.key} className="px-4 py-2.5" data-rating={r.key} data-status={r.status}>
          <div className="flex items-baseline justify-between gap-2">
            <span className="text-sm">{r.label}</span>
            <StatusBadge status={r.status} />
          </div>
          <div className="num mt-0.5 flex items-baseline justify-between gap-2 text-xs text-muted">
            <span>
              <span className="text-ink">{formatEng(r.value, r.unit)}</span>
              {r.limit !== null ? <> of {formatEng(r.limit, r.unit)} max</> : <> · no rating on file</>}
            </span>
            {r.percent !== null ? <span className="text-ink">{r.percent.toFixed(0)} %</span> : null}
          </div>
          {r.percent !== null ? (
            <div className="mt-1 h-1 overflow-hidden rounded bg-rule/50" aria-hidden>
              <div className={cn('h-full', BAR[r.status])} style={{ width: `${Math.min(100, Math.max(2, r.percent))}%` }} />
            </div>
          ) : null}
          {r.caution ? <p className={cn('mt-1 text-xs', r.status === 'over' ? 'text-over' : r.status === 'near' ? 'text-near' : 'text-muted')}>{r.caution}</p> : null}
        </li>
      ))}
    </ul>
  );
}

/** Output transformer: power at the speaker, losses, bandwidth, output impedance, and the limits not modelled. */
function TransformerSection({ x }: { x: TransformerAnalysis }) {
  return (
    <Section title="At the speaker (output transformer)">
      <div data-testid="transformer-results">
        <Row label="Turns ratio" value={`${formatRatio(x.turnsRatio)} : 1`} />
        {x.speakerPower !== null ? <Row label="Power into the speaker" value={formatMaybe(x.speakerPower, 'W')} testId="speaker-power" /> : null}
        <Row label="Insertion loss (windings)" value={`${x.insertionLossDb.toFixed(2)} dB`} />
        <Row label="Low −3 dB point" value={x.lowCutoff !== null ? formatMaybe(x.lowCutoff, 'Hz') : 'not modelled'} testId="xf-low" />
        <Row label="High −3 dB point" value={x.highCutoff !== null ? formatMaybe(x.highCutoff, 'Hz') : 'not modelled'} testId="xf-high" />
        {x.peak ? <Row label="Resonant peak" value={`+${x.peak.db.toFixed(1)} dB at ${formatEng(x.peak.frequency, 'Hz')}`} /> : null}
        <Row label="Output impedance at 1 kHz" value={formatMaybe(x.outputImpedance, 'Ω')} />
        <Row label="Damping factor at 1 kHz" value={formatRatio(x.dampingFactor)} testId="damping-factor" />
        <Row label="Lowest damping factor, 20 Hz–20 kHz" value={`${formatRatio(x.minDampingFactor.value)} at ${formatEng(x.minDampingFactor.frequency, 'Hz')}`} />
        {x.notModelled.length ? (
          <ul className="mt-1 list-disc space-y-0.5 pl-4 text-xs text-near">
            {x.notModelled.map((n) => (
              <li key={n.limit}>{n.message}</li>
            ))}
          </ul>
        ) : null}
      </div>
    </Section>
  );
}
