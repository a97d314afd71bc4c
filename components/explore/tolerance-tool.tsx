'use client';

import { useMemo, useState } from 'react';
import { Badge } from '@/components/ui/badge';
import { Button } from '@/components/ui/button';
import { Input, Select } from '@/components/ui/input';
import type { ToleranceSummary } from '@/lib/calc/explore/tolerance';
import { createExploreRunSchema, type CreateExploreRunInput } from '@/lib/validation/explore';
import { formatMetric, percent } from './format';
import { HistogramChart } from './histogram-chart';
import { SortableTable } from './sortable-table';

export type PartRow = { path: string; label: string; kind: 'resistor' | 'capacitor'; nominal: number; unit: string };

const num = (s: string) => (s.trim() === '' ? undefined : Number(s));
const pct = (s: string) => (s.trim() === '' ? undefined : Number(s) / 100);

/** The tolerance run form: trials, distribution, default tolerances (common practice), per-part overrides. */
export function ToleranceForm({ target, parts, onSubmit, pending, error, fieldErrors }: {
  target: { stageId?: number; projectId?: number };
  parts: PartRow[];
  onSubmit: (body: CreateExploreRunInput) => void;
  pending: boolean;
  error: string | null;
  fieldErrors?: Record<string, string[]>;
}) {
  const [trials, setTrials] = useState('10000');
  const [seed, setSeed] = useState('');
  const [distribution, setDistribution] = useState<'normal' | 'uniform'>('normal');
  const [rTol, setRTol] = useState('5');
  const [cMinus, setCMinus] = useState('20');
  const [cPlus, setCPlus] = useState('20');
  const [mains, setMains] = useState('10');
  const [tube, setTube] = useState('20');
  const [overrides, setOverrides] = useState<Record<string, { minus: string; plus: string }>>({});
  const [local, setLocal] = useState<Record<string, string[]>>({});
  const errors = { ...local, ...(fieldErrors ?? {}) };
  const err = (k: string) => (errors[k] ? <span className="text-xs text-over">{errors[k]![0]}</span> : null);

  const submit = () => {
    const partBands: Record<string, { minus: number; plus: number }> = {};
    for (const [path, o] of Object.entries(overrides)) {
      if (o.minus.trim() === '' && o.plus.trim() === '') continue;
      partBands[path] = { minus: Number(o.minus || o.plus) / 100, plus: Number(o.plus || o.minus) / 100 };
    }
    const body = {
      kind: 'tolerance' as const,
      target,
      options: {
        trials: num(trials) as number,
        seed: num(seed),
        distribution,
        resistorTolerance: pct(rTol),
        capacitorTolerance: { minus: pct(cMinus) ?? 0, plus: pct(cPlus) ?? 0 },
        mains: { minus: pct(mains) ?? 0, plus: pct(mains) ?? 0 },
        tubeSpread: pct(tube),
        parts: Object.keys(partBands).length ? partBands : undefined,
      },
    };
    const parsed = createExploreRunSchema.safeParse(body);
    if (!parsed.success) {
      const fe: Record<string, string[]> = {};
      for (const i of parsed.error.issues) (fe[i.path.join('.')] ??= []).push(i.message);
      setLocal(fe);
      return;
    }
    setLocal({});
    onSubmit(body);
  };

  return (
    <form className="space-y-4" onSubmit={(e) => { e.preventDefault(); submit(); }} aria-label="Tolerance run settings">
      <div className="grid grid-cols-2 gap-3 sm:grid-cols-4">
        <label className="space-y-1 text-xs text-muted">Trials (builds)<Input className="num" value={trials} onChange={(e) => setTrials(e.target.value)} aria-invalid={Boolean(errors['options.trials'])} />{err('options.trials')}</label>
        <label className="space-y-1 text-xs text-muted">Seed (blank: new)<Input className="num" value={seed} onChange={(e) => setSeed(e.target.value)} />{err('options.seed')}</label>
        <label className="space-y-1 text-xs text-muted">Spread within a tolerance
          <Select value={distribution} onChange={(e) => setDistribution(e.target.value as 'normal' | 'uniform')}>
            <option value="normal">normal (band = ±3σ)</option>
            <option value="uniform">uniform across the band</option>
          </Select>
        </label>
        <label className="space-y-1 text-xs text-muted">Resistors ±%
          <Select value={rTol} onChange={(e) => setRTol(e.target.value)}>
            <option value="1">1 %</option>
            <option value="5">5 %</option>
            <option value="10">10 %</option>
          </Select>
        </label>
        <label className="space-y-1 text-xs text-muted">Capacitors −%<Input className="num" value={cMinus} onChange={(e) => setCMinus(e.target.value)} />{err('options.capacitorTolerance.minus')}</label>
        <label className="space-y-1 text-xs text-muted">Capacitors +%<Input className="num" value={cPlus} onChange={(e) => setCPlus(e.target.value)} />{err('options.capacitorTolerance.plus')}</label>
        <label className="space-y-1 text-xs text-muted">Mains ±% (all supply voltages)<Input className="num" value={mains} onChange={(e) => setMains(e.target.value)} />{err('options.mains.minus')}</label>
        <label className="space-y-1 text-xs text-muted">Tube spread ±% (plate current at the typical point)<Input className="num" value={tube} onChange={(e) => setTube(e.target.value)} />{err('options.tubeSpread')}</label>
      </div>
      <p className="text-xs text-muted">
        Defaults are common practice: resistors 5 % (1 % and 10 % also usual), capacitors −20/+20 %, mains ±10 %, tubes of one type ±20 % in plate
        current. The tube spread scales each build&apos;s emission (Koren k<sub>G1</sub>), which moves the current at any fixed point by the drawn factor.
      </p>
      {parts.length ? (
        <details className="text-sm">
          <summary className="cursor-pointer text-xs text-muted">Per-part tolerances ({parts.length} parts)</summary>
          <table className="mt-2 w-full text-sm">
            <thead><tr className="text-left text-xs text-muted"><th className="py-1">Part</th><th>Nominal</th><th>−%</th><th>+%</th></tr></thead>
            <tbody>
              {parts.map((p) => (
                <tr key={p.path}>
                  <td className="py-1 pr-2">{p.label}</td>
                  <td className="num pr-2">{formatMetric(p.nominal, p.unit)}</td>
                  <td className="pr-2"><Input className="num h-8 w-20" placeholder={p.kind === 'resistor' ? rTol : cMinus} value={overrides[p.path]?.minus ?? ''} onChange={(e) => setOverrides((o) => ({ ...o, [p.path]: { minus: e.target.value, plus: o[p.path]?.plus ?? '' } }))} aria-label={`${p.label} minus percent`} /></td>
                  <td><Input className="num h-8 w-20" placeholder={p.kind === 'resistor' ? rTol : cPlus} value={overrides[p.path]?.plus ?? ''} onChange={(e) => setOverrides((o) => ({ ...o, [p.path]: { plus: e.target.value, minus: o[p.path]?.minus ?? '' } }))} aria-label={`${p.label} plus percent`} /></td>
                </tr>
              ))}
            </tbody>
          </table>
        </details>
      ) : null}
      {error ? <p role="alert" className="text-sm text-over">{error}</p> : null}
      <Button type="submit" disabled={pending}>{pending ? 'Queueing…' : 'Start tolerance run'}</Button>
    </form>
  );
}

