// Bench-check arithmetic against cases worked by hand (the working is written beside each expectation).
import { describe, expect, it } from 'vitest';
import { BenchInputError, benchDesignFromStage, evaluateBenchCheck, resolveTolerances, type BenchDesign } from '@/lib/calc/bench';

// Design point: 12AX7 common-cathode stage of /work/shared/reference/tube-models.md §6 example A
// (B+ 330 V, Ra 100 kΩ, Rk 1.5 kΩ; Koren parameters; Ia = 1.0753 mA, Vpk ≈ 221 V [C]).
// Ratings: 12AX7 Pa(max) 1 W and Va(max) 300 V [S: Wikipedia 12AX7 infobox, citing Sylvania], Ik 8 mA [M].
const IA = 1.0753e-3;
const VK = IA * 1500; // 1.61295 V
const VP = 330 - IA * 100e3; // 222.47 V
const triode: BenchDesign = {
  topology: 'common-cathode',
  supply: 330,
  pentode: false,
  fixedBias: false,
  plateResistor: 100e3,
  primaryResistance: null,
  cathodeResistor: 1500,
  screenResistor: null,
  operatingPoint: {
    plateVoltage: VP,
    cathodeVoltage: VK,
    plateCurrent: IA,
    cathodeCurrent: IA,
    plateCathodeVoltage: VP - VK, // 220.857 V
    plateDissipation: (VP - VK) * IA, // 0.23749 W
    screenVoltage: null,
    screenCurrent: null,
    screenDissipation: null,
  },
  limits: { plateVoltage: 300, plateDissipation: 1, cathodeCurrent: 8e-3 },
  heaterNominal: 12.6,
};

const row = (r: ReturnType<typeof evaluateBenchCheck>, key: string) => r.comparisons.find((c) => c.key === key)!;

