'use client';

import { useEffect, useState } from 'react';
import { z } from 'zod';
import { Button } from '@/components/ui/button';
import { Card, CardBody, CardHeader } from '@/components/ui/card';
import { formatEng } from '@/lib/format/number';
import { ApiRequestError, fetchJson } from '@/lib/hooks/fetch-json';
import { SPLITTER_OUTPUTS, defaultLinks } from '@/lib/calc/chain/network';
import type { ProjectDetail } from '@/lib/projects/service';
import { chainLinkSchema, type ChainLink } from '@/lib/validation/chain';

/** Outputs and inputs of each topology, named as the chain solver names its ports. */
const OUTPUTS: Record<string, string[]> = {
  'common-cathode': ['plate'],
  'pentode-amplifier': ['plate'],
  'cathode-follower': ['cathode'],
  'single-ended-output': ['plate'],
  'push-pull-output': ['plate-to-plate'],
  ...Object.fromEntries(Object.entries(SPLITTER_OUTPUTS).map(([k, v]) => [k, [...v]])),
};
const inputsOf = (topology: string) => (topology === 'push-pull-output' ? ['grid1', 'grid2'] : ['grid']);
const outputsOf = (topology: string) => OUTPUTS[topology] ?? [];

type Row = { from: string; output: string; to: string; input: string; direct: boolean; capacitance: string };

const linksSchema = z.array(chainLinkSchema).max(40);

function toRows(project: ProjectDetail): Row[] {
  const stages = project.stages.map((s) => ({ id: String(s.id), topology: s.topology }));
  const links: ChainLink[] = project.chainLinks ?? defaultLinks(stages);
  const topo = new Map(stages.map((s) => [s.id, s.topology]));
  return links.map((l) => ({
    from: String(l.from),
    output: l.output ?? outputsOf(topo.get(String(l.from)) ?? '')[0] ?? '',
    to: String(l.to),
    input: l.input ?? inputsOf(topo.get(String(l.to)) ?? '')[0] ?? 'grid',
    direct: l.coupling.kind === 'direct',
    capacitance: l.coupling.kind === 'capacitor' ? formatEng(l.coupling.capacitance, '', 4).replace(/\s+/g, '') : '100n',
  }));
}

const selectClass = 'h-8 rounded border border-rule bg-transparent px-1.5 text-sm';

