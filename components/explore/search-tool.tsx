'use client';

import { useRouter } from 'next/navigation';
import { useState } from 'react';
import { Badge } from '@/components/ui/badge';
import { Button } from '@/components/ui/button';
import { Input, Select } from '@/components/ui/input';
import type { Candidate, SearchResult } from '@/lib/calc/explore/search';
import type { StageDTO } from '@/lib/stages/service';
import { createExploreRunSchema, EXPLORE_METRICS, type CreateExploreRunInput } from '@/lib/validation/explore';
import { formatEng } from '@/lib/format/number';
import { formatMetric, METRIC_WORDS, PART_WORDS } from './format';
import { openAsDraft } from './open-draft';
import { SortableTable } from './sortable-table';
import type { PartRow } from './tolerance-tool';
import { TradeoffChart } from './tradeoff-chart';

type Metric = (typeof EXPLORE_METRICS)[number];
type Dir = 'maximize' | 'minimize';
type Free = { on: boolean; min: string; max: string; series: 'E12' | 'E24' | 'E96' };
type Limit = { metric: Metric; op: 'atLeast' | 'atMost'; value: string };

const METRIC_OPTIONS = EXPLORE_METRICS.map((m) => <option key={m} value={m}>{METRIC_WORDS[m]?.label ?? m}</option>);
/** a form value in engineering notation without blanks ('33.3k'), which the schema parses back */
const eng = (v: number) => formatEng(Number(v.toPrecision(3)), '', 3).replace(/\s+/g, '');

