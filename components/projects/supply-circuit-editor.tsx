'use client';

// The project's supply as a circuit: mains winding → rectifier → reservoir → sections → nodes, edited as a chain
// of sections, with every node's idle and full-drive voltage and ripple (solved with the stages it feeds), a plot
// of the reservoir and the last node over a few mains cycles, the ratings and the cautions.
import { zodResolver } from '@hookform/resolvers/zod';
import { useQuery } from '@tanstack/react-query';
import { useEffect, useMemo, useState } from 'react';
import { useFieldArray, useForm, type FieldErrors } from 'react-hook-form';
import { CartesianGrid, Line, LineChart, XAxis, YAxis } from 'recharts';
import { AXIS_LABEL, AXIS_LINE, COLORS, ChartFrame, ChartLegend, GRID, TICK, niceTicks, tickNumber } from '@/components/charts/chart-parts';
import { Badge, StatusBadge } from '@/components/ui/badge';
import { Button } from '@/components/ui/button';
import { Card, CardBody, CardHeader } from '@/components/ui/card';
import { Field } from '@/components/ui/field';
import { Input } from '@/components/ui/input';
import type { ChainResult } from '@/lib/calc/chain';
import { circuitNodes, ladderToCircuit } from '@/lib/calc/supply/ladder';
import { SILICON_DIODES, VACUUM_RECTIFIERS } from '@/lib/calc/supply/rectifiers';
import type { SupplyResult } from '@/lib/calc/supply/types';
import { formatEng } from '@/lib/format/number';
import { ApiRequestError, fetchJson } from '@/lib/hooks/fetch-json';
import type { ProjectDetail } from '@/lib/projects/service';
import { cn } from '@/lib/utils';
import { supplyCircuitSchema, type SupplyCircuitBody, type SupplyCircuitInput } from '@/lib/validation/supply';
import { SupplyEditor } from './supply-editor';

const show = (v: number | undefined | null) => (typeof v === 'number' ? formatEng(v, '', 4) : '');
const V = (v: number | null | undefined) => (typeof v === 'number' && Number.isFinite(v) ? formatEng(v, 'V') : '–');

function toForm(c: SupplyCircuitBody): SupplyCircuitInput {
  return {
    mains: { voltage: show(c.mains.voltage), frequency: c.mains.frequency, variation: c.mains.variation ?? 0.1 },
    secondary: {
      voltage: show(c.secondary.voltage),
      resistance: show(c.secondary.resistance),
      primaryResistance: c.secondary.primaryResistance === undefined ? undefined : show(c.secondary.primaryResistance),
      currentRating: c.secondary.currentRating === undefined ? undefined : show(c.secondary.currentRating),
    },
    rectifier: { kind: c.rectifier.kind, type: c.rectifier.type ?? (c.rectifier.kind === 'vacuum' ? '5AR4' : '1N4007') },
    reservoir: c.reservoir ? { ...c.reservoir, capacitance: show(c.reservoir.capacitance), voltageRating: c.reservoir.voltageRating === undefined ? undefined : show(c.reservoir.voltageRating) } : null,
    sections: c.sections.map((s) =>
      s.kind === 'resistor'
        ? { kind: 'resistor', resistance: show(s.resistance), powerRating: s.powerRating === undefined ? undefined : show(s.powerRating) }
        : s.kind === 'choke'
          ? { kind: 'choke', inductance: show(s.inductance), resistance: show(s.resistance), currentRating: s.currentRating === undefined ? undefined : show(s.currentRating) }
          : { ...s, capacitance: show(s.capacitance), voltageRating: s.voltageRating === undefined ? undefined : show(s.voltageRating) },
    ),
    loads: c.loads.map((l) => ({ ...l, resistance: l.resistance === undefined ? undefined : show(l.resistance), current: l.current === undefined ? undefined : show(l.current) })),
  } as SupplyCircuitInput;
}

/** Empty optional text fields mean "not given". */
function clean(values: SupplyCircuitInput): SupplyCircuitInput {
  return JSON.parse(JSON.stringify(values, (_k, v) => (v === '' ? undefined : v))) as SupplyCircuitInput;
}