export function ChainLinksEditor({ project, editable, onSaved }: { project: ProjectDetail; editable: boolean; onSaved: (p: ProjectDetail) => void }) {
  const [rows, setRows] = useState<Row[]>(() => toRows(project));
  const [dirty, setDirty] = useState(false);
  const [errors, setErrors] = useState<Record<string, string>>({});
  const [message, setMessage] = useState<{ kind: 'ok' | 'error'; text: string } | null>(null);
  const [busy, setBusy] = useState(false);

  // Another card saved the project: follow it unless something is typed here.
  useEffect(() => {
    if (!dirty) setRows(toRows(project));
    // eslint-disable-next-line react-hooks/exhaustive-deps
  }, [project.version, project.chainLinks, project.stages]);

  if (project.stages.length < 2) return null;
  const stage = new Map(project.stages.map((s) => [String(s.id), s]));
  const update = (i: number, patch: Partial<Row>) => {
    setRows((rs) => rs.map((r, j) => (j === i ? { ...r, ...patch } : r)));
    setDirty(true);
    setMessage(null);
  };

  const send = async (chainLinks: unknown) => {
    setBusy(true);
    setMessage(null);
    try {
      const r = await fetchJson<{ project: ProjectDetail }>(`/api/projects/${project.id}`, { method: 'PATCH', body: { version: project.version, chainLinks } });
      setDirty(false);
      setErrors({});
      setRows(toRows(r.project));
      onSaved(r.project);
      setMessage({ kind: 'ok', text: r.project.chainLinks ? 'Links saved.' : 'Stages are coupled in their default order.' });
    } catch (err) {
      if (err instanceof ApiRequestError && err.status === 409) {
        setMessage({ kind: 'error', text: 'Someone else changed this project meanwhile. Reload the page to see their changes, then apply yours again.' });
      } else {
        if (err instanceof ApiRequestError && err.fieldErrors) {
          setErrors(Object.fromEntries(Object.entries(err.fieldErrors).map(([k, v]) => [k.replace(/^chainLinks\./, ''), v[0] ?? ''])));
        }
        setMessage({ kind: 'error', text: err instanceof Error ? err.message : 'Could not save the links.' });
      }
    } finally {
      setBusy(false);
    }
  };

  const save = () => {
    const body = rows.map((r) => ({
      from: r.from,
      output: r.output || undefined,
      to: r.to,
      input: r.input || undefined,
      coupling: r.direct ? { kind: 'direct' as const } : { kind: 'capacitor' as const, capacitance: r.capacitance },
    }));
    const parsed = linksSchema.safeParse(body);
    if (!parsed.success) {
      setErrors(Object.fromEntries(parsed.error.issues.map((i) => [i.path.join('.'), i.message])));
      setMessage({ kind: 'error', text: 'Check the marked links.' });
      return;
    }
    setErrors({});
    void send(body);
  };

  const first = project.stages[0]!;
  const second = project.stages[1]!;
  return (
    <Card data-testid="chain-links-editor">
      <CardHeader
        title="Links"
        actions={dirty ? <span className="text-xs text-near">unsaved changes</span> : project.chainLinks ? <span className="text-xs text-muted">stored links</span> : <span className="text-xs text-muted">default order</span>}
      />
      <CardBody>
        <fieldset disabled={!editable || busy} className="space-y-2">
          <p className="text-xs text-muted">Each link joins a stage’s output to a later stage’s input, through a coupling capacitor or directly (DC-coupled).</p>
          {rows.map((r, i) => {
            const err = (f: string) => errors[`${i}.${f}`];
            const fromTopo = stage.get(r.from)?.topology ?? '';
            const toTopo = stage.get(r.to)?.topology ?? '';
            const capErr = err('coupling.capacitance') ?? err('coupling');
            return (
              <div key={i} className="flex flex-wrap items-center gap-1.5 text-sm" data-testid="chain-link-row">
                <select aria-label={`Link ${i + 1} from stage`} className={selectClass} value={r.from} onChange={(e) => update(i, { from: e.target.value, output: outputsOf(stage.get(e.target.value)?.topology ?? '')[0] ?? '' })}>
                  {project.stages.map((s) => <option key={s.id} value={String(s.id)}>{s.name}</option>)}
                </select>
                <select aria-label={`Link ${i + 1} output`} className={selectClass} value={r.output} onChange={(e) => update(i, { output: e.target.value })}>
                  {outputsOf(fromTopo).map((o) => <option key={o} value={o}>{o}</option>)}
                </select>
                <span aria-hidden>→</span>
                <select aria-label={`Link ${i + 1} to stage`} className={selectClass} value={r.to} onChange={(e) => update(i, { to: e.target.value, input: inputsOf(stage.get(e.target.value)?.topology ?? '')[0] ?? 'grid' })}>
                  {project.stages.map((s) => <option key={s.id} value={String(s.id)}>{s.name}</option>)}
                </select>
                <select aria-label={`Link ${i + 1} input`} className={selectClass} value={r.input} onChange={(e) => update(i, { input: e.target.value })}>
                  {inputsOf(toTopo).map((o) => <option key={o} value={o}>{o}</option>)}
                </select>
                <label className="ml-2 flex items-center gap-1 text-xs">
                  <input type="checkbox" checked={r.direct} onChange={(e) => update(i, { direct: e.target.checked })} /> direct
                </label>
                {!r.direct ? (
                  <label className="flex items-center gap-1 text-xs">
                    C
                    <input aria-label={`Link ${i + 1} coupling capacitor`} aria-invalid={Boolean(capErr)} className={`${selectClass} num w-20`} value={r.capacitance} onChange={(e) => update(i, { capacitance: e.target.value })} />
                    F
                  </label>
                ) : null}
                {editable ? (
                  <Button type="button" variant="ghost" size="sm" aria-label={`Remove link ${i + 1}`} onClick={() => { setRows((rs) => rs.filter((_, j) => j !== i)); setDirty(true); }}>✕</Button>
                ) : null}
                {[capErr, err('from'), err('to'), err('output'), err('input')].filter(Boolean).map((m, k) => (
                  <span key={k} role="alert" className="w-full text-xs text-over">{m}</span>
                ))}
              </div>
            );
          })}
          {editable ? (
            <div className="flex flex-wrap gap-2 pt-1">
              <Button type="button" variant="ghost" size="sm" onClick={() => { setRows((rs) => [...rs, { from: String(first.id), output: outputsOf(first.topology)[0] ?? '', to: String(second.id), input: inputsOf(second.topology)[0]!, direct: false, capacitance: '100n' }]); setDirty(true); }}>
                Add link
              </Button>
              <Button type="button" variant="ghost" size="sm" disabled={!project.chainLinks && !dirty} onClick={() => void send(null)}>
                Use the default order
              </Button>
              <Button type="button" size="sm" disabled={!dirty} onClick={save}>
                Save links
              </Button>
            </div>
          ) : null}
          {message ? <p role={message.kind === 'error' ? 'alert' : 'status'} className={`text-xs ${message.kind === 'error' ? 'text-over' : 'text-ok'}`}>{message.text}</p> : null}
        </fieldset>
      </CardBody>
    </Card>
  );
}
