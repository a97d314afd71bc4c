import { describe, expect, it } from 'vitest';
import { FIELD_UNITS, TOPOLOGIES, fromStageInputs, newStageDefaults, parseStageForm, toFieldText } from '@/components/stage-editor/form';
import { parseEng } from '@/lib/format/number';
import { stageMemberSchemas } from '@/lib/validation/stage';

// Walks optional/default/nullable wrappers and discriminated-union options to the quantity at a dotted path.
function schemaAt(schema: any, path: string[]): any {
  let s = schema;
  for (const key of path) {
    while (s?._zod?.def?.innerType) s = s._zod.def.innerType;
    if (s?._zod?.def?.type === 'union') s = s._zod.def.options.find((o: any) => o.shape?.[key]) ?? s;
    s = s?.shape?.[key];
  }
  while (s?._zod?.def?.innerType) s = s._zod.def.innerType;
  return s;
}

describe('stage form helpers', () => {
  it('writes SI values as practitioners type them and reads them back exactly', () => {
    const cases: [number, string][] = [
      [4700, '4.7k'],
      [100_000, '100k'],
      [2.2e-8, '22n'],
      [2.2e-5, '22u'],
      [2_200_000, '2.2M'],
      [-1.5, '-1.5'],
      [300, '300'],
      [0.7, '0.7'],
      [1000, '1k'],
    ];
    for (const [value, text] of cases) {
      expect(toFieldText(value)).toBe(text);
      expect(parseEng(toFieldText(value))).toBe(value);
    }
  });

  it('turns the starting common-cathode form into SI numbers (4k7-style notation accepted)', () => {
    const values = newStageDefaults('common-cathode', { tubeId: '3' });
    values.plateResistor = '4k7';
    const parsed = parseStageForm(values);
    expect(parsed.ok).toBe(true);
    if (!parsed.ok) return;
    const body = parsed.body as any;
    expect(body.tubeId).toBe(3);
    expect(body.plateResistor).toBe(4700);
    expect(body.bias).toEqual({ kind: 'cathode', cathodeResistor: 1500, cathodeBypass: 22e-6 });
    expect(body.load).toEqual({ resistance: 470_000, couplingCapacitor: 22e-9 });
    expect(body.drive).toEqual({ amplitude: 0.5, frequency: 1000 });
  });

  it('explains a wrong value under its own field and treats an empty bypass as no bypass', () => {
    const values = newStageDefaults('common-cathode', { tubeId: '3' });
    values.bias.cathodeResistor = '4x7';
    const bad = parseStageForm(values);
    expect(bad.ok).toBe(false);
    if (!bad.ok) expect(bad.errors['bias.cathodeResistor']).toMatch(/'4x7' is not a number/);

    values.bias.cathodeResistor = '1k5';
    values.bias.cathodeBypass = '';
    const good = parseStageForm(values);
    expect(good.ok && (good.body as any).bias.cathodeBypass).toBeNull();
  });

  it('asks for a tube before anything else can be analysed', () => {
    const parsed = parseStageForm(newStageDefaults('common-cathode'));
    expect(parsed.ok).toBe(false);
    if (!parsed.ok) expect(parsed.errors.tubeId).toMatch(/tube/);
  });

  it('round-trips every topology through stored inputs and back', () => {
    for (const { value: topology } of TOPOLOGIES) {
      const pentode = topology !== 'common-cathode' && topology !== 'cathode-follower';
      const first = parseStageForm(newStageDefaults(topology, { tubeId: '7' }), { tubeIsPentode: pentode });
      expect(first.ok, `${topology}: ${JSON.stringify(!first.ok && first.errors)}`).toBe(true);
      if (!first.ok) continue;
      const form = fromStageInputs(first.body as any, { name: 'V1', supplyNode: null, tubeTypeId: 7, tubeModelId: null, topology });
      const again = parseStageForm(form, { tubeIsPentode: pentode });
      expect(again.ok && again.body).toEqual(first.body);
    }
  });

  it('shows the same unit beside each field as the schema records', () => {
    let checked = 0;
    for (const { value: topology } of TOPOLOGIES) {
      for (const [path, unit] of Object.entries(FIELD_UNITS)) {
        const field = schemaAt(stageMemberSchemas[topology], path.split('.'));
        if (!field) continue;
        expect(field.meta()?.unit, `${topology} ${path}`).toBe(unit);
        checked++;
      }
    }
    expect(checked).toBeGreaterThan(40);
  });
});
