'use client';

import { zodResolver } from '@hookform/resolvers/zod';
import { useState } from 'react';
import { useForm } from 'react-hook-form';
import { Button } from '@/components/ui/button';
import { Field } from '@/components/ui/field';
import { Input, Select } from '@/components/ui/input';
import type { TubeDetail } from '@/lib/tubes/service';
import { ApiRequestError, fetchJson } from '@/lib/hooks/fetch-json';
import { modelInputSchema, type ModelInput, type ModelValues } from '@/lib/validation/tube';

const TRIODE_FIELDS = [
  ['mu', 'MU', ''],
  ['ex', 'EX', ''],
  ['kg1', 'KG1', ''],
  ['kp', 'KP', ''],
  ['kvb', 'KVB', 'V²'],
] as const;
const PENTODE_FIELDS = [
  ['mu', 'MU (µg2g1)', ''],
  ['ex', 'EX', ''],
  ['kg1', 'KG1', ''],
  ['kg2', 'KG2', ''],
  ['kp', 'KP', ''],
  ['kvb', 'KVB', 'V'],
] as const;

/** A Koren parameter set typed in by hand, with its source. */
export function ModelForm({ tube, mayMakeDefault, onDone, onCancel }: { tube: TubeDetail; mayMakeDefault: boolean; onDone: () => void; onCancel: () => void }) {
  const triodeOnly = tube.family === 'triode';
  const form = useForm<ModelInput, unknown, ModelValues>({
    resolver: zodResolver(modelInputSchema),
    defaultValues: { kind: triodeOnly ? 'koren-triode' : 'koren-pentode', name: '', source: 'entered by hand', parameters: {} as never, setDefault: false },
  });
  const kind = form.watch('kind');
  const [error, setError] = useState<string | null>(null);
  const errors = form.formState.errors as Record<string, { message?: string } & Record<string, { message?: string }>>;
  const onSubmit = form.handleSubmit(async (values) => {
    setError(null);
    try {
      await fetchJson(`/api/tubes/${tube.id}/models`, { method: 'POST', body: values });
      onDone();
    } catch (err) {
      if (err instanceof ApiRequestError && err.fieldErrors) {
        for (const [k, v] of Object.entries(err.fieldErrors)) form.setError(k as never, { message: v[0] });
      }
      setError(err instanceof Error ? err.message : 'Could not add the model.');
    }
  });
  const fields = kind === 'koren-pentode' ? PENTODE_FIELDS : TRIODE_FIELDS;
  return (
    <form onSubmit={onSubmit} noValidate className="space-y-3 rounded-md border border-rule bg-paper/50 p-3" aria-label="Add a model by hand">
      <div className="grid grid-cols-2 gap-3">
        <Field label="Kind" htmlFor="model-kind">
          <Select id="model-kind" {...form.register('kind')} disabled={triodeOnly}>
            <option value="koren-triode">Koren triode</option>
            {!triodeOnly ? <option value="koren-pentode">Koren pentode</option> : null}
          </Select>
        </Field>
        <Field label="Name" htmlFor="model-name" error={errors.name?.message}>
          <Input id="model-name" placeholder="e.g. Bench sample 3" {...form.register('name')} />
        </Field>
      </div>
      <div className="grid grid-cols-3 gap-3">
        {fields.map(([key, label, unit]) => (
          <Field key={key} label={label} htmlFor={`model-${key}`} unit={unit} error={errors.parameters?.[key]?.message}>
            <Input id={`model-${key}`} className="num" inputMode="decimal" {...form.register(`parameters.${key}` as never)} />
          </Field>
        ))}
      </div>
      <Field label="Source" htmlFor="model-source" hint='A citation, "entered by hand" or "from memory".' error={errors.source?.message}>
        <Input id="model-source" {...form.register('source')} />
      </Field>
      {mayMakeDefault ? (
        <label className="flex items-center gap-2 text-sm">
          <input type="checkbox" className="size-4 accent-[var(--heater)]" {...form.register('setDefault')} /> Make it the default model
        </label>
      ) : null}
      {error ? <p role="alert" className="text-sm text-over">{error}</p> : null}
      <div className="flex gap-2">
        <Button type="submit" size="sm" disabled={form.formState.isSubmitting}>Add model</Button>
        <Button type="button" size="sm" variant="ghost" onClick={onCancel}>Cancel</Button>
      </div>
    </form>
  );
}