/** The part search form: free parts with a range and a series, limits, objective, trade-off axes. */
export function SearchForm({ target, parts, onSubmit, pending, error, fieldErrors }: {
  target: { stageId: number };
  parts: PartRow[];
  onSubmit: (body: CreateExploreRunInput) => void;
  pending: boolean;
  error: string | null;
  fieldErrors?: Record<string, string[]>;
}) {
  const searchable = parts.filter((p) => p.kind === 'resistor');
  const [free, setFree] = useState<Record<string, Free>>(() =>
    Object.fromEntries(searchable.map((p, i) => [p.path, { on: i < 2, min: eng(p.nominal / 3), max: eng(p.nominal * 3), series: 'E24' as const }])),
  );
  const [limits, setLimits] = useState<Limit[]>([
    { metric: 'gain', op: 'atLeast', value: '30' },
    { metric: 'plateDissipationShare', op: 'atMost', value: '70' },
    { metric: 'headroom', op: 'atLeast', value: '2' },
  ]);
  const [objective, setObjective] = useState<{ metric: Metric; direction: Dir }>({ metric: 'thd', direction: 'minimize' });
  const [axisY, setAxisY] = useState<{ metric: Metric; direction: Dir }>({ metric: 'gain', direction: 'maximize' });
  const [outputLevel, setOutputLevel] = useState('');
  const [maxEvaluations, setMaxEvaluations] = useState('100000');
  const [seed, setSeed] = useState('1');
  const [local, setLocal] = useState<Record<string, string[]>>({});
  const errors = { ...local, ...(fieldErrors ?? {}) };
  const firstError = Object.entries(errors)[0];

  const submit = () => {
    const body = {
      kind: 'search' as const,
      target,
      options: {
        free: Object.entries(free).filter(([, f]) => f.on).map(([path, f]) => ({ path, min: f.min, max: f.max, series: f.series })),
        constraints: limits.filter((l) => l.value.trim() !== '').map((l) => ({ metric: l.metric, op: l.op, value: Number(l.value) })),
        objective,
        tradeoff: [objective, axisY] as [typeof objective, typeof axisY],
        outputLevel: outputLevel.trim() === '' ? null : outputLevel,
        maxEvaluations: Number(maxEvaluations),
        seed: seed.trim() === '' ? undefined : Number(seed),
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
    <form className="space-y-4" onSubmit={(e) => { e.preventDefault(); submit(); }} aria-label="Part search settings">
      <fieldset className="space-y-1">
        <legend className="text-xs font-medium text-muted">Free parts (standard values in the range)</legend>
        <table className="w-full text-sm">
          <thead><tr className="text-left text-xs text-muted"><th className="py-1">Free</th><th>Part</th><th>Now</th><th>From</th><th>To</th><th>Series</th></tr></thead>
          <tbody>
            {searchable.map((p) => {
              const f = free[p.path]!;
              const set = (patch: Partial<Free>) => setFree((s) => ({ ...s, [p.path]: { ...f, ...patch } }));
              return (
                <tr key={p.path}>
                  <td className="py-1"><input type="checkbox" checked={f.on} onChange={(e) => set({ on: e.target.checked })} aria-label={`${p.label} is free`} /></td>
                  <td className="pr-2">{p.label}</td>
                  <td className="num pr-2">{formatMetric(p.nominal, p.unit)}</td>
                  <td className="pr-2"><Input className="num h-8 w-24" value={f.min} onChange={(e) => set({ min: e.target.value })} aria-label={`${p.label} lowest value`} /></td>
                  <td className="pr-2"><Input className="num h-8 w-24" value={f.max} onChange={(e) => set({ max: e.target.value })} aria-label={`${p.label} highest value`} /></td>
                  <td><Select className="h-8 w-20" value={f.series} onChange={(e) => set({ series: e.target.value as Free['series'] })} aria-label={`${p.label} series`}><option>E12</option><option>E24</option><option>E96</option></Select></td>
                </tr>
              );
            })}
          </tbody>
        </table>
      </fieldset>
      <fieldset className="space-y-2">
        <legend className="text-xs font-medium text-muted">Targets and limits</legend>
        {limits.map((l, i) => (
          <div key={i} className="flex flex-wrap items-center gap-2">
            <Select className="h-8 w-64" value={l.metric} onChange={(e) => setLimits((ls) => ls.map((x, j) => (j === i ? { ...x, metric: e.target.value as Metric } : x)))} aria-label="Result">{METRIC_OPTIONS}</Select>
            <Select className="h-8 w-28" value={l.op} onChange={(e) => setLimits((ls) => ls.map((x, j) => (j === i ? { ...x, op: e.target.value as Limit['op'] } : x)))} aria-label="Limit kind"><option value="atLeast">at least</option><option value="atMost">at most</option></Select>
            <Input className="num h-8 w-24" value={l.value} onChange={(e) => setLimits((ls) => ls.map((x, j) => (j === i ? { ...x, value: e.target.value } : x)))} aria-label="Limit value (SI units, % for shares)" />
            <span className="text-xs text-muted">{METRIC_WORDS[l.metric]?.unit || 'ratio'}</span>
            <Button type="button" size="sm" variant="ghost" onClick={() => setLimits((ls) => ls.filter((_, j) => j !== i))}>Remove</Button>
          </div>
        ))}
        <Button type="button" size="sm" variant="secondary" onClick={() => setLimits((ls) => [...ls, { metric: 'thd', op: 'atMost', value: '1' }])}>Add a limit</Button>
      </fieldset>
      <div className="grid gap-3 sm:grid-cols-2 lg:grid-cols-4">
        <label className="space-y-1 text-xs text-muted">Objective
          <span className="flex gap-1">
            <Select className="h-8" value={objective.direction} onChange={(e) => setObjective((o) => ({ ...o, direction: e.target.value as Dir }))} aria-label="Objective direction"><option value="maximize">most</option><option value="minimize">least</option></Select>
            <Select className="h-8" value={objective.metric} onChange={(e) => setObjective((o) => ({ ...o, metric: e.target.value as Metric }))} aria-label="Objective result">{METRIC_OPTIONS}</Select>
          </span>
        </label>
        <label className="space-y-1 text-xs text-muted">Trade-off against
          <span className="flex gap-1">
            <Select className="h-8" value={axisY.direction} onChange={(e) => setAxisY((o) => ({ ...o, direction: e.target.value as Dir }))} aria-label="Second objective direction"><option value="maximize">most</option><option value="minimize">least</option></Select>
            <Select className="h-8" value={axisY.metric} onChange={(e) => setAxisY((o) => ({ ...o, metric: e.target.value as Metric }))} aria-label="Second objective result">{METRIC_OPTIONS}</Select>
          </span>
        </label>
        <label className="space-y-1 text-xs text-muted">THD at output (V peak; blank: the stage&apos;s drive)<Input className="num h-8" value={outputLevel} onChange={(e) => setOutputLevel(e.target.value)} /></label>
        <label className="space-y-1 text-xs text-muted">Candidates at most<Input className="num h-8" value={maxEvaluations} onChange={(e) => setMaxEvaluations(e.target.value)} /></label>
        <label className="space-y-1 text-xs text-muted">Seed<Input className="num h-8" value={seed} onChange={(e) => setSeed(e.target.value)} /></label>
      </div>
      <p className="text-xs text-muted">Spaces no larger than the candidate limit are searched exhaustively; larger ones by a genetic search over the series values.</p>
      {firstError ? <p role="alert" className="text-sm text-over">{firstError[0]}: {firstError[1][0]}</p> : null}
      {error ? <p role="alert" className="text-sm text-over">{error}</p> : null}
      <Button type="submit" disabled={pending}>{pending ? 'Queueing…' : 'Start part search'}</Button>
    </form>
  );
}

/** Best candidates (sortable, CSV, open as a draft stage) and the trade-off plot. */
export function SearchResults({ result, stage, canEdit }: { result: SearchResult; stage: StageDTO; canEdit: boolean }) {
  const router = useRouter();
  const [error, setError] = useState<string | null>(null);
  const [busy, setBusy] = useState(false);
  const [ox, oy] = result.tradeoff;
  const unit = (m: string) => METRIC_WORDS[m]?.unit ?? '';
  const label = (m: string) => METRIC_WORDS[m]?.label ?? m;
  const pt = (c: Candidate) => ({ x: c.metrics[ox.metric] ?? NaN, y: c.metrics[oy.metric] ?? NaN });
  const ok = (p: { x: number; y: number }) => Number.isFinite(p.x) && Number.isFinite(p.y);
  const metricKeys = [...new Set([result.objective.metric, ...result.constraints.map((c) => c.metric), ox.metric, oy.metric])];
  const open = async (c: Candidate) => {
    setBusy(true);
    setError(null);
    try {
      const parts = Object.fromEntries(result.free.map((f, i) => [f.path, c.parts[i]!]));
      router.push(await openAsDraft(stage, `${stage.name} (searched)`, { parts }));
    } catch (e) {
      setError(e instanceof Error ? e.message : 'Could not open the draft.');
      setBusy(false);
    }
  };
  return (
    <div className="space-y-5" data-testid="search-results">
      <div className="flex flex-wrap gap-x-6 gap-y-1 text-sm">
        <span>{result.mode === 'exhaustive' ? 'Exhaustive search' : `Genetic search, ${result.generations} generations`}</span>
        <span>space <span className="num">{result.spaceSize.toLocaleString('en')}</span></span>
        <span>analysed <span className="num">{result.evaluations.toLocaleString('en')}</span></span>
        <span>meet every limit <Badge tone={result.feasible ? 'ok' : 'over'}>{result.feasible.toLocaleString('en')}</Badge></span>
      </div>
      {error ? <p role="alert" className="text-sm text-over">{error}</p> : null}
      <SortableTable
        caption="Best candidates"
        fileName={`stage-${stage.id}-part-search.csv`}
        rows={result.best}
        rowKey={(c) => c.index.join('-')}
        columns={[
          ...result.free.map((f, i) => ({
            key: f.path,
            label: `${PART_WORDS[f.path] ?? f.path} (${f.series})`,
            value: (c: Candidate) => c.parts[i] ?? null,
            cell: (c: Candidate) => formatMetric(c.parts[i], f.path.toLowerCase().includes('capacitor') || f.path.includes('Bypass') ? 'F' : 'Ω'),
            numeric: true,
          })),
          ...metricKeys.map((m) => ({ key: m, label: label(m), value: (c: Candidate) => c.metrics[m] ?? null, cell: (c: Candidate) => formatMetric(c.metrics[m], unit(m)), numeric: true })),
          { key: 'feasible', label: 'Limits', value: (c: Candidate) => (c.feasible ? 'met' : 'missed'), cell: (c: Candidate) => <Badge tone={c.feasible ? 'ok' : 'over'}>{c.feasible ? 'met' : 'missed'}</Badge> },
          { key: 'open', label: '', value: () => null, cell: (c: Candidate) => (canEdit ? <Button type="button" size="sm" variant="secondary" disabled={busy} onClick={() => void open(c)}>Open as draft stage</Button> : null) },
        ]}
      />
      <div>
        <h3 className="mb-1 text-sm font-medium">Trade-off: {ox.direction === 'maximize' ? 'most' : 'least'} {label(ox.metric).toLowerCase()} against {oy.direction === 'maximize' ? 'most' : 'least'} {label(oy.metric).toLowerCase()}</h3>
        <TradeoffChart sample={result.sample.map(pt).filter(ok)} front={result.front.map(pt).filter(ok)} xLabel={label(ox.metric)} yLabel={label(oy.metric)} xUnit={unit(ox.metric)} yUnit={unit(oy.metric)} />
      </div>
    </div>
  );
}