const RATING_WORDS: Record<string, string> = {
  'plate-voltage': 'Plate voltage', 'plate-dissipation': 'Plate dissipation', 'plate-dissipation-full-drive': 'Plate dissipation at full drive', 'screen-voltage': 'Screen voltage',
  'screen-dissipation': 'Screen dissipation', 'cathode-current': 'Cathode current', 'heater-cathode-voltage': 'Heater–cathode voltage', 'grid-resistance': 'Grid-circuit resistance',
};

/** Distributions, rating and bench shares, and the sensitivity ranking of a finished tolerance run. */
export function ToleranceResults({ summary, fileBase }: { summary: ToleranceSummary; fileBase: string }) {
  const [metric, setMetric] = useState(summary.metrics[0]?.key ?? 'plateCurrent');
  const ranking = useMemo(() => summary.sensitivity.find((s) => s.metric === metric)?.ranking ?? [], [summary, metric]);
  const unitOf = (k: string) => summary.metrics.find((m) => m.key === k)?.unit ?? '';
  const rows = summary.metrics.filter((m) => m.stats);
  return (
    <div className="space-y-5" data-testid="tolerance-results">
      <div className="flex flex-wrap gap-x-6 gap-y-2 text-sm">
        <span><span className="num">{summary.completed.toLocaleString('en')}</span> builds{summary.failed ? <> (<span className="num">{summary.failed}</span> could not be analysed)</> : null}</span>
        <span>seed <span className="num">{summary.seed}</span>, {summary.distribution}</span>
        <span>
          Exceed a rating: <Badge tone={summary.overRatingShare > 0.01 ? 'over' : summary.overRatingShare > 0 ? 'near' : 'ok'}>{percent(summary.overRatingShare)}</Badge>
        </span>
        {summary.outsideByBench.length ? (
          <span>
            Outside the bench tolerances: <Badge tone={summary.outsideBenchShare > 0.05 ? 'near' : 'ok'}>{percent(summary.outsideBenchShare)}</Badge>
          </span>
        ) : null}
      </div>
      {summary.overByRating.length ? (
        <ul className="text-xs text-muted">
          {summary.overByRating.map((r) => <li key={r.key}>{RATING_WORDS[r.key] ?? r.key}: <span className="num">{percent(r.share, 2)}</span> of builds over the rating</li>)}
        </ul>
      ) : null}
      {summary.outsideByBench.length ? (
        <ul className="flex flex-wrap gap-x-5 text-xs text-muted" aria-label="Builds outside the bench tolerance, per reading">
          {summary.outsideByBench.map((b) => <li key={b.key}>{b.key.replace(/([A-Z])/g, ' $1').toLowerCase()} (±{(b.tolerance * 100).toFixed(0)} %): <span className="num">{percent(b.share)}</span></li>)}
        </ul>
      ) : null}
      <div className="grid gap-4 md:grid-cols-2 xl:grid-cols-3">
        {rows.map((m) => (
          <div key={m.key} className="rounded-md border border-rule p-3" data-testid={`metric-${m.key}`}>
            <div className="flex items-baseline justify-between gap-2 text-sm">
              <span className="font-medium">{m.label}</span>
              <span className="text-xs text-muted">design <span className="num">{formatMetric(m.nominal, m.unit)}</span></span>
            </div>
            <HistogramChart stats={m.stats!} unit={m.unit} nominal={m.nominal} label={m.label} />
            <p className="num text-xs text-muted">
              {m.stats!.percentiles.map((p) => `p${Math.round(p.p * 100)} ${formatMetric(p.value, m.unit)}`).join(' · ')}
            </p>
          </div>
        ))}
      </div>
      <SortableTable
        caption="Percentiles per result"
        fileName={`${fileBase}-percentiles.csv`}
        rows={rows}
        rowKey={(m) => m.key}
        columns={[
          { key: 'label', label: 'Result', value: (m) => m.label },
          { key: 'unit', label: 'Unit', value: (m) => m.unit },
          { key: 'nominal', label: 'Design', value: (m) => m.nominal, cell: (m) => formatMetric(m.nominal, m.unit), numeric: true },
          ...[0, 1, 2, 3, 4].map((i) => ({
            key: `p${i}`,
            label: `p${[1, 5, 50, 95, 99][i]}`,
            value: (m: (typeof rows)[number]) => m.stats!.percentiles[i]!.value,
            cell: (m: (typeof rows)[number]) => formatMetric(m.stats!.percentiles[i]!.value, m.unit),
            numeric: true,
          })),
          { key: 'std', label: 'Std dev', value: (m) => m.stats!.std, cell: (m) => formatMetric(m.stats!.std, m.unit), numeric: true },
        ]}
      />
      <div className="space-y-2">
        <div className="flex flex-wrap items-center gap-2 text-sm">
          <h3 className="font-medium">Which parts matter most for</h3>
          <Select className="w-auto" value={metric} onChange={(e) => setMetric(e.target.value as typeof metric)} aria-label="Result for the sensitivity ranking">
            {summary.metrics.map((m) => <option key={m.key} value={m.key}>{m.label}</option>)}
          </Select>
        </div>
        <p className="text-xs text-muted">Spearman rank correlation between each drawn factor and the result; the share is ρ² of the total, a rough split of the spread.</p>
        <SortableTable
          caption="Sensitivity ranking"
          fileName={`${fileBase}-sensitivity-${metric}.csv`}
          rows={ranking}
          rowKey={(r) => r.factor}
          columns={[
            { key: 'label', label: 'Part or factor', value: (r) => r.label },
            { key: 'rho', label: 'ρ', value: (r) => r.rho, cell: (r) => r.rho.toFixed(3).replace('-', '−'), numeric: true },
            { key: 'share', label: 'Share', value: (r) => r.share, cell: (r) => percent(r.share), numeric: true },
          ]}
        />
        <p className="sr-only">{unitOf(metric)}</p>
      </div>
    </div>
  );
}