export function SupplyCircuitEditor({ project, editable, onSaved }: { project: ProjectDetail; editable: boolean; onSaved: (p: ProjectDetail) => void }) {
  const [converting, setConverting] = useState(false);
  const circuit = project.supplyCircuit;
  if (!circuit && !converting) {
    return (
      <Card data-testid="supply-circuit-editor">
        <CardHeader title="Supply" actions={editable ? <Button size="sm" onClick={() => setConverting(true)}>Model the supply as a circuit</Button> : null} />
        <CardBody className="space-y-3">
          <p className="text-sm text-muted">
            This project’s supply is a resistor ladder behind a fixed raw B+. Modelling it as a circuit (mains winding, rectifier,
            reservoir, chokes and resistors) gives ripple, sag at full drive, the turn-on peak each capacitor sees and the rectifier’s
            ratings. The ladder below is used until then.
          </p>
        </CardBody>
        <SupplyEditor project={project} editable={editable} onSaved={onSaved} />
      </Card>
    );
  }
  return <CircuitForm project={project} editable={editable} onSaved={(p) => { setConverting(false); onSaved(p); }} initial={circuit ?? (ladderToCircuit(project.supply) as SupplyCircuitBody)} unsaved={!circuit} />;
}

function CircuitForm({ project, editable, onSaved, initial, unsaved }: { project: ProjectDetail; editable: boolean; onSaved: (p: ProjectDetail) => void; initial: SupplyCircuitBody; unsaved: boolean }) {
  const form = useForm<SupplyCircuitInput, unknown, SupplyCircuitBody>({ resolver: zodResolver(supplyCircuitSchema), defaultValues: toForm(initial) });
  const sections = useFieldArray({ control: form.control, name: 'sections' });
  const loads = useFieldArray({ control: form.control, name: 'loads' });
  const [error, setError] = useState<string | null>(null);
  const [saved, setSaved] = useState(false);
  const [drive, setDrive] = useState<'idle' | 'fullDrive'>('fullDrive');
  const { errors, isSubmitting, isDirty } = form.formState;
  useEffect(() => {
    if (!form.formState.isDirty && project.supplyCircuit) form.reset(toForm(project.supplyCircuit));
  }, [project.version]); // eslint-disable-line react-hooks/exhaustive-deps

  const chain = useQuery<ChainResult>({
    queryKey: ['project', project.id, 'chain', 0.1, project.updatedAt],
    queryFn: ({ signal }) => fetchJson<{ chain: ChainResult }>(`/api/projects/${project.id}/chain?input=0.1`, { signal }).then((r) => r.chain),
    placeholderData: (prev: ChainResult | undefined) => prev,
    retry: false,
    enabled: !!project.supplyCircuit,
  });
  const result: SupplyResult | undefined = project.supplyCircuit ? chain.data?.supply?.circuit : undefined;

  const kind = form.watch('rectifier.kind');
  const hasReservoir = form.watch('reservoir') !== null && form.watch('reservoir') !== undefined;
  const watchedSections = form.watch('sections');
  const nodeOfSection = useMemo(() => {
    let n = hasReservoir ? 1 : 0;
    return (watchedSections ?? []).map((s) => (s?.kind === 'capacitor' ? n++ : null));
  }, [watchedSections, hasReservoir]);

  const onSubmit = form.handleSubmit(async (values) => {
    setError(null);
    setSaved(false);
    try {
      const r = await fetchJson<{ project: ProjectDetail }>(`/api/projects/${project.id}`, { method: 'PATCH', body: { version: project.version, supplyCircuit: clean(values as unknown as SupplyCircuitInput) } });
      form.reset(toForm(r.project.supplyCircuit!));
      onSaved(r.project);
      setSaved(true);
    } catch (err) {
      if (err instanceof ApiRequestError && err.fieldErrors) {
        for (const [k, v] of Object.entries(err.fieldErrors)) form.setError(k.replace(/^supplyCircuit\.?/, '') as 'mains', { message: v[0] });
      }
      setError(err instanceof Error ? err.message : 'Could not save the supply.');
    }
  });
  const backToLadder = async () => {
    setError(null);
    try {
      const r = await fetchJson<{ project: ProjectDetail }>(`/api/projects/${project.id}`, { method: 'PATCH', body: { version: project.version, supplyCircuit: null } });
      onSaved(r.project);
    } catch (err) {
      setError(err instanceof Error ? err.message : 'Could not change the supply.');
    }
  };

  const secErr = (i: number, f: string) => ((errors.sections as FieldErrors<SupplyCircuitInput>['sections'])?.[i] as Record<string, { message?: string }> | undefined)?.[f]?.message ?? ((errors.sections as unknown as Record<number, { message?: string }>)?.[i]?.message);
  const ro = !editable;
  const types = kind === 'vacuum' ? VACUUM_RECTIFIERS.map((r) => ({ type: r.type, label: r.label })) : SILICON_DIODES.map((d) => ({ type: d.type, label: d.label }));

  return (
    <Card data-testid="supply-circuit-editor">
      <CardHeader
        title="Supply"
        actions={
          <div className="flex items-center gap-2">
            {unsaved ? <Badge tone="near">not saved yet</Badge> : null}
            {chain.isFetching ? <span className="text-xs text-muted">solving…</span> : null}
            {editable && project.supplyCircuit ? <Button size="sm" variant="ghost" onClick={backToLadder}>Back to the ladder</Button> : null}
          </div>
        }
      />
      <CardBody className="space-y-4">
        {/* the page's own <Caution /> sits above; these are the supply's specific cautions */}
        <SafetyNotes result={result} />
        <form onSubmit={onSubmit} noValidate className="space-y-4">
          <fieldset disabled={ro} className="grid gap-3 md:grid-cols-3">
            <div className="space-y-2 rounded-md border border-rule p-3">
              <h3 className="text-xs font-semibold text-muted">Mains</h3>
              <Field label="Mains voltage (rms)" htmlFor="sc-mains-v" unit="V" error={errors.mains?.voltage?.message}>
                <Input id="sc-mains-v" className="num" {...form.register('mains.voltage')} />
              </Field>
              <Field label="Frequency" htmlFor="sc-mains-f" unit="Hz" error={errors.mains?.frequency?.message}>
                <select id="sc-mains-f" className="h-8 w-full rounded-md border border-rule bg-sheet px-2 text-sm" {...form.register('mains.frequency', { setValueAs: (v) => Number(v) })}>
                  <option value={50}>50</option>
                  <option value={60}>60</option>
                </select>
              </Field>
              <Field label="Mains variation (fraction)" htmlFor="sc-mains-var" hint="0.1 = ±10 % (common practice)" error={errors.mains?.variation?.message}>
                <Input id="sc-mains-var" className="num" {...form.register('mains.variation', { setValueAs: (v) => (v === '' ? undefined : Number(v)) })} />
              </Field>
            </div>
            <div className="space-y-2 rounded-md border border-rule p-3">
              <h3 className="text-xs font-semibold text-muted">Transformer secondary</h3>
              <Field label={kind === 'silicon-bridge' ? 'Secondary voltage (rms, whole winding)' : 'Secondary voltage (rms, each half)'} htmlFor="sc-sec-v" unit="V" error={errors.secondary?.voltage?.message}>
                <Input id="sc-sec-v" className="num" {...form.register('secondary.voltage')} />
              </Field>
              <Field label="Winding resistance" htmlFor="sc-sec-r" unit="Ω" error={errors.secondary?.resistance?.message}>
                <Input id="sc-sec-r" className="num" {...form.register('secondary.resistance')} />
              </Field>
              <Field label="Primary resistance" htmlFor="sc-pri-r" unit="Ω" hint="referred with the turns ratio squared" error={errors.secondary?.primaryResistance?.message}>
                <Input id="sc-pri-r" className="num" {...form.register('secondary.primaryResistance')} />
              </Field>
              <Field label="Current rating (rms)" htmlFor="sc-sec-i" unit="A" error={errors.secondary?.currentRating?.message}>
                <Input id="sc-sec-i" className="num" {...form.register('secondary.currentRating')} />
              </Field>
            </div>
            <div className="space-y-2 rounded-md border border-rule p-3">
              <h3 className="text-xs font-semibold text-muted">Rectifier and input</h3>
              <Field label="Rectifier" htmlFor="sc-rect" error={errors.rectifier?.kind?.message}>
                <select
                  id="sc-rect"
                  className="h-8 w-full rounded-md border border-rule bg-sheet px-2 text-sm"
                  {...form.register('rectifier.kind', {
                    onChange: (e) => form.setValue('rectifier.type', e.target.value === 'vacuum' ? '5AR4' : '1N4007'),
                  })}
                >
                  <option value="silicon-bridge">Silicon bridge</option>
                  <option value="silicon-centre-tap">Silicon, full-wave centre tap</option>
                  <option value="vacuum">Vacuum full-wave (centre tap)</option>
                </select>
              </Field>
              <Field label="Type" htmlFor="sc-rect-type" error={errors.rectifier?.type?.message}>
                <select id="sc-rect-type" className="h-8 w-full rounded-md border border-rule bg-sheet px-2 text-sm" {...form.register('rectifier.type')}>
                  {types.map((t) => (
                    <option key={t.type} value={t.type}>{t.label}</option>
                  ))}
                </select>
              </Field>
              <label className="flex items-center gap-2 text-sm">
                <input
                  type="checkbox"
                  checked={hasReservoir}
                  onChange={(e) => form.setValue('reservoir', e.target.checked ? { capacitance: '47u', key: 'B+1', name: 'Reservoir' } : null, { shouldDirty: true })}
                />
                Capacitor input (reservoir); unticked: choke input
              </label>
              {hasReservoir ? (
                <div className="grid grid-cols-2 gap-2">
                  <Field label="Reservoir" htmlFor="sc-res-c" unit="F" error={errors.reservoir?.capacitance?.message ?? errors.reservoir?.message}>
                    <Input id="sc-res-c" className="num" {...form.register('reservoir.capacitance')} />
                  </Field>
                  <Field label="Rated" htmlFor="sc-res-v" unit="V" error={errors.reservoir?.voltageRating?.message}>
                    <Input id="sc-res-v" className="num" {...form.register('reservoir.voltageRating')} />
                  </Field>
                  <Field label="Node key" htmlFor="sc-res-key" error={errors.reservoir?.key?.message}>
                    <Input id="sc-res-key" {...form.register('reservoir.key')} />
                  </Field>
                  <Field label="Node name" htmlFor="sc-res-name" error={errors.reservoir?.name?.message}>
                    <Input id="sc-res-name" {...form.register('reservoir.name')} />
                  </Field>
                </div>
              ) : null}
            </div>
          </fieldset>

          <div className="space-y-2">
            <h3 className="text-xs font-semibold text-muted">Filter sections, in order from the rectifier</h3>
            {sections.fields.length === 0 ? <p className="text-sm text-muted">No sections: the reservoir is the only node.</p> : null}
            <ol className="space-y-2">
              {sections.fields.map((f, i) => {
                const k = watchedSections?.[i]?.kind ?? f.kind;
                return (
                  <li key={f.id} className={cn('grid items-end gap-2 rounded-md border border-rule p-2 md:grid-cols-[7rem_1fr_1fr_1fr_1fr_auto]', k === 'capacitor' && 'bg-paper/60')} data-testid={`supply-section-${i}`}>
                    <div className="text-xs">
                      <span className="font-semibold">{i + 1}. {k === 'resistor' ? 'Series resistor' : k === 'choke' ? 'Choke' : 'Shunt capacitor'}</span>
                      {nodeOfSection[i] !== null && nodeOfSection[i] !== undefined ? <div className="text-muted">node {nodeOfSection[i]}</div> : null}
                      {secErr(i, '') ? <div className="text-over">{secErr(i, '')}</div> : null}
                    </div>
                    {k === 'resistor' ? (
                      <>
                        <Field label="Resistance" htmlFor={`sc-s${i}-r`} unit="Ω" error={secErr(i, 'resistance')}><Input id={`sc-s${i}-r`} className="num" disabled={ro} {...form.register(`sections.${i}.resistance` as const)} /></Field>
                        <Field label="Power rating" htmlFor={`sc-s${i}-p`} unit="W" error={secErr(i, 'powerRating')}><Input id={`sc-s${i}-p`} className="num" disabled={ro} {...form.register(`sections.${i}.powerRating` as const)} /></Field>
                        <span />
                        <span />
                      </>
                    ) : k === 'choke' ? (
                      <>
                        <Field label="Inductance" htmlFor={`sc-s${i}-l`} unit="H" error={secErr(i, 'inductance')}><Input id={`sc-s${i}-l`} className="num" disabled={ro} {...form.register(`sections.${i}.inductance` as const)} /></Field>
                        <Field label="DC resistance" htmlFor={`sc-s${i}-r`} unit="Ω" error={secErr(i, 'resistance')}><Input id={`sc-s${i}-r`} className="num" disabled={ro} {...form.register(`sections.${i}.resistance` as const)} /></Field>
                        <Field label="Current rating" htmlFor={`sc-s${i}-i`} unit="A" error={secErr(i, 'currentRating')}><Input id={`sc-s${i}-i`} className="num" disabled={ro} {...form.register(`sections.${i}.currentRating` as const)} /></Field>
                        <span />
                      </>
                    ) : (
                      <>
                        <Field label="Capacitance" htmlFor={`sc-s${i}-c`} unit="F" error={secErr(i, 'capacitance')}><Input id={`sc-s${i}-c`} className="num" disabled={ro} {...form.register(`sections.${i}.capacitance` as const)} /></Field>
                        <Field label="Rated" htmlFor={`sc-s${i}-v`} unit="V" error={secErr(i, 'voltageRating')}><Input id={`sc-s${i}-v`} className="num" disabled={ro} {...form.register(`sections.${i}.voltageRating` as const)} /></Field>
                        <Field label="Node key" htmlFor={`sc-s${i}-k`} error={secErr(i, 'key')}><Input id={`sc-s${i}-k`} disabled={ro} {...form.register(`sections.${i}.key` as const)} /></Field>
                        <Field label="Node name" htmlFor={`sc-s${i}-n`} error={secErr(i, 'name')}><Input id={`sc-s${i}-n`} disabled={ro} {...form.register(`sections.${i}.name` as const)} /></Field>
                      </>
                    )}
                    {editable ? (
                      <div className="flex gap-1">
                        <Button type="button" size="sm" variant="ghost" aria-label={`Move section ${i + 1} up`} disabled={i === 0} onClick={() => sections.move(i, i - 1)}>↑</Button>
                        <Button type="button" size="sm" variant="ghost" aria-label={`Remove section ${i + 1}`} onClick={() => sections.remove(i)}>✕</Button>
                      </div>
                    ) : null}
                  </li>
                );
              })}
            </ol>
            {editable ? (
              <div className="flex flex-wrap gap-2">
                <Button type="button" size="sm" variant="secondary" onClick={() => sections.append({ kind: 'resistor', resistance: '4k7' })}>+ Series resistor</Button>
                <Button type="button" size="sm" variant="secondary" onClick={() => sections.append({ kind: 'choke', inductance: '10', resistance: '150' })}>+ Choke</Button>
                <Button type="button" size="sm" variant="secondary" onClick={() => sections.append({ kind: 'capacitor', capacitance: '22u', key: `B+${(nodeOfSection.filter((x) => x !== null).length ?? 0) + (hasReservoir ? 2 : 1)}` })}>+ Shunt capacitor (a node)</Button>
              </div>
            ) : null}
          </div>

          <div className="space-y-2">
            <h3 className="text-xs font-semibold text-muted">Bleeders and other fixed loads (the stages’ currents are added from the chain)</h3>
            {loads.fields.map((f, i) => (
              <div key={f.id} className="grid items-end gap-2 md:grid-cols-[6rem_1fr_1fr_auto]">
                <Field label="Node" htmlFor={`sc-l${i}-n`} error={errors.loads?.[i]?.node?.message}><Input id={`sc-l${i}-n`} className="num" disabled={ro} {...form.register(`loads.${i}.node` as const, { setValueAs: (v) => Number(v) })} /></Field>
                <Field label="Resistance (bleeder)" htmlFor={`sc-l${i}-r`} unit="Ω" error={errors.loads?.[i]?.resistance?.message}><Input id={`sc-l${i}-r`} className="num" disabled={ro} {...form.register(`loads.${i}.resistance` as const)} /></Field>
                <Field label="Fixed current" htmlFor={`sc-l${i}-i`} unit="A" error={errors.loads?.[i]?.current?.message}><Input id={`sc-l${i}-i`} className="num" disabled={ro} {...form.register(`loads.${i}.current` as const)} /></Field>
                {editable ? <Button type="button" size="sm" variant="ghost" aria-label={`Remove load ${i + 1}`} onClick={() => loads.remove(i)}>✕</Button> : null}
              </div>
            ))}
            {editable ? <Button type="button" size="sm" variant="secondary" onClick={() => loads.append({ node: 0, resistance: '220k' })}>+ Bleeder</Button> : null}
          </div>

          {error ? <p role="alert" className="text-sm text-over">{error}</p> : null}
          {editable ? (
            <div className="flex items-center gap-3">
              <Button type="submit" size="sm" disabled={isSubmitting || (!isDirty && !unsaved)}>Save supply</Button>
              {saved && !isDirty ? <span role="status" className="text-xs text-ok">Saved; the chain is solved again on it.</span> : null}
              {isDirty ? <span className="text-xs text-muted">Results below are for the saved supply.</span> : null}
            </div>
          ) : null}
        </form>

        {result ? (
          <>
            <SupplyChainDiagram result={result} circuit={project.supplyCircuit!} />
            <SupplyNodesTable result={result} />
            <div>
              <div className="mb-1 flex items-center gap-2 text-xs">
                <span className="text-muted">Waveforms at</span>
                {(['idle', 'fullDrive'] as const).map((d) => (
                  <button key={d} type="button" className={cn('rounded px-2 py-0.5', drive === d ? 'bg-ink text-sheet' : 'border border-rule')} onClick={() => setDrive(d)} aria-pressed={drive === d}>
                    {d === 'idle' ? 'idle' : 'full drive'}
                  </button>
                ))}
              </div>
              <SupplyWaveformChart result={result} drive={drive} />
            </div>
            <SupplyRatings result={result} />
          </>
        ) : project.supplyCircuit && chain.data?.supplyError ? (
          <p role="alert" className="text-sm text-over">The supply could not be solved: {chain.data.supplyError.message}</p>
        ) : project.supplyCircuit ? (
          <p className="text-sm text-muted">Solving the supply with the stages…</p>
        ) : (
          <p className="text-sm text-muted">Save the circuit to solve it with the stages it feeds.</p>
        )}
      </CardBody>
    </Card>
  );
}

