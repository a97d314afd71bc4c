'use client';

// The stage's inputs, grouped as a designer reads a schematic: supply, plate, cathode/bias, screen, load and
// coupling, drive. Values stay as typed; the unit sits beside each field and a wrong value is explained under it.
import { createContext, useContext } from 'react';
import type { UseFormReturn } from 'react-hook-form';
import { Field } from '@/components/ui/field';
import { Input, Select } from '@/components/ui/input';
import type { TubeOption } from '@/lib/tubes/service';
import { BIAS_KINDS, FIELD_UNITS, TOPOLOGIES, sectionsFor, type FieldErrorMap, type StageFormValues } from '@/components/stage-editor/form';
import type { Topology } from '@/lib/validation/stage';
import type { SupplyNodeRecord } from '@/models/types';
import { cn } from '@/lib/utils';

type Path = Parameters<UseFormReturn<StageFormValues>['register']>[0];

function Group({ title, children, className }: { title: string; children: React.ReactNode; className?: string }) {
  return (
    <fieldset className={cn('space-y-3 border-t border-rule px-4 py-3 first:border-t-0', className)}>
      <legend className="float-left mb-1 w-full text-[11px] font-semibold text-muted">{title}</legend>
      <div className="clear-both grid grid-cols-2 gap-x-3 gap-y-3">{children}</div>
    </fieldset>
  );
}

const FieldContext = createContext<{ register: UseFormReturn<StageFormValues>['register']; errors: FieldErrorMap } | null>(null);

// A quantity field: text as typed, unit beside it, the explanation of a wrong value under it.
function Q({ name, label, hint, className }: { name: Path; label: string; hint?: string; className?: string }) {
  const ctx = useContext(FieldContext);
  if (!ctx) throw new Error('Q outside StageInputs');
  const id = `f-${name.replace(/\./g, '-')}`;
  const error = fieldMessage(label, ctx.errors[name]);
  return (
    <Field label={label} htmlFor={id} unit={FIELD_UNITS[name]} error={error} hint={hint} className={className}>
      <Input id={id} className="num" autoComplete="off" spellCheck={false} aria-invalid={!!error} aria-describedby={error ? `${id}-error` : undefined} {...ctx.register(name)} />
    </Field>
  );
}

/** "must be greater than zero" reads better with its field's name in front. */
export function fieldMessage(label: string, message: string | undefined): string | undefined {
  if (!message) return undefined;
  return /^(must|is) /.test(message) ? `${label} ${message}.`.replace(/\.\.$/, '.') : message;
}