describe('bench check: triode with cathode bias', () => {
  it('derives Ia from Vk/Rk, Vpk and Pa, and passes readings within ±10 %', () => {
    // Readings: B+ 328 V, plate 224 V, cathode 1.58 V.
    // Ik = 1.58 / 1500 = 1.05333 mA (−2.04 % from 1.0753 mA); Vpk = 224 − 1.58 = 222.42 V;
    // Pa = 222.42 × 1.05333 mA = 0.234282 W (−1.35 %).
    const r = evaluateBenchCheck(triode, { supplyVoltage: 328, plateVoltage: 224, cathodeVoltage: 1.58 });
    expect(r.plateCurrentMethod).toBe('cathode');
    expect(r.derived.plateCurrent).toBeCloseTo(1.05333e-3, 8);
    expect(r.derived.plateCathodeVoltage).toBeCloseTo(222.42, 6);
    expect(r.derived.plateDissipation).toBeCloseTo(0.234282, 5);
    expect(row(r, 'plateCurrent').deviation).toBeCloseTo(-0.0204, 3);
    expect(r.comparisons.every((c) => c.status === 'pass')).toBe(true);
    expect(r.verdict).toBe('pass');
    expect(r.summary).toEqual([]);
    // ±10 % is the default tolerance, marked as common practice.
    expect(row(r, 'plateCurrent').tolerance).toBe(0.1);
    expect(row(r, 'plateCurrent').toleranceSource).toBe('common practice');
    expect(row(r, 'plateDissipation').ratingStatus).toBe('ok');
  });

  it('fails a plate current far above design and says what to look at', () => {
    // Cathode 2.2 V → Ik = 2.2 / 1500 = 1.46667 mA: +36.4 % (beyond 2 × 10 %) → fail.
    // Plate 185 V: (185 − 222.47) / 222.47 = −16.8 % → check. Vpk = 182.8 V; Pa = 182.8 × 1.46667 mA = 0.26811 W:
    // +12.9 % → check, well inside the 1 W rating.
    const r = evaluateBenchCheck(triode, { supplyVoltage: 330, plateVoltage: 185, cathodeVoltage: 2.2 });
    expect(r.derived.plateCurrent).toBeCloseTo(1.466667e-3, 8);
    expect(row(r, 'plateCurrent').deviation).toBeCloseTo(0.364, 2);
    expect(row(r, 'plateCurrent').status).toBe('fail');
    expect(row(r, 'plateVoltage').status).toBe('check');
    expect(row(r, 'plateDissipation').measured).toBeCloseTo(0.26811, 4);
    expect(row(r, 'plateDissipation').status).toBe('check');
    expect(r.verdict).toBe('fail');
    expect(r.summary[0]).toMatch(/^Plate current 36 % above design: check the cathode resistor value and the tube's bias/);
  });

  it('uses the plate-resistor drop when the stage is fixed-bias', () => {
    // (330 − 222) / 100 kΩ = 1.08 mA: +0.44 % → pass.
    const r = evaluateBenchCheck({ ...triode, fixedBias: true, cathodeResistor: null, operatingPoint: { ...triode.operatingPoint!, cathodeVoltage: 0 } }, { supplyVoltage: 330, plateVoltage: 222, cathodeVoltage: 0 });
    expect(r.plateCurrentMethod).toBe('plate-resistor');
    expect(r.derived.plateCurrent).toBeCloseTo(1.08e-3, 9);
    expect(r.comparisons.find((c) => c.key === 'cathodeVoltage')).toBeUndefined();
    expect(r.verdict).toBe('pass');
  });

  it('reports check when a reading is outside the tolerance but inside twice it', () => {
    // Cathode 1.85 V → Ik = 1.23333 mA: +14.7 % → check (between 10 % and 20 %).
    const r = evaluateBenchCheck(triode, { supplyVoltage: 330, plateVoltage: 208, cathodeVoltage: 1.85 });
    expect(row(r, 'plateCurrent').status).toBe('check');
    expect(r.verdict).toBe('check');
    expect(r.summary.join(' ')).toMatch(/Plate current 15 % above design/);
  });

  it('takes a project tolerance in place of the default', () => {
    // Same 1.05333 mA reading (−2.04 %) against a project tolerance of ±1.5 % → check, and the source says so.
    const tol = resolveTolerances({ plateCurrent: 0.015 });
    const r = evaluateBenchCheck(triode, { supplyVoltage: 328, plateVoltage: 224, cathodeVoltage: 1.58 }, tol);
    expect(row(r, 'plateCurrent').toleranceSource).toBe('project');
    expect(row(r, 'plateCurrent').status).toBe('check');
    expect(row(r, 'supplyVoltage').toleranceSource).toBe('common practice');
  });

  it('checks the heater against ±10 % of nominal (common practice)', () => {
    // 12.0 V on a 12.6 V heater: −4.8 % → pass. 11.2 V: −11.1 % → over the ±10 % limit → fail.
    const ok = evaluateBenchCheck(triode, { supplyVoltage: 328, plateVoltage: 224, cathodeVoltage: 1.58, heaterVoltage: 12.0 });
    expect(row(ok, 'heaterVoltage').status).toBe('pass');
    const low = evaluateBenchCheck(triode, { supplyVoltage: 328, plateVoltage: 224, cathodeVoltage: 1.58, heaterVoltage: 11.2 });
    expect(row(low, 'heaterVoltage').deviation).toBeCloseTo(-0.1111, 3);
    // a low heater is under its nominal band, not over anything (common practice: ±10 % of nominal)
    expect(row(low, 'heaterVoltage').ratingStatus).toBe('under');
    const high = evaluateBenchCheck(triode, { supplyVoltage: 328, plateVoltage: 224, cathodeVoltage: 1.58, heaterVoltage: 14.0 });
    expect(row(high, 'heaterVoltage').ratingStatus).toBe('over');
    expect(low.verdict).toBe('fail');
    expect(low.summary[0]).toMatch(/Heater voltage 11 % below nominal/);
  });

  it('refuses readings where the plate is above the supply, naming the field', () => {
    expect(() => evaluateBenchCheck(triode, { supplyVoltage: 300, plateVoltage: 320, cathodeVoltage: 1.6 })).toThrow(BenchInputError);
    try {
      evaluateBenchCheck(triode, { supplyVoltage: 300, plateVoltage: 320, cathodeVoltage: 1.6 });
    } catch (e) {
      expect((e as BenchInputError).field).toBe('plateVoltage');
    }
  });
});

// Design point: EL84 single-ended, Va = Vg2 = 250 V, Ia 48 mA, Ig2 5.5 mA (Ik 53.5 mA) [M, tube-models.md §4.2];
// ratings Pa 12 W, Vg2 300 V, Pg2 2 W [S: ru.wikipedia EL84 infobox], Ik 65 mA [M].
const el84: BenchDesign = {
  topology: 'single-ended-output',
  supply: 260,
  pentode: true,
  fixedBias: false,
  plateResistor: null,
  primaryResistance: 200,
  cathodeResistor: 135,
  screenResistor: 1000,
  operatingPoint: {
    plateVoltage: 257.2,
    cathodeVoltage: 7.2225,
    plateCurrent: 48e-3,
    cathodeCurrent: 53.5e-3,
    plateCathodeVoltage: 250,
    plateDissipation: 12,
    screenVoltage: 254.5,
    screenCurrent: 5.5e-3,
    screenDissipation: 1.35,
  },
  limits: { plateVoltage: 300, plateDissipation: 12, screenVoltage: 300, screenDissipation: 2, cathodeCurrent: 65e-3 },
  heaterNominal: 6.3,
};

describe('bench check: pentode', () => {
  it('subtracts the screen current measured across the screen resistor, and fails Pa over the rating', () => {
    // Ik = 7.3 / 135 = 54.074 mA; Ig2 = (260 − 254.5) / 1 kΩ = 5.5 mA; Ia = 48.574 mA.
    // Vpk = 258 − 7.3 = 250.7 V; Pa = 250.7 × 48.574 mA = 12.177 W > 12 W → over → fail.
    const r = evaluateBenchCheck(el84, { supplyVoltage: 260, plateVoltage: 258, cathodeVoltage: 7.3, screenVoltage: 254.5 });
    expect(r.plateCurrentMethod).toBe('cathode');
    expect(r.derived.cathodeCurrent).toBeCloseTo(54.074e-3, 6);
    expect(r.derived.screenCurrent).toBeCloseTo(5.5e-3, 9);
    expect(r.derived.plateCurrent).toBeCloseTo(48.574e-3, 6);
    expect(r.derived.plateDissipation).toBeCloseTo(12.177, 2);
    expect(row(r, 'plateDissipation').ratingStatus).toBe('over');
    expect(row(r, 'plateDissipation').status).toBe('fail');
    expect(r.verdict).toBe('fail');
    expect(r.summary[0]).toMatch(/^Plate dissipation is over the tube's rating \(1 % above it\)/);
    // Screen: Pg2 = (254.5 − 7.3) × 5.5 mA = 1.3596 W, inside 2 W.
    expect(row(r, 'screenDissipation').measured).toBeCloseTo(1.3596, 3);
    expect(row(r, 'screenDissipation').ratingStatus).toBe('ok');
  });

  it("splits the cathode current by the design's screen ratio when there is no screen resistor", () => {
    // Ik = 7.0 / 135 = 51.852 mA; design Ig2/Ik = 5.5 / 53.5 = 0.102804; Ig2 = 5.3306 mA; Ia = 46.521 mA (−3.1 %).
    // Vpk = 257 − 7 = 250 V; Pa = 11.630 W = 96.9 % of 12 W → near the rating → check.
    const r = evaluateBenchCheck({ ...el84, screenResistor: null }, { supplyVoltage: 260, plateVoltage: 257, cathodeVoltage: 7.0, screenVoltage: 255 });
    expect(r.derived.screenCurrent).toBeCloseTo(5.3306e-3, 6);
    expect(r.derived.plateCurrent).toBeCloseTo(46.521e-3, 5);
    expect(row(r, 'plateDissipation').ratingStatus).toBe('near');
    expect(row(r, 'plateDissipation').status).toBe('check');
    expect(r.verdict).toBe('check');
    expect(r.summary.join(' ')).toMatch(/within 10 % of the tube's rating \(97 % of the limit\)/);
  });
});

describe('bench check: transformer-loaded and fixed-bias stages', () => {
  const pp = benchDesignFromStage({
    inputs: { topology: 'push-pull-output', supply: 320, class: 'AB', plateToPlateImpedance: 8000, primaryResistance: 200, bias: { kind: 'fixed', fixedBias: -12 }, screen: { kind: 'fixed' } },
    operatingPoint: { ...el84.operatingPoint!, plateVoltage: 316, cathodeVoltage: 0, plateCurrent: 40e-3, plateCathodeVoltage: 316, plateDissipation: 12.64 },
    ratings: [{ key: 'plate-dissipation', label: 'Pa', value: 12.64, limit: 14, unit: 'W', percent: 90, status: 'near', caution: null }],
    pentode: true,
    heaterNominal: 6.3,
  });

  it('maps a push-pull stage to one tube: half the primary resistance, fixed bias', () => {
    expect(pp.primaryResistance).toBe(100);
    expect(pp.fixedBias).toBe(true);
    expect(pp.plateResistor).toBeNull();
    expect(pp.limits.plateDissipation).toBe(14);
  });

  it('uses the drop across the half primary: (320 − 316) / 100 Ω = 40 mA', () => {
    const r = evaluateBenchCheck(pp, { supplyVoltage: 320, plateVoltage: 316, cathodeVoltage: 0 });
    expect(r.plateCurrentMethod).toBe('primary-resistance');
    expect(r.derived.plateCurrent).toBeCloseTo(0.04, 9);
  });

  it('needs a measured current when nothing can be measured across, and uses it when given', () => {
    const noDrop = { ...pp, primaryResistance: null };
    expect(() => evaluateBenchCheck(noDrop, { supplyVoltage: 320, plateVoltage: 316, cathodeVoltage: 0 })).toThrow(/enter the plate current read on a meter/);
    // Measured 44 mA: +10 % on 40 mA exactly at the edge (10.0 %) → still inside; Pa = 316 × 44 mA = 13.904 W,
    // 99.3 % of the 14 W rating → near → check.
    const r = evaluateBenchCheck(noDrop, { supplyVoltage: 320, plateVoltage: 316, cathodeVoltage: 0, measuredCurrent: 0.0439 });
    expect(r.plateCurrentMethod).toBe('measured');
    expect(r.derived.plateDissipation).toBeCloseTo(316 * 0.0439, 6);
    expect(row(r, 'plateCurrent').status).toBe('pass');
    expect(row(r, 'plateDissipation').ratingStatus).toBe('near');
  });

  it('gives fixed-bias advice about the grid bias, never about a cathode resistor', () => {
    // 52 mA where 40 mA was designed (+30 %): the bias supply is the place to look on a fixed-bias stage
    const hot = evaluateBenchCheck({ ...pp, primaryResistance: null }, { supplyVoltage: 320, plateVoltage: 316, cathodeVoltage: 0, measuredCurrent: 0.052 });
    const advice = row(hot, 'plateCurrent').advice!;
    expect(advice).toMatch(/grid bias is less negative than designed/);
    expect(hot.summary.join(' ')).not.toMatch(/cathode resistor/);
    const cold = evaluateBenchCheck({ ...pp, primaryResistance: null }, { supplyVoltage: 320, plateVoltage: 316, cathodeVoltage: 0, measuredCurrent: 0.03 });
    expect(row(cold, 'plateCurrent').advice).toMatch(/grid bias is more negative than designed/);
  });

  it('counts a shared cathode resistor twice for each tube of a push-pull pair', () => {
    // Rk = 130 Ω shared; Vk = 11.7 V → 90 mA for the pair, 45 mA per tube = 11.7 / (2 × 130).
    const cathodePP = benchDesignFromStage({
      inputs: { topology: 'push-pull-output', supply: 320, primaryResistance: 200, bias: { kind: 'cathode', cathodeResistor: 130, cathodeBypass: null } },
      operatingPoint: null,
      ratings: null,
      pentode: false,
      heaterNominal: null,
    });
    const r = evaluateBenchCheck(cathodePP, { supplyVoltage: 320, plateVoltage: 312, cathodeVoltage: 11.7 });
    expect(r.derived.plateCurrent).toBeCloseTo(0.045, 9);
    // No analysis: nothing to compare with, no ratings known → every row passes on its own terms.
    expect(row(r, 'plateCurrent').design).toBeNull();
    expect(r.verdict).toBe('pass');
  });
});