function SafetyNotes({ result }: { result: SupplyResult | undefined }) {
  return (
    <ul className="list-disc space-y-1 pl-5 text-xs text-ink" aria-label="Supply cautions" data-testid="supply-cautions">
      <li>Filter capacitors store a lethal charge and keep it after switch-off: fit bleeder resistors, and discharge every capacitor (and measure it) before service.</li>
      {(result?.cautions ?? []).map((c) => (
        <li key={c}>{c}</li>
      ))}
      <li>Local electrical codes and licensed practice come first; mains wiring is work for a qualified person.</li>
    </ul>
  );
}

export function SupplyChainDiagram({ result, circuit }: { result: SupplyResult; circuit: SupplyCircuitBody }) {
  const meta = circuitNodes(circuit);
  return (
    <div className="overflow-x-auto" data-testid="supply-diagram">
      <div className="flex min-w-max items-stretch gap-1 text-xs">
        <Box title="Mains" lines={[`${result.mainsFrequency} Hz`, `secondary peak ${V(result.secondaryPeak)}`, `source ${formatEng(result.sourceResistance, 'Ω')}`]} />
        <Arrow />
        <Box title="Rectifier" lines={[result.rectifier.type, `peak ${formatEng(result.rectifierPeakCurrent, 'A')}`, `PIV ${V(result.rectifier.peakInverseVoltage)}`]} />
        {result.nodes.map((n, i) => {
          const m = meta[i];
          const label = !m ? '' : m.inductance > 0 ? `${formatEng(m.inductance, 'H')} ${formatEng(m.droppingResistor, 'Ω')}` : m.droppingResistor > 0 ? formatEng(m.droppingResistor, 'Ω') : '';
          return (
            <div key={n.key} className="flex items-stretch gap-1">
              <Arrow label={label} />
              <div className="w-44 rounded-md border border-heater/60 bg-sheet p-2" data-testid={`supply-node-${i}`}>
                <div className="font-semibold">{n.name} <span className="num text-muted">({n.key})</span></div>
                <div className="num">idle {V(n.dc)}</div>
                <div className="num">full drive {V(n.fullDrive.dc)}</div>
                <div className="num text-muted">ripple {formatEng(n.fullDrive.ripplePeakToPeak, 'V')} p-p</div>
                <div className="num text-muted">{formatEng(n.capacitance, 'F')}</div>
              </div>
            </div>
          );
        })}
      </div>
    </div>
  );
}

