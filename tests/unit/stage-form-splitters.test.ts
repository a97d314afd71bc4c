// The stage editor's form for the phase splitters: starting values parse, every variant maps to the engine's
// body, stored inputs come back to the same form, and a wrong value is reported under the field the form shows.
import { describe, expect, it } from 'vitest';
import { fromStageInputs, newStageDefaults, parseStageForm, type StageFormValues } from '@/components/stage-editor/form';

const meta = (topology: string) => ({ name: 'PI', supplyNode: null, tubeTypeId: 3, tubeModelId: null, topology });

function roundTrip(v: StageFormValues) {
  const parsed = parseStageForm(v);
  if (!parsed.ok) throw new Error(JSON.stringify(parsed.errors));
  const back = fromStageInputs(parsed.body as unknown as Record<string, unknown>, meta(v.topology));
  const again = parseStageForm(back);
  if (!again.ok) throw new Error(JSON.stringify(again.errors));
  return { body: parsed.body as Record<string, any>, again: again.body as Record<string, any> };
}

describe('long-tailed pair form', () => {
  it('starting values: 100k plates, 1k bias resistor over a 22k tail, grids to the tap', () => {
    const { body, again } = roundTrip(newStageDefaults('long-tailed-pair', { tubeId: '3' }));
    expect(body.plateResistors).toEqual({ inverting: 100e3, nonInverting: 100e3 });
    expect(body.tail).toEqual({ kind: 'resistor', biasResistor: 1e3, tailResistor: 22e3, tailSupply: 0 });
    expect(body.grids).toEqual({ kind: 'bias-tap' });
    expect(body.secondGridBypass).toBeCloseTo(100e-9, 15);
    expect(body.load).toEqual({ resistance: 220e3, couplingCapacitor: 100e-9 });
    expect(again).toEqual(body);
  });

  it('a current-source tail with DC-coupled grids and trimmed plates survives the round trip', () => {
    const v = newStageDefaults('long-tailed-pair', { tubeId: '3' });
    v.secondPlateResistor = '105k';
    v.tail = { ...v.tail, kind: 'current-source', current: '2m' };
    v.bias = { ...v.bias, kind: 'dc-coupled', gridVoltage: '85' };
    const { body, again } = roundTrip(v);
    expect(body.tail).toEqual({ kind: 'current-source', current: 2e-3 });
    expect(body.grids).toEqual({ kind: 'dc', gridVoltage: 85 });
    expect(body.plateResistors.nonInverting).toBe(105e3);
    expect(again).toEqual(body);
  });

  it('reports errors under the fields the form shows', () => {
    const v = newStageDefaults('long-tailed-pair', { tubeId: '3' });
    v.secondPlateResistor = '-5';
    v.bias = { ...v.bias, biasResistor: '0' };
    const parsed = parseStageForm(v);
    expect(parsed.ok).toBe(false);
    if (parsed.ok) return;
    expect(parsed.errors.secondPlateResistor).toMatch(/greater than zero/);
    // grids to the bias tap need a bias resistor above it
    expect(parsed.errors['bias.biasResistor']).toMatch(/needed/);
  });
});

describe('split-load form', () => {
  it('starting values: equal 22k loads, 1k5 bias resistor, bootstrapped grid leak', () => {
    const { body, again } = roundTrip(newStageDefaults('split-load', { tubeId: '3' }));
    expect(body.plateResistor).toBe(22e3);
    expect(body.cathodeResistor).toBe(22e3);
    expect(body.biasResistor).toBe(1.5e3);
    expect(body.bias).toEqual({ kind: 'bootstrapped' });
    expect(again).toEqual(body);
  });

  it('a DC-coupled grid', () => {
    const v = newStageDefaults('split-load', { tubeId: '3' });
    v.bias = { ...v.bias, kind: 'dc-coupled', gridVoltage: '110' };
    const { body, again } = roundTrip(v);
    expect(body.bias).toEqual({ kind: 'dc-coupled', gridVoltage: 110 });
    expect(again).toEqual(body);
  });
});
