'use client';

import { zodResolver } from '@hookform/resolvers/zod';
import { useEffect, useState } from 'react';
import { useFieldArray, useForm, type FieldErrors } from 'react-hook-form';
import { Button } from '@/components/ui/button';
import { Card, CardBody, CardHeader } from '@/components/ui/card';
import { Field } from '@/components/ui/field';
import { Input } from '@/components/ui/input';
import type { ProjectDetail } from '@/lib/projects/service';
import { ApiRequestError, fetchJson } from '@/lib/hooks/fetch-json';
import { formatEng } from '@/lib/format/number';
import { projectSupplySchema, type ProjectSupply, type ProjectSupplyInput } from '@/lib/validation/project';

// Values are shown in engineering notation without the unit (the unit sits beside the field): 4.7 k, 22 µ.
const show = (v: number | undefined) => (typeof v === 'number' ? formatEng(v, '', 4) : '');

function toForm(supply: ProjectDetail['supply']): ProjectSupplyInput {
  return {
    rawVoltage: show(supply.rawVoltage),
    sourceResistance: show(supply.sourceResistance ?? 0),
    nodes: (supply.nodes ?? []).map((n) => ({ key: n.key, name: n.name, droppingResistor: show(n.droppingResistor), filterCapacitor: show(n.filterCapacitor) })),
    heaters: (supply.heaters ?? []).map((h) => ({ key: h.key, name: h.name, voltage: show(h.voltage) })),
  };
}

type Conflict = { message: string; current: ProjectDetail };

