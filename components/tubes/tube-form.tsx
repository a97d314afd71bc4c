'use client';

import { zodResolver } from '@hookform/resolvers/zod';
import { useRouter } from 'next/navigation';
import { useState } from 'react';
import { useForm } from 'react-hook-form';
import { z } from 'zod';
import { Button } from '@/components/ui/button';
import { Card, CardBody, CardHeader } from '@/components/ui/card';
import { Field } from '@/components/ui/field';
import { Input, Select, Textarea } from '@/components/ui/input';
import type { TubeDetail } from '@/lib/tubes/service';
import { ApiRequestError, fetchJson } from '@/lib/hooks/fetch-json';
import { formatEng } from '@/lib/format/number';
import { createTubeSchema, FAMILY_LABELS, RATING_KEYS, RATING_META, TUBE_FAMILIES } from '@/lib/validation/tube';

// The form edits the fields shared by create and edit; typical points and models have their own screens.
const formSchema = createTubeSchema.omit({ model: true, typicalPoints: true });
type FormInput = z.input<typeof formSchema>;
type FormValues = z.output<typeof formSchema>;

const UNIT_HINT: Record<string, string> = { V: 'e.g. 300', W: 'e.g. 1.2', A: 'e.g. 8m', 'Ω': 'e.g. 1M' };

function strip<T extends Record<string, unknown>>(o: T): T {
  return Object.fromEntries(Object.entries(o).filter(([, v]) => v !== '' && v !== undefined && v !== null)) as T;
}

/** Blank rating rows are dropped; a value without a source (or the reverse) is reported by the shared schema. */
function cleanRatings(r: Record<string, { value?: unknown; source?: unknown } | undefined> | undefined) {
  const out: Record<string, unknown> = {};
  for (const [k, v] of Object.entries(r ?? {})) {
    if (!v) continue;
    const value = typeof v.value === 'string' ? v.value.trim() : v.value;
    const source = typeof v.source === 'string' ? v.source.trim() : v.source;
    if ((value === '' || value === undefined) && !source) continue;
    out[k] = { value, source };
  }
  return out;
}

// Stored SI numbers shown the way people type them: 0.008 → "8 m", 1e6 → "1 M", 1.6e-12 → "1.6 p".
const shown = (v: number | undefined) => (v === undefined ? undefined : formatEng(v, '', 4));

