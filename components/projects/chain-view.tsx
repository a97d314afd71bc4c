'use client';

import { useQuery } from '@tanstack/react-query';
import dynamic from 'next/dynamic';
import { useEffect, useState } from 'react';
import { Badge, StatusBadge } from '@/components/ui/badge';
import { Card, CardBody, CardHeader } from '@/components/ui/card';
import { Input } from '@/components/ui/input';
import type { ChainResult, ChainStageResult } from '@/lib/calc/chain';
import type { ProjectDetail } from '@/lib/projects/service';
import { fetchJson } from '@/lib/hooks/fetch-json';
import { LIMIT_WORDS } from '@/lib/report/labels';
import { formatEng, formatRatio } from '@/lib/format/number';
import { cn } from '@/lib/utils';
import { ChainLevels } from './chain-levels';
import { chainQuerySchema } from '@/lib/validation/project';

// The feedback panel (and its charts) sits below the chain table: fetched when the page has shown.
const FeedbackPanel = dynamic(() => import('@/components/projects/feedback-panel').then((m) => m.FeedbackPanel), { ssr: false });

function Num({ v, unit, digits = 3, className }: { v: number | null | undefined; unit: string; digits?: number; className?: string }) {
  return <span className={cn('num', className)}>{typeof v === 'number' && Number.isFinite(v) ? formatEng(v, unit, digits) : '–'}</span>;
}

export function ChainView({ project }: { project: ProjectDetail }) {
  const [text, setText] = useState('100m');
  const [input, setInput] = useState(0.1);
  const parsed = chainQuerySchema.safeParse({ input: text });
  const fieldError = parsed.success ? null : (parsed.error.issues[0]?.message ?? 'Not a level');
  useEffect(() => {
    if (!parsed.success) return;
    const t = setTimeout(() => setInput(parsed.data.input), 300);
    return () => clearTimeout(t);
  }, [text]); // eslint-disable-line react-hooks/exhaustive-deps

  const chain = useQuery<ChainResult>({
    queryKey: ['project', project.id, 'chain', input, project.updatedAt],
    queryFn: ({ signal }) => fetchJson<{ chain: ChainResult }>(`/api/projects/${project.id}/chain?input=${input}`, { signal }).then((r) => r.chain),
    placeholderData: (prev: ChainResult | undefined) => prev,
    retry: false,
  });
  const c = chain.data;

  return (
    <>
      <Card data-testid="chain-view">
        <CardHeader
          title="Signal chain and supply"
          actions={
            <label className="flex items-center gap-2 text-xs text-muted" htmlFor="chain-input">
              Chain input
              <Input id="chain-input" className="num h-8 w-24" value={text} onChange={(e) => setText(e.target.value)} aria-invalid={Boolean(fieldError)} aria-describedby={fieldError ? 'chain-input-error' : undefined} />
              V rms
              {chain.isFetching ? <span className="text-muted" aria-live="polite">updating…</span> : null}
            </label>
          }
        />
        <CardBody className="space-y-5">
          {fieldError ? <p id="chain-input-error" role="alert" className="text-xs text-over">Chain input {fieldError}</p> : null}
          {chain.isError ? <p role="alert" className="text-sm text-over">{chain.error.message}</p> : null}
          {!c ? (
            <div className="h-40 animate-pulse rounded bg-rule/30" aria-busy="true" />
          ) : c.stages.length === 0 ? (
            <p className="text-sm text-muted">No stages yet: the chain is empty.</p>
          ) : (
            <>
              <ChainSummary c={c} />
              <ol className="flex flex-wrap items-stretch gap-y-3" data-testid="chain-stages">
                {c.stages.map((s, i) => (
                  <li key={s.stageId} className="flex items-stretch">
                    {i > 0 ? <span aria-hidden className="flex items-center px-1.5 text-lg text-muted">→</span> : null}
                    <StageBlock s={s} first={c.firstClip?.stageId === s.stageId} upstreamClipped={c.stages.slice(0, i).some((u) => u.clipping)} />
                  </li>
                ))}
              </ol>
              {c.endToEnd ? <ChainLevels analysis={c.endToEnd} stale={chain.isFetching} /> : null}
            </>
          )}
          {c ? <SupplyResult c={c} project={project} /> : null}
          {c && c.warnings.length ? (
            <ul className="space-y-1 text-sm text-near" data-testid="chain-warnings">
              {c.warnings.map((w, i) => (
                <li key={i}>⚠ {w}</li>
              ))}
            </ul>
          ) : null}
        </CardBody>
      </Card>
      <FeedbackPanel projectId={project.id} inputRms={input} version={`${project.updatedAt}|${project.stages.map((s) => `${s.id}:${s.version}`).join(',')}`} />
    </>
  );
}