function Box({ title, lines }: { title: string; lines: string[] }) {
  return (
    <div className="w-40 rounded-md border border-rule bg-paper/60 p-2">
      <div className="font-semibold">{title}</div>
      {lines.map((l) => (
        <div key={l} className="num text-muted">{l}</div>
      ))}
    </div>
  );
}

function Arrow({ label }: { label?: string }) {
  return (
    <div className="flex w-16 flex-col items-center justify-center text-muted" aria-hidden>
      <span className="num text-[10px]">{label}</span>
      <span>→</span>
    </div>
  );
}

export function SupplyNodesTable({ result }: { result: SupplyResult }) {
  return (
    <div className="overflow-x-auto">
      <table className="w-full text-sm" data-testid="supply-circuit-nodes">
        <thead className="border-b border-rule text-left text-xs text-muted">
          <tr>
            <th className="px-2 py-1 font-medium">Node</th>
            <th className="px-2 py-1 text-right font-medium">Idle</th>
            <th className="px-2 py-1 text-right font-medium">Full drive</th>
            <th className="px-2 py-1 text-right font-medium">Sag</th>
            <th className="px-2 py-1 text-right font-medium">Ripple p-p (idle / full)</th>
            <th className="px-2 py-1 text-right font-medium">Ripple rms</th>
            <th className="px-2 py-1 text-right font-medium">Low / high mains</th>
            <th className="px-2 py-1 text-right font-medium">Turn-on peak</th>
            <th className="px-2 py-1 text-right font-medium">Load (idle / full)</th>
          </tr>
        </thead>
        <tbody className="divide-y divide-rule">
          {result.nodes.map((n) => (
            <tr key={n.key}>
              <td className="px-2 py-1">{n.name} <span className="num text-xs text-muted">{n.key}</span></td>
              <td className="num px-2 py-1 text-right">{V(n.dc)}</td>
              <td className="num px-2 py-1 text-right">{V(n.fullDrive.dc)}</td>
              <td className="num px-2 py-1 text-right">{V(n.sag)}</td>
              <td className="num px-2 py-1 text-right">{formatEng(n.ripplePeakToPeak, 'V')} / {formatEng(n.fullDrive.ripplePeakToPeak, 'V')}</td>
              <td className="num px-2 py-1 text-right">{formatEng(n.fullDrive.rippleRms, 'V')}</td>
              <td className="num px-2 py-1 text-right">{V(n.dcLowMains)} / {V(n.dcHighMains)}</td>
              <td className="num px-2 py-1 text-right">{V(n.unloadedPeak)}</td>
              <td className="num px-2 py-1 text-right">{formatEng(n.loadCurrent, 'A')} / {formatEng(n.fullDriveLoadCurrent, 'A')}</td>
            </tr>
          ))}
        </tbody>
      </table>
      <p className="mt-1 text-xs text-muted">
        Ripple at {result.rippleFrequency} Hz. Reservoir ripple current {formatEng(result.reservoirRippleCurrent, 'A')} rms; secondary {formatEng(result.secondaryRmsCurrent, 'A')} rms;
        rectifier average {formatEng(result.rectifier.averageCurrent, 'A')}, peak {formatEng(result.rectifierPeakCurrent, 'A')}
        {result.rectifier.turnOnPeakCurrent !== null ? `, at switch-on ${formatEng(result.rectifier.turnOnPeakCurrent, 'A')}` : ''}.
        {result.chokes.map((c) => ` Choke ${formatEng(c.inductance, 'H')} resonates at ${formatEng(c.resonance, 'Hz')}.`).join('')}
        {result.rectifier.heater ? ` Rectifier heater ${formatEng(result.rectifier.heater.voltage, 'V')} at ${formatEng(result.rectifier.heater.current, 'A')} (in the heater budget).` : ''}
      </p>
    </div>
  );
}