export function TubeForm({ tube }: { tube?: TubeDetail }) {
  const router = useRouter();
  const editing = !!tube;
  const defaults: FormInput = tube
    ? {
        designation: tube.designation,
        aliases: tube.aliases.join(', '),
        family: tube.family,
        sections: tube.sections,
        heater: { voltage: shown(tube.heater.voltage), current: shown(tube.heater.current), directlyHeated: tube.heater.directlyHeated ?? false, source: tube.heater.source ?? '' },
        ratings: Object.fromEntries(Object.entries(tube.ratings).map(([k, r]) => [k, { value: shown(r?.value), source: r?.source ?? '' }])) as FormInput['ratings'],
        capacitances: { cgk: shown(tube.capacitances.cgk), cga: shown(tube.capacitances.cga), cak: shown(tube.capacitances.cak), source: tube.capacitances.source ?? '' },
        notes: tube.notes,
      }
    : { designation: '', aliases: '', family: 'triode', sections: 1, heater: { directlyHeated: false, source: 'entered by hand' }, ratings: {}, capacitances: { source: '' }, notes: '' };
  const form = useForm<FormInput, unknown, FormValues>({
    resolver: async (values, ctx, opts) => {
      const cleaned = {
        ...values,
        heater: strip(values.heater ?? {}),
        capacitances: strip(values.capacitances ?? {}),
        ratings: cleanRatings(values.ratings as never),
      };
      return zodResolver(formSchema)(cleaned as FormInput, ctx, opts);
    },
    defaultValues: defaults,
  });
  const errors = form.formState.errors as Record<string, any>;
  const [error, setError] = useState<string | null>(null);

  const onSubmit = form.handleSubmit(async (values) => {
    setError(null);
    try {
      if (editing) {
        await fetchJson(`/api/tubes/${tube.id}`, { method: 'PATCH', body: values });
        router.push(`/tubes/${tube.id}`);
      } else {
        const r = await fetchJson<{ tube: { id: number } }>('/api/tubes', { method: 'POST', body: values });
        router.push(`/tubes/${r.tube.id}`);
      }
      router.refresh();
    } catch (err) {
      if (err instanceof ApiRequestError && err.fieldErrors) {
        for (const [k, v] of Object.entries(err.fieldErrors)) form.setError(k as never, { message: v[0] });
      }
      setError(err instanceof Error ? err.message : 'Could not save.');
    }
  });

  const fieldError = (path: string) => path.split('.').reduce<any>((o, k) => o?.[k], errors)?.message as string | undefined;

  return (
    <form onSubmit={onSubmit} noValidate className="grid gap-5 lg:grid-cols-2" aria-label={editing ? `Edit ${tube.designation}` : 'Add a tube type'}>
      <Card>
        <CardHeader title="Type" />
        <CardBody className="space-y-3">
          <div className="grid grid-cols-2 gap-3">
            <Field label="Designation" htmlFor="tube-designation" error={fieldError('designation')}>
              <Input id="tube-designation" placeholder="e.g. 12AX7" {...form.register('designation')} />
            </Field>
            <Field label="Aliases" htmlFor="tube-aliases" hint="Comma-separated, e.g. ECC83, 7025" error={fieldError('aliases')}>
              <Input id="tube-aliases" {...form.register('aliases' as never)} />
            </Field>
            <Field label="Family" htmlFor="tube-family" error={fieldError('family')}>
              <Select id="tube-family" {...form.register('family')}>
                {TUBE_FAMILIES.map((f) => (
                  <option key={f} value={f}>{FAMILY_LABELS[f]}</option>
                ))}
              </Select>
            </Field>
            <Field label="Sections" htmlFor="tube-sections" error={fieldError('sections')}>
              <Input id="tube-sections" type="number" min={1} max={4} {...form.register('sections')} />
            </Field>
          </div>
          <h3 className="pt-2 text-xs font-medium text-muted">Heater</h3>
          <div className="grid grid-cols-3 gap-3">
            <Field label="Voltage" htmlFor="heater-voltage" unit="V" error={fieldError('heater.voltage')}>
              <Input id="heater-voltage" className="num" {...form.register('heater.voltage' as never)} />
            </Field>
            <Field label="Current" htmlFor="heater-current" unit="A" error={fieldError('heater.current')}>
              <Input id="heater-current" className="num" placeholder="e.g. 300m" {...form.register('heater.current' as never)} />
            </Field>
            <label className="flex items-end gap-2 pb-2 text-sm">
              <input type="checkbox" className="size-4 accent-[var(--heater)]" {...form.register('heater.directlyHeated')} /> Filament (directly heated)
            </label>
          </div>
          <Field label="Heater source" htmlFor="heater-source" error={fieldError('heater.source')}>
            <Input id="heater-source" {...form.register('heater.source')} />
          </Field>
          <h3 className="pt-2 text-xs font-medium text-muted">Interelectrode capacitances</h3>
          <div className="grid grid-cols-3 gap-3">
            {(['cgk', 'cga', 'cak'] as const).map((k) => (
              <Field key={k} label={k === 'cgk' ? 'Cgk' : k === 'cga' ? 'Cga' : 'Cak'} htmlFor={`cap-${k}`} unit="F" error={fieldError(`capacitances.${k}`)}>
                <Input id={`cap-${k}`} className="num" placeholder="e.g. 1p6" {...form.register(`capacitances.${k}` as never)} />
              </Field>
            ))}
          </div>
          <Field label="Capacitance source" htmlFor="cap-source" error={fieldError('capacitances.source')}>
            <Input id="cap-source" {...form.register('capacitances.source')} />
          </Field>
          <Field label="Notes" htmlFor="tube-notes" error={fieldError('notes')}>
            <Textarea id="tube-notes" rows={4} {...form.register('notes')} />
          </Field>
        </CardBody>
      </Card>
      <Card>
        <CardHeader title="Maximum ratings" />
        <CardBody className="space-y-3">
          <p className="text-xs text-muted">
            Engineering notation is fine (300, 1.2, 8m, 1M). Every value needs its source: a datasheet citation, “entered by hand”, or “from memory”. Leave a row empty when the sheet gives no figure.
          </p>
          {RATING_KEYS.map((k) => (
            <div key={k} className="grid grid-cols-[150px_1fr] gap-2">
              <Field label={RATING_META[k].label} htmlFor={`rating-${k}`} unit={RATING_META[k].unit} error={fieldError(`ratings.${k}.value`)}>
                <Input id={`rating-${k}`} className="num" placeholder={UNIT_HINT[RATING_META[k].unit]} {...form.register(`ratings.${k}.value` as never)} />
              </Field>
              <Field label="Source" htmlFor={`rating-${k}-source`} error={fieldError(`ratings.${k}.source`)}>
                <Input id={`rating-${k}-source`} {...form.register(`ratings.${k}.source` as never)} />
              </Field>
            </div>
          ))}
        </CardBody>
      </Card>
      <div className="flex items-center gap-3 lg:col-span-2">
        <Button type="submit" disabled={form.formState.isSubmitting}>{editing ? 'Save changes' : 'Add to the library'}</Button>
        <Button type="button" variant="ghost" onClick={() => router.back()}>Cancel</Button>
        {error ? <p role="alert" className="text-sm text-over">{error}</p> : null}
      </div>
    </form>
  );
}
