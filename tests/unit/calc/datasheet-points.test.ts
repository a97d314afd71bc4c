import { readFileSync } from 'node:fs';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { analyzeStage } from '@/lib/calc';
import { stageInputSchema } from '@/lib/validation/stage';

// Datasheet operating points reproduced by the stage fixtures (tests/fixtures/stages) with Koren's published
// parameter sets, checked against the published datasheet figure, not against ngspice.
// Sources as transcribed in /work/shared/reference/tube-models.md §4 ([S: …] found in the named source,
// [M] from memory of the handbooks: nominal values with the usual spread).
// Tolerances follow the reference's rule for test design (§4.2–4.3): samples spread by up to about ±30 %, so no
// tolerance is tighter than the model's own fit error: ±10 % on a triode's Ia at a fitted point, ±15 % on a
// pentode's Ia, ±25 % on gm, ra and output power (engineering judgement, stated in §4.3).

type Json = Record<string, unknown>;
const fixture = (name: string): Json => JSON.parse(readFileSync(path.join(import.meta.dirname, '../../fixtures/stages', `${name}.json`), 'utf8'));
const run = (raw: Json) => analyzeStage(stageInputSchema.parse(raw));
const within = (value: number, published: number, tolerance: number) => Math.abs(value / published - 1) <= tolerance;

describe('push-pull output pair at its datasheet operating point', () => {
  // 6L6GC push-pull class AB1: Va 450 V, Vg2 400 V, Vg1 −37 V, Raa 5.6 kΩ → Po 55 W
  // [S: Wikipedia 6L6 infobox, citing GE "Essential Characteristics" 1973; ref §4.2]. Fixture pp-6l6-ab-fixed.
  const pair = fixture('pp-6l6-ab-fixed');

  it('the fixture is the datasheet circuit (450 V, 400 V screen, −37 V, 5.6 kΩ plate to plate)', () => {
    const input = stageInputSchema.parse(pair);
    expect(input.topology).toBe('push-pull-output');
    if (input.topology !== 'push-pull-output') return;
    expect(input.supply).toBe(450);
    expect(input.plateToPlateImpedance).toBe(5600);
    expect(input.bias).toMatchObject({ kind: 'fixed', fixedBias: -37 });
    expect(input.screen).toMatchObject({ kind: 'fixed', supply: 400 });
  });

  it('rated output power 55 W ±25 % at full class AB1 drive (grids driven up to 0 V: peak drive = |Vg1|, common practice)', () => {
    const r = run({ ...pair, drive: { amplitude: 37, frequency: 1000 } });
    const po = r.largeSignal?.outputPower;
    expect(po).toBeTypeOf('number');
    expect(within(po!, 55, 0.25)).toBe(true);
  });

  it('its idle plate dissipation stays under the 30 W rating (rating [S: same])', () => {
    const r = run(pair);
    expect(r.operatingPoint.plateDissipation).toBeLessThan(30);
    expect(r.operatingPoint.plateDissipation).toBeGreaterThan(0);
  });
});

describe('single-tube datasheet points', () => {
  const sixL6 = fixture('pp-6l6-ab-fixed').tube;

  it('6L6GC class A1: Va 350 V, Vg2 250 V, Vg1 −18 V → Ia 54 mA ±15 % [S: Wikipedia 6L6 infobox, GE 1973]', () => {
    // fixture se-el34-pentode with the 6L6GC and an ideal (0 Ω) primary so that Va equals the supply
    const r = run({ ...fixture('se-el34-pentode'), tube: sixL6, supply: 350, primaryResistance: 0, primaryImpedance: '4k2', bias: { kind: 'fixed', fixedBias: -18 }, screen: { kind: 'fixed', supply: 250 } });
    expect(r.operatingPoint.plateCathodeVoltage).toBeCloseTo(350, 6);
    expect(within(r.operatingPoint.plateCurrent, 54e-3, 0.15)).toBe(true);
  });

  it('6L6GC class A1: Va = Vg2 = 250 V, Vg1 −14 V → Ia 72 mA ±15 %, gm 6.0 mA/V ±25 % [M]', () => {
    const r = run({ ...fixture('se-el34-pentode'), tube: sixL6, supply: 250, primaryResistance: 0, primaryImpedance: '2k5', bias: { kind: 'fixed', fixedBias: -14 }, screen: { kind: 'fixed', supply: 250 } });
    expect(within(r.operatingPoint.plateCurrent, 72e-3, 0.15)).toBe(true);
    expect(within(r.smallSignal.gm, 6.0e-3, 0.25)).toBe(true);
  });

  it('300B: 300 V, −61 V → 60 mA ±10 %, gm ≈ 5.5 mA/V and ra ≈ 700 Ω ±25 % [M] (fixture se-300b-fixed)', () => {
    const r = run(fixture('se-300b-fixed'));
    expect(within(r.operatingPoint.plateCathodeVoltage, 300, 0.01)).toBe(true);
    expect(within(r.operatingPoint.plateCurrent, 60e-3, 0.1)).toBe(true);
    expect(within(r.smallSignal.gm, 5.5e-3, 0.25)).toBe(true);
    expect(within(r.smallSignal.ra, 700, 0.25)).toBe(true);
  });

  it('2A3 single-ended: 250 V, −45 V → 60 mA ±10 %; 2.5 kΩ load → 3.5 W ±25 % [M] (fixture se-2a3-cathode at the datasheet bias)', () => {
    const r = run({ ...fixture('se-2a3-cathode'), supply: 250, primaryResistance: 0, bias: { kind: 'fixed', fixedBias: -45 }, drive: { amplitude: 45, frequency: 1000 } });
    expect(within(r.operatingPoint.plateCurrent, 60e-3, 0.1)).toBe(true);
    expect(within(r.largeSignal!.outputPower!, 3.5, 0.25)).toBe(true);
    expect(within(r.smallSignal.gm, 5.25e-3, 0.25)).toBe(true);
    expect(within(r.smallSignal.ra, 800, 0.25)).toBe(true);
  });

  it('12AU7: 250 V, −8.5 V → 10.5 mA ±10 % [M]; gm 2.2 mA/V [S: Oktoda wiki ECC82] and ra 7.7 kΩ [M] ±25 % (fixture cc-12au7-fixed)', () => {
    const r = run({ ...fixture('cc-12au7-fixed'), supply: 250, plateResistor: 1, bias: { kind: 'fixed', fixedBias: -8.5 } });
    expect(within(r.operatingPoint.plateCathodeVoltage, 250, 0.001)).toBe(true);
    expect(within(r.operatingPoint.plateCurrent, 10.5e-3, 0.1)).toBe(true);
    expect(within(r.smallSignal.gm, 2.2e-3, 0.25)).toBe(true);
    expect(within(r.smallSignal.ra, 7.7e3, 0.25)).toBe(true);
  });

  it("12AX7: 250 V, −2 V → 1.2 mA [S: Wikipedia 12AX7 infobox, Sylvania] within ±30 %, the reference's bound for Koren's original 12AX7 set (§4.3)", () => {
    const r = run({ ...fixture('cc-12ax7-bypassed'), supply: 250, plateResistor: 1, bias: { kind: 'fixed', fixedBias: -2 }, load: undefined });
    expect(within(r.operatingPoint.plateCurrent, 1.2e-3, 0.3)).toBe(true);
  });
});