export function StageInputs({
  form,
  errors,
  tubes,
  supplyNodes,
  isNew,
  readOnly,
  onTopologyChange,
}: {
  form: UseFormReturn<StageFormValues>;
  errors: FieldErrorMap;
  tubes: TubeOption[];
  supplyNodes: SupplyNodeRecord[];
  isNew: boolean;
  readOnly: boolean;
  onTopologyChange: (t: Topology) => void;
}) {
  const { register, watch } = form;
  const topology = watch('topology');
  const tubeId = watch('tubeId');
  const biasKind = watch('bias.kind');
  const screenKind = watch('screen.kind');
  const loadEnabled = watch('load.enabled');
  const transformerEnabled = watch('transformer.enabled');
  const feedbackEnabled = watch('feedback.enabled');
  const tailKind = watch('tail.kind');
  const tube = tubes.find((t) => String(t.id) === tubeId);
  const tubeIsPentode = !!tube && tube.family !== 'triode';
  const s = sectionsFor(topology, tubeIsPentode);
  const splitter = topology === 'long-tailed-pair' || topology === 'split-load';
  const tubeChoices = topology === 'pentode-amplifier' ? tubes.filter((t) => t.family !== 'triode') : splitter ? tubes.filter((t) => t.family === 'triode') : tubes;

  return (
    <FieldContext.Provider value={{ register, errors }}>
    <fieldset disabled={readOnly} className="min-w-0" data-testid="stage-inputs">
      <Group title="Stage">
        <Field label="Name" htmlFor="f-name" error={errors.name} className="col-span-2">
          <Input id="f-name" placeholder="e.g. V1a input stage" aria-invalid={!!errors.name} {...register('name')} />
        </Field>
        <Field label="Topology" htmlFor="f-topology" className="col-span-2" hint={isNew ? undefined : 'Fixed once the stage is saved.'}>
          <Select
            id="f-topology"
            disabled={!isNew || readOnly}
            {...register('topology', { onChange: (e) => onTopologyChange(e.target.value as Topology) })}
          >
            {TOPOLOGIES.map((t) => (
              <option key={t.value} value={t.value}>
                {t.label}
              </option>
            ))}
          </Select>
        </Field>
        <Field label="Tube" htmlFor="f-tubeId" error={errors.tubeId} className={tube && tube.models.length > 1 ? undefined : 'col-span-2'}>
          <Select id="f-tubeId" aria-invalid={!!errors.tubeId} {...register('tubeId', { onChange: () => form.setValue('tubeModelId', '') })}>
            <option value="">Choose a tube…</option>
            {tubeChoices.map((t) => (
              <option key={t.id} value={String(t.id)} disabled={t.models.length === 0}>
                {t.designation} ({t.family}){t.models.length === 0 ? ' – no model yet' : ''}
              </option>
            ))}
          </Select>
        </Field>
        {tube && tube.models.length > 1 ? (
          <Field label="Tube model" htmlFor="f-tubeModelId">
            <Select id="f-tubeModelId" {...register('tubeModelId')}>
              <option value="">Library default</option>
              {tube.models.map((m) => (
                <option key={m.id} value={String(m.id)}>
                  {m.name}
                  {m.isDefault ? ' (default)' : ''}
                </option>
              ))}
            </Select>
          </Field>
        ) : null}
      </Group>

      <Group title="Supply">
        <Q name="supply" label="B+ supply" hint="At the top of the plate load" />
        <Q name="heaterElevation" label="Heater elevation" hint="Heater DC above ground" />
        <Field label="B+ node" htmlFor="f-supplyNode" className="col-span-2" hint={supplyNodes.length ? 'Where this stage draws from in the project supply' : 'No supply nodes in this project yet'}>
          <Select id="f-supplyNode" {...register('supplyNode')}>
            <option value="">Not assigned</option>
            {supplyNodes.map((n) => (
              <option key={n.key} value={n.key}>
                {n.key} – {n.name}
              </option>
            ))}
          </Select>
        </Field>
      </Group>

      <Group title="Plate">
        {s.plateResistor ? (
          <Q
            name="plateResistor"
            label={topology === 'long-tailed-pair' ? 'Plate resistor, inverting' : topology === 'split-load' ? 'Plate load' : 'Plate resistor'}
            hint={topology === 'cathode-follower' ? '0 for the plate straight to B+' : topology === 'long-tailed-pair' ? 'Section 1, driven grid' : undefined}
          />
        ) : null}
        {s.secondPlateResistor ? <Q name="secondPlateResistor" label="Plate resistor, non-inverting" hint="Section 2; trim for balance" /> : null}
        {s.primaryImpedance ? <Q name="primaryImpedance" label="Primary impedance" hint="Reflected load" /> : null}
        {s.plateToPlateImpedance ? <Q name="plateToPlateImpedance" label="Plate-to-plate load" hint="Reflected load" /> : null}
        {s.primaryResistance ? <Q name="primaryResistance" label="Primary DC resistance" /> : null}
        {s.pushPullClass ? (
          <Field label="Class" htmlFor="f-class">
            <Select id="f-class" {...register('class')}>
              <option value="A">Class A</option>
              <option value="AB">Class AB</option>
            </Select>
          </Field>
        ) : null}
      </Group>

      <Group title="Cathode and bias">
        <Field label="Bias" htmlFor="f-bias-kind" className="col-span-2">
          <Select id="f-bias-kind" {...register('bias.kind')}>
            {BIAS_KINDS[topology].map((b) => (
              <option key={b.value} value={b.value}>
                {b.label}
              </option>
            ))}
          </Select>
        </Field>
        {topology === 'long-tailed-pair' ? (
          <>
            <Field label="Tail" htmlFor="f-tail-kind" className="col-span-2">
              <Select id="f-tail-kind" {...register('tail.kind')}>
                <option value="resistor">Tail resistor</option>
                <option value="current-source">Constant-current tail</option>
              </Select>
            </Field>
            {tailKind === 'current-source' ? (
              <Q name="tail.current" label="Tail current" className="col-span-2" />
            ) : (
              <>
                <Q name="bias.biasResistor" label="Shared bias resistor" hint="Joined cathodes to the tap; 0 for none" />
                <Q name="tail.tailResistor" label="Tail resistor" />
                <Q name="tail.tailSupply" label="Tail return" hint="0 for ground, or a negative supply" />
              </>
            )}
            {biasKind === 'dc-coupled' ? <Q name="bias.gridVoltage" label="Grid DC voltage" hint="Both grids, to ground" /> : null}
            <Q name="secondGridBypass" label="Grid 2 bypass" hint="Grid 2 to ground" />
          </>
        ) : topology === 'split-load' ? (
          <>
            <Q name="cathodeResistor" label="Cathode load" hint="Normally equal to the plate load" />
            <Q name="bias.biasResistor" label="Bias resistor" hint="Cathode to the cathode load" />
            {biasKind === 'dc-coupled' ? <Q name="bias.gridVoltage" label="Grid voltage" hint="DC on the grid, to ground" /> : null}
          </>
        ) : topology === 'cathode-follower' ? (
          <>
            <Q name="cathodeResistor" label="Cathode resistor (total)" />
            {biasKind === 'dc-coupled' ? (
              <Q name="bias.gridVoltage" label="Grid voltage" hint="DC on the grid, to ground" />
            ) : (
              <Q name="bias.biasResistor" label="Bias resistor" hint="Top part, grid leak returns below it" />
            )}
          </>
        ) : biasKind === 'fixed' ? (
          <Q name="bias.fixedBias" label="Fixed bias" hint="Grid to cathode, negative" />
        ) : (
          <>
            <Q name="bias.cathodeResistor" label="Cathode resistor" />
            <Q name="bias.cathodeBypass" label="Cathode bypass" hint="Leave empty for none" />
          </>
        )}
        <Q name="gridResistor" label={topology === 'long-tailed-pair' ? 'Grid leaks (each)' : 'Grid leak'} />
      </Group>

      {s.screen ? (
        <Group title="Screen">
          <Field label="Screen feed" htmlFor="f-screen-kind" className="col-span-2">
            <Select id="f-screen-kind" {...register('screen.kind')}>
              <option value="resistor">Dropping resistor from B+</option>
              <option value="fixed">Fixed supply</option>
            </Select>
          </Field>
          {screenKind === 'resistor' ? (
            <>
              <Q name="screen.resistor" label="Screen resistor" />
              <Q name="screen.bypass" label="Screen bypass" hint="Leave empty for none" />
            </>
          ) : (
            <Q name="screen.supply" label="Screen supply" hint="Empty: same as B+" />
          )}
          {errors.screen ? <p className="col-span-2 text-xs text-over">Screen {errors.screen}.</p> : null}
        </Group>
      ) : null}

      {s.load ? (
        <Group title="Load and coupling">
          <label className="col-span-2 flex items-center gap-2 text-sm">
            <input type="checkbox" className="h-4 w-4 accent-[var(--heater)]" {...register('load.enabled')} />
            {splitter ? 'Each output feeds a load through a coupling capacitor' : 'Feeds a load through a coupling capacitor'}
          </label>
          {loadEnabled ? (
            <>
              <Q name="load.resistance" label="Load (next grid leak)" />
              <Q name="load.couplingCapacitor" label="Coupling capacitor" />
            </>
          ) : null}
        </Group>
      ) : null}

      {s.transformer ? (
        <Group title="Output transformer">
          <label className="col-span-2 flex items-center gap-2 text-sm">
            <input type="checkbox" className="h-4 w-4 accent-[var(--heater)]" {...register('transformer.enabled')} />
            Model the transformer (winding losses, bass and treble limits)
          </label>
          {transformerEnabled ? (
            <>
              <Q name="transformer.speakerLoad" label="Speaker load" hint="4, 8, 16 Ω or any: sets the turns ratio" />
              <Q name="transformer.secondaryResistance" label="Secondary resistance" hint="DC resistance; empty: not modelled" />
              <Q name="transformer.primaryInductance" label="Primary inductance" hint={topology === 'single-ended-output' ? 'At the operating current; empty: no bass limit' : 'Empty: no bass limit'} />
              <Q name="transformer.leakageInductance" label="Leakage inductance" hint="Referred to the primary" />
              <Q name="transformer.windingCapacitance" label="Primary winding capacitance" hint="Empty: no treble resonance" />
            </>
          ) : null}
        </Group>
      ) : null}

      {s.feedback ? (
        <Group title="Global feedback">
          <label className="col-span-2 flex items-center gap-2 text-sm">
            <input type="checkbox" className="h-4 w-4 accent-[var(--heater)]" {...register('feedback.enabled')} />
            Feed the speaker signal back to the first stage&rsquo;s cathode
          </label>
          {feedbackEnabled ? (
            <>
              <Q name="feedback.resistor" label="Feedback resistor" hint="From the speaker terminal" />
              <Q name="feedback.shuntResistor" label="Shunt resistor" hint="Unbypassed, under the first stage's cathode resistor" />
              <Q name="feedback.capacitor" label="Step capacitor" hint="Across the feedback resistor; empty: none" />
              <Field label="Secondary terminal" htmlFor="f-feedback-polarity">
                <Select id="f-feedback-polarity" {...register('feedback.polarity')}>
                  <option value="auto">Whichever gives negative feedback</option>
                  <option value="normal">In phase with the (first) plate</option>
                  <option value="reversed">Reversed</option>
                </Select>
              </Field>
              <p className="col-span-2 text-xs text-muted">The loop needs the transformer above. Margins, damping factor and distortion with and without it are in the project&rsquo;s chain view.</p>
            </>
          ) : null}
        </Group>
      ) : null}

      <Group title="Drive">
        <Q name="drive.amplitude" label="Drive amplitude" hint="Grid signal, peak" />
        <Q name="drive.frequency" label="Frequency" />
        <Q name="sourceResistance" label="Source resistance" hint="Of what drives the grid" />
      </Group>

      <Group title="Rating checks">
        <Q name="derating" label="Near-limit fraction" hint="0.7 marks ratings above 70 % as near" className="col-span-2" />
      </Group>
      <p className="px-4 pb-3 text-xs text-muted">
        Type values as you would write them: <span className="num">100k</span>, <span className="num">4k7</span>, <span className="num">22u</span>,{' '}
        <span className="num">470n</span>, <span className="num">2M2</span>, <span className="num">-1.5</span>, or plain numbers in volts, ohms, farads and hertz.
      </p>
    </fieldset>
    </FieldContext.Provider>
  );
}