function ChainSummary({ c }: { c: ChainResult }) {
  return (
    <dl className="grid gap-3 text-sm sm:grid-cols-3">
      <div className="rounded-md border border-rule bg-paper/50 px-3 py-2">
        <dt className="text-xs text-muted">Whole-chain gain</dt>
        <dd className="num text-base">
          {c.totalGain !== null ? `× ${formatRatio(c.totalGain, 4)}` : '–'}
          {c.totalGainDb !== null ? <span className="ml-2 text-muted">{c.totalGainDb.toFixed(1)} dB</span> : null}
        </dd>
      </div>
      <div className="rounded-md border border-rule bg-paper/50 px-3 py-2">
        <dt className="text-xs text-muted">Output at <Num v={c.inputRms} unit="V" /> rms in</dt>
        {c.firstClip && c.firstClip.chainInputRms < c.inputRms ? (
          <dd>
            <Num v={c.outputRms} unit="V" /> rms <b className="text-over">clipped</b>
            <span className="text-xs text-muted">
              {' '}· largest clean output <Num v={c.endToEnd?.sweep?.clip ? c.endToEnd.sweep.clip.outputAmplitude / Math.SQRT2 : null} unit="V" /> rms
            </span>
          </dd>
        ) : (
          <dd className="text-base"><Num v={c.outputRms} unit="V" /> rms</dd>
        )}
      </div>
      <div className={cn('rounded-md border px-3 py-2', c.firstClip && c.firstClip.chainInputRms < c.inputRms ? 'border-over/50 bg-over/5' : 'border-rule bg-paper/50')}>
        <dt className="text-xs text-muted">Clips first</dt>
        <dd data-testid="first-clip">
          {c.firstClip ? (
            <>
              <b>{c.firstClip.name}</b> from <Num v={c.firstClip.chainInputRms} unit="V" /> rms at the input
              <span className="text-xs text-muted"> ({LIMIT_WORDS[c.firstClip.limitedBy] ?? c.firstClip.limitedBy})</span>
            </>
          ) : (
            <span className="text-muted">no stage reports a limit</span>
          )}
        </dd>
      </div>
    </dl>
  );
}

function StageBlock({ s, first, upstreamClipped }: { s: ChainStageResult; first: boolean; upstreamClipped: boolean }) {
  const use = s.inputRms !== null && s.maxDrivePeak ? (s.inputRms * Math.SQRT2) / s.maxDrivePeak : null;
  return (
    <div className={cn('w-56 rounded-md border bg-sheet px-3 py-2 text-sm', s.clipping ? 'border-over' : first ? 'border-near' : 'border-rule')} data-testid="chain-stage">
      <div className="flex items-start justify-between gap-2">
        <span className="font-medium leading-tight">
          <span className="num mr-1 text-muted">{s.position}</span>
          {s.name}
        </span>
        {s.worstRating ? <StatusBadge status={s.worstRating} /> : null}
      </div>
      {s.error ? (
        <p className="mt-1 text-xs text-over">{s.error.message}</p>
      ) : (
        <dl className="mt-1.5 grid grid-cols-[auto_1fr] gap-x-2 gap-y-0.5 text-xs">
          <dt className="text-muted">Gain</dt>
          <dd className="num text-right">{s.gain !== null ? `× ${formatRatio(Math.abs(s.gain))}${s.gain < 0 ? ' (inv.)' : ''}` : '–'}</dd>
          <dt className="text-muted">At its grid</dt>
          <dd className="whitespace-nowrap text-right"><Num v={s.inputRms} unit="V" /> rms{upstreamClipped ? <span className="text-muted"> (clipped before)</span> : null}</dd>
          <dt className="text-muted">Output</dt>
          <dd className="whitespace-nowrap text-right"><Num v={s.outputRms} unit="V" /> rms{s.clipping ? <b className="text-over"> clipped</b> : null}</dd>
          <dt className="text-muted">Headroom</dt>
          <dd className="text-right"><Num v={s.maxDrivePeak} unit="V" /> pk</dd>
          <dt className="text-muted">Clips from</dt>
          <dd className="text-right"><Num v={s.clipsAtChainInputRms} unit="V" /> in</dd>
          <dt className="text-muted">B+</dt>
          <dd className="text-right">
            <Num v={s.assumedSupply} unit="V" />
            {s.solvedSupply !== null ? <> → <Num v={s.solvedSupply} unit="V" digits={4} className="font-semibold" /></> : null}
          </dd>
          <dt className="text-muted">Draws</dt>
          <dd className="text-right"><Num v={s.supplyCurrent} unit="A" /> {s.supplyNode ? <span className="num text-muted">@{s.supplyNode}</span> : null}</dd>
        </dl>
      )}
      {use !== null && !upstreamClipped ? (
        <div className="mt-2" title="Signal at the grid as a share of the stage's headroom">
          <div className="h-1.5 overflow-hidden rounded bg-rule/60">
            <div className={cn('h-full', use >= 1 ? 'bg-over' : use >= 0.7 ? 'bg-near' : 'bg-ok')} style={{ width: `${Math.min(100, use * 100)}%` }} />
          </div>
          <div className="mt-0.5 text-[11px] text-muted">
            {use >= 1 ? <b className="text-over">clips</b> : use >= 0.7 ? <span className="text-near">near clipping</span> : 'within headroom'} · <span className="num">{Math.round(use * 100)} %</span> of headroom
          </div>
        </div>
      ) : null}
    </div>
  );
}