export function SupplyEditor({ project, editable, onSaved }: { project: ProjectDetail; editable: boolean; onSaved: (p: ProjectDetail) => void }) {
  const form = useForm<ProjectSupplyInput, unknown, ProjectSupply>({ resolver: zodResolver(projectSupplySchema), defaultValues: toForm(project.supply) });
  const nodes = useFieldArray({ control: form.control, name: 'nodes' });
  const heaters = useFieldArray({ control: form.control, name: 'heaters' });
  const [error, setError] = useState<string | null>(null);
  const [saved, setSaved] = useState(false);
  const [conflict, setConflict] = useState<Conflict | null>(null);
  const [baseVersion, setBaseVersion] = useState(project.version);
  const [baseSupply, setBaseSupply] = useState(() => JSON.stringify(project.supply));
  const { errors, isSubmitting, isDirty } = form.formState;
  // Another card on the page saved the project (rename, settings…): when the supply itself is as this form last
  // read it, follow the new version so a supply save is not refused for a change it does not overlap; when the
  // supply did change, show it unless something is typed here (then the save gets the 409 and its choices).
  useEffect(() => {
    if (project.version === baseVersion) return;
    const supplyNow = JSON.stringify(project.supply);
    if (supplyNow === baseSupply) setBaseVersion(project.version);
    else if (!form.formState.isDirty) {
      form.reset(toForm(project.supply));
      setBaseSupply(supplyNow);
      setBaseVersion(project.version);
    }
  }, [project.version, project.supply, baseVersion, baseSupply, form]);
  // rawVoltage may be empty (no solution wanted yet)
  const rawText = form.watch('rawVoltage');

  const save = async (values: ProjectSupply, version: number) => {
    setError(null);
    setSaved(false);
    try {
      const supply = { ...values, rawVoltage: rawText === '' ? undefined : values.rawVoltage };
      const r = await fetchJson<{ project: ProjectDetail }>(`/api/projects/${project.id}`, { method: 'PATCH', body: { version, supply } });
      setConflict(null);
      setBaseVersion(r.project.version);
      setBaseSupply(JSON.stringify(r.project.supply));
      form.reset(toForm(r.project.supply));
      onSaved(r.project);
      setSaved(true);
    } catch (err) {
      if (err instanceof ApiRequestError && err.status === 409 && (err.details as { current?: ProjectDetail } | undefined)?.current) {
        setConflict({ message: err.message, current: (err.details as { current: ProjectDetail }).current });
        return;
      }
      if (err instanceof ApiRequestError && err.fieldErrors) {
        for (const [k, v] of Object.entries(err.fieldErrors)) form.setError(k.replace(/^supply\./, '') as 'rawVoltage', { message: v[0] });
      }
      setError(err instanceof Error ? err.message : 'Could not save the supply.');
    }
  };
  const onSubmit = form.handleSubmit((values) => save(values, baseVersion));

  const nodeErr = (i: number, f: 'key' | 'name' | 'droppingResistor' | 'filterCapacitor') => (errors.nodes as FieldErrors<ProjectSupplyInput>['nodes'])?.[i]?.[f]?.message;
  const heaterErr = (i: number, f: 'key' | 'name' | 'voltage') => errors.heaters?.[i]?.[f]?.message;

  return (
    <Card data-testid="supply-editor">
      <CardHeader title="Supply" actions={isDirty ? <span className="text-xs text-near">unsaved changes</span> : saved ? <span className="text-xs text-ok">saved</span> : null} />
      <CardBody>
        <form onSubmit={onSubmit} noValidate className="space-y-4">
          <fieldset disabled={!editable} className="space-y-4">
            <p className="text-xs text-muted">
              The raw B+ is the rectifier’s open-circuit voltage behind the transformer and rectifier source resistance. Each node is fed
              from the one above it through its dropping resistor (0 Ω for the reservoir node); stages choose their node in the stage editor.
            </p>
            <div className="grid max-w-md grid-cols-2 gap-3">
              <Field label="Raw B+" htmlFor="supply-raw" unit="V" error={errors.rawVoltage?.message}>
                <Input id="supply-raw" className="num" placeholder="e.g. 310" aria-invalid={Boolean(errors.rawVoltage)} {...form.register('rawVoltage', { setValueAs: (v) => (v === '' ? undefined : v) })} />
              </Field>
              <Field label="Source resistance" htmlFor="supply-rs" unit="Ω" error={errors.sourceResistance?.message}>
                <Input id="supply-rs" className="num" aria-invalid={Boolean(errors.sourceResistance)} {...form.register('sourceResistance')} />
              </Field>
            </div>

            <div>
              <h3 className="mb-1.5 text-sm font-semibold">B+ nodes, in order from the rectifier</h3>
              <div className="space-y-2">
                {nodes.fields.map((f, i) => (
                  <div key={f.id} className="grid grid-cols-2 items-start gap-2 sm:grid-cols-[5rem_1fr_8rem_8rem_auto]" data-testid="supply-node-row">
                    <Field label="Key" htmlFor={`node-${i}-key`} error={nodeErr(i, 'key')}>
                      <Input id={`node-${i}-key`} className="num" {...form.register(`nodes.${i}.key`)} />
                    </Field>
                    <Field label="Name" htmlFor={`node-${i}-name`} error={nodeErr(i, 'name')}>
                      <Input id={`node-${i}-name`} {...form.register(`nodes.${i}.name`)} />
                    </Field>
                    <Field label="Dropping R" htmlFor={`node-${i}-r`} unit="Ω" error={nodeErr(i, 'droppingResistor')}>
                      <Input id={`node-${i}-r`} className="num" {...form.register(`nodes.${i}.droppingResistor`)} />
                    </Field>
                    <Field label="Filter C" htmlFor={`node-${i}-c`} unit="F" error={nodeErr(i, 'filterCapacitor')}>
                      <Input id={`node-${i}-c`} className="num" {...form.register(`nodes.${i}.filterCapacitor`)} />
                    </Field>
                    <Button type="button" variant="ghost" size="sm" className="mt-5" aria-label={`Remove node ${i + 1}`} onClick={() => nodes.remove(i)}>✕</Button>
                  </div>
                ))}
              </div>
              {errors.nodes?.message || errors.nodes?.root?.message ? <p className="text-xs text-over">{errors.nodes?.message ?? errors.nodes?.root?.message}</p> : null}
              <Button type="button" variant="secondary" size="sm" className="mt-2" onClick={() => nodes.append({ key: `B+${nodes.fields.length + 1}`, name: '', droppingResistor: '10k', filterCapacitor: '22µ' })}>
                Add node
              </Button>
            </div>

            <div>
              <h3 className="mb-1.5 text-sm font-semibold">Heater supplies</h3>
              <div className="space-y-2">
                {heaters.fields.map((f, i) => (
                  <div key={f.id} className="grid max-w-2xl grid-cols-2 items-start gap-2 sm:grid-cols-[5rem_1fr_8rem_auto]">
                    <Field label="Key" htmlFor={`heater-${i}-key`} error={heaterErr(i, 'key')}>
                      <Input id={`heater-${i}-key`} className="num" {...form.register(`heaters.${i}.key`)} />
                    </Field>
                    <Field label="Name" htmlFor={`heater-${i}-name`} error={heaterErr(i, 'name')}>
                      <Input id={`heater-${i}-name`} {...form.register(`heaters.${i}.name`)} />
                    </Field>
                    <Field label="Voltage" htmlFor={`heater-${i}-v`} unit="V" error={heaterErr(i, 'voltage')}>
                      <Input id={`heater-${i}-v`} className="num" {...form.register(`heaters.${i}.voltage`)} />
                    </Field>
                    <Button type="button" variant="ghost" size="sm" className="mt-5" aria-label={`Remove heater supply ${i + 1}`} onClick={() => heaters.remove(i)}>✕</Button>
                  </div>
                ))}
              </div>
              <Button type="button" variant="secondary" size="sm" className="mt-2" onClick={() => heaters.append({ key: `H${heaters.fields.length + 1}`, name: '6.3 V heater winding', voltage: '6.3' })}>
                Add heater supply
              </Button>
            </div>
          </fieldset>

          {conflict ? (
            <div role="alert" className="space-y-2 rounded-md border border-near/50 bg-near/10 px-3 py-2 text-sm">
              <p>{conflict.message}</p>
              <p className="text-xs text-muted">Your values are still in the form above.</p>
              <div className="flex gap-2">
                <Button type="button" size="sm" variant="secondary" onClick={() => { form.reset(toForm(conflict.current.supply)); setBaseVersion(conflict.current.version); setBaseSupply(JSON.stringify(conflict.current.supply)); onSaved(conflict.current); setConflict(null); }}>
                  Reload their version
                </Button>
                <Button type="button" size="sm" onClick={form.handleSubmit((v) => save(v, conflict.current.version))}>Save mine over it</Button>
              </div>
            </div>
          ) : null}
          {error ? <p role="alert" className="text-sm text-over">{error}</p> : null}
          {editable ? (
            <Button type="submit" disabled={isSubmitting}>Save supply</Button>
          ) : (
            <p className="text-xs text-muted">Read only{project.archived ? ': the project is archived' : ''}.</p>
          )}
        </form>
      </CardBody>
    </Card>
  );
}