export function SupplyWaveformChart({ result, drive, height = 240 }: { result: SupplyResult; drive: 'idle' | 'fullDrive'; height?: number }) {
  const w = result.waveform[drive];
  const data = w.t.map((t, i) => ({ ms: t * 1e3, reservoir: w.reservoir[i], last: w.last[i] }));
  const all = [...w.reservoir, ...w.last];
  const lo = Math.min(...all);
  const hi = Math.max(...all);
  const pad = Math.max((hi - lo) * 0.08, 0.5);
  const yTicks = niceTicks(lo - pad, hi + pad, 5);
  const msEnd = data[data.length - 1]?.ms ?? 1;
  const tTicks = niceTicks(0, msEnd, 6).filter((v) => v <= msEnd + 1e-9);
  const lastName = result.nodes[result.nodes.length - 1]!.name;
  return (
    <ChartFrame
      testId="supply-waveform-chart"
      label="Reservoir and last node over three mains cycles"
      stale={false}
      height={height}
      footer={<ChartLegend className="mt-1" entries={[{ label: /reservoir/i.test(result.nodes[0]!.name) ? result.nodes[0]!.name : `${result.nodes[0]!.name}${result.capacitorInput ? ' (reservoir)' : ' (first node)'}`, color: COLORS.heater, kind: 'thick' }, { label: lastName, color: COLORS.dcline, kind: 'line' }]} />}
    >
      <LineChart data={data} margin={{ top: 12, right: 12, bottom: 22, left: 6 }}>
        <CartesianGrid {...GRID} />
        <XAxis type="number" dataKey="ms" domain={[0, msEnd]} ticks={tTicks} tick={TICK} axisLine={AXIS_LINE} tickLine={AXIS_LINE} tickFormatter={tickNumber} label={{ value: 'Time (ms)', position: 'insideBottom', offset: -12, ...AXIS_LABEL }} />
        <YAxis type="number" domain={[yTicks[0]!, yTicks[yTicks.length - 1]!]} ticks={yTicks} tick={TICK} axisLine={AXIS_LINE} tickLine={AXIS_LINE} tickFormatter={tickNumber} width={48} label={{ value: 'Voltage (V)', angle: -90, position: 'insideLeft', offset: 12, style: { textAnchor: 'middle' }, ...AXIS_LABEL }} />
        <Line type="linear" dataKey="reservoir" stroke={COLORS.heater} strokeWidth={2} dot={false} isAnimationActive={false} />
        <Line type="linear" dataKey="last" stroke={COLORS.dcline} strokeWidth={1.5} dot={false} isAnimationActive={false} />
      </LineChart>
    </ChartFrame>
  );
}

export function SupplyRatings({ result }: { result: SupplyResult }) {
  return (
    <div className="overflow-x-auto">
      <table className="w-full text-sm" data-testid="supply-ratings">
        <thead className="border-b border-rule text-left text-xs text-muted">
          <tr>
            <th className="px-2 py-1 font-medium">Rating</th>
            <th className="px-2 py-1 text-right font-medium">Value</th>
            <th className="px-2 py-1 text-right font-medium">Limit</th>
            <th className="px-2 py-1 font-medium">Status</th>
            <th className="px-2 py-1 font-medium">Note</th>
          </tr>
        </thead>
        <tbody className="divide-y divide-rule">
          {result.ratings.map((r) => (
            <tr key={r.key}>
              <td className="px-2 py-1">{r.label}</td>
              <td className="num px-2 py-1 text-right">{formatEng(r.value, r.unit)}</td>
              <td className="num px-2 py-1 text-right">{r.limit === null ? '–' : formatEng(r.limit, r.unit)}</td>
              <td className="px-2 py-1"><StatusBadge status={r.status} /></td>
              <td className="px-2 py-1 text-xs text-muted">{r.caution ?? ''}</td>
            </tr>
          ))}
        </tbody>
      </table>
    </div>
  );
}