function SupplyResult({ c, project }: { c: ChainResult; project: ProjectDetail }) {
  const sup = c.supply;
  const names = new Map(c.stages.map((s) => [s.stageId, s.name]));
  return (
    <div className="grid gap-5 xl:grid-cols-[2fr_1fr]">
      <div>
        <h3 className="mb-1.5 text-sm font-semibold">B+ nodes (solved with the stages’ currents)</h3>
        {!sup ? (
          <p className="text-sm text-muted">
            {c.supplyError ? <span className="text-over">{c.supplyError.message}</span> : (project.supply.nodes ?? []).length ? 'Give the raw B+ to solve the nodes.' : 'No B+ nodes yet: each stage keeps its own assumed supply.'}
          </p>
        ) : (
          <>
            <p className="mb-2 text-xs text-muted">
              Raw <Num v={sup.rawVoltage} unit="V" /> behind <Num v={sup.sourceResistance} unit="Ω" /> → <Num v={sup.loadedVoltage} unit="V" digits={4} /> at <Num v={sup.totalCurrent} unit="A" /> total ·{' '}
              {sup.converged ? <>settled in <span className="num">{sup.iterations}</span> iterations (last change <Num v={sup.residual} unit="V" />)</> : <b className="text-over">not settled</b>}
            </p>
            <div className="overflow-x-auto rounded-md border border-rule">
              <table className="w-full text-sm" data-testid="supply-nodes">
                <thead className="border-b border-rule text-left text-xs text-muted">
                  <tr>
                    <th className="px-2.5 py-1.5 font-medium">Node</th>
                    <th className="px-2.5 py-1.5 text-right font-medium">Dropping R</th>
                    <th className="px-2.5 py-1.5 text-right font-medium">Filter C</th>
                    <th className="px-2.5 py-1.5 text-right font-medium">Voltage</th>
                    <th className="px-2.5 py-1.5 text-right font-medium">Current in</th>
                    <th className="px-2.5 py-1.5 text-right font-medium">Drawn here</th>
                    <th className="px-2.5 py-1.5 text-right font-medium">R drop / power</th>
                    <th className="px-2.5 py-1.5 font-medium">Stages</th>
                  </tr>
                </thead>
                <tbody className="divide-y divide-rule">
                  {sup.nodes.map((n) => (
                    <tr key={n.key}>
                      <td className="px-2.5 py-1.5"><span className="num font-semibold">{n.key}</span> <span className="text-xs text-muted">{n.name}</span></td>
                      <td className="whitespace-nowrap px-2.5 py-1.5 text-right"><Num v={n.droppingResistor} unit="Ω" /></td>
                      <td className="whitespace-nowrap px-2.5 py-1.5 text-right"><Num v={n.filterCapacitor} unit="F" /></td>
                      <td className="whitespace-nowrap px-2.5 py-1.5 text-right font-semibold"><Num v={n.voltage} unit="V" digits={4} /></td>
                      <td className="whitespace-nowrap px-2.5 py-1.5 text-right"><Num v={n.currentIn} unit="A" /></td>
                      <td className="whitespace-nowrap px-2.5 py-1.5 text-right"><Num v={n.stageCurrent} unit="A" /></td>
                      <td className="whitespace-nowrap px-2.5 py-1.5 text-right"><Num v={n.drop} unit="V" /> / <Num v={n.resistorPower} unit="W" /></td>
                      <td className="px-2.5 py-1.5 text-xs">{n.stageIds.map((id) => names.get(id)).join(', ') || '–'}</td>
                    </tr>
                  ))}
                </tbody>
              </table>
            </div>
          </>
        )}
      </div>
      <div>
        <h3 className="mb-1.5 text-sm font-semibold">Heaters</h3>
        {c.heaters.length === 0 ? (
          <p className="text-sm text-muted">No heater supplies defined.</p>
        ) : (
          <ul className="space-y-2" data-testid="heater-totals">
            {c.heaters.map((h) => (
              <li key={h.key} className="rounded-md border border-rule px-3 py-2 text-sm">
                <div className="flex justify-between gap-2">
                  <span className="font-medium">{h.name}</span>
                  <span><Num v={h.current} unit="A" className="font-semibold" /> · <Num v={h.power} unit="W" /></span>
                </div>
                <div className="text-xs text-muted">
                  <Num v={h.voltage} unit="V" /> · {h.loads.length ? h.loads.map((l) => `${l.designation} ${formatEng(l.current, 'A')}`).join(', ') : 'nothing on it'}
                </div>
              </li>
            ))}
          </ul>
        )}
        {c.unassignedHeaters.length ? (
          <p className="mt-2 text-xs text-near">
            <Badge tone="near">unassigned</Badge> {c.unassignedHeaters.map((u) => `${u.designation}${u.voltage ? ` (${formatEng(u.voltage, 'V')})` : ''}`).join(', ')}
          </p>
        ) : null}
        <p className="mt-2 text-xs text-muted">Each stage counts its own section’s share of a shared envelope; a 12.6 V centre-tapped heater counts as wired in parallel on a 6.3 V supply.</p>
      </div>
    </div>
  );
}
