import { describe, expect, it } from 'vitest';
import { analyzeStage, CalcError } from '@/lib/calc';
import { ratingCheck } from '@/lib/calc/ratings';
import { stageBodySchema, stageInputSchema, tubeSchema } from '@/lib/validation/stage';

const tube = { model: 'koren-triode', mu: 100, ex: 1.4, kg1: 1060, kp: 600, kvb: 300 };
const cc = { topology: 'common-cathode', tube, supply: 300, gridResistor: '1M', plateResistor: '100k', bias: { kind: 'cathode', cathodeResistor: '1k5', cathodeBypass: null } };

describe('stage schema', () => {
  it('accepts engineering notation and fills defaults', () => {
    const s = stageInputSchema.parse({ ...cc, bias: { kind: 'cathode', cathodeResistor: '1k5', cathodeBypass: '22µF' } });
    expect(s.gridResistor).toBe(1e6);
    expect((s as Extract<typeof s, { topology: 'common-cathode' }>).bias).toEqual({ kind: 'cathode', cathodeResistor: 1500, cathodeBypass: 22e-6 });
    expect(s.drive).toEqual({ amplitude: 0, frequency: 1000 });
    expect(s.derating).toBe(0.7);
    expect(s.sourceResistance).toBe(0);
  });

  it('rejects meaningless values with field paths and clear messages', () => {
    const r = stageInputSchema.safeParse({ ...cc, supply: 0, plateResistor: -100, gridResistor: '4x7', bias: { kind: 'fixed', fixedBias: 5 } });
    expect(r.success).toBe(false);
    const issues = Object.fromEntries(r.error!.issues.map((i) => [i.path.join('.'), i.message]));
    expect(issues.supply).toMatch(/greater than zero/);
    expect(issues.plateResistor).toMatch(/greater than zero/);
    expect(issues.gridResistor).toBe("'4x7' is not a number: use e.g. 4k7 or 4700");
    expect(issues['bias.fixedBias']).toMatch(/at most/);
  });

  it('requires a screen for pentode output stages and checks the follower bias tap', () => {
    const pentode = { model: 'koren-pentode', mu: 11, ex: 1.35, kg1: 650, kg2: 4200, kp: 60, kvb: 24 };
    const se = stageInputSchema.safeParse({ topology: 'single-ended-output', tube: pentode, supply: 300, gridResistor: '100k', primaryImpedance: '3k', bias: { kind: 'fixed', fixedBias: -14 } });
    expect(se.success).toBe(false);
    expect(se.error!.issues[0]!.path).toEqual(['screen']);
    const cf = stageInputSchema.safeParse({ topology: 'cathode-follower', tube, supply: 300, gridResistor: '1M', bias: { kind: 'self', biasResistor: '30k' }, cathodeResistor: '20k' });
    expect(cf.success).toBe(false);
    expect(cf.error!.issues[0]!.path).toEqual(['bias', 'biasResistor']);
  });

  it('the body variant takes an integer tubeId instead of a tube', () => {
    const { tube: _t, ...rest } = cc;
    expect(stageBodySchema.safeParse({ ...rest, tubeId: 7 }).success).toBe(true);
    expect(stageBodySchema.safeParse({ ...rest, tubeId: 7.5 }).success).toBe(false);
    expect(stageBodySchema.safeParse(cc).success).toBe(false);
    expect(tubeSchema.safeParse({ ...tube, model: 'unknown' }).success).toBe(false);
  });

  it('records the unit in the field metadata', () => {
    const shape = tubeSchema.options[0].shape;
    expect(shape.kvb.description).toBe('V²');
    expect(tubeSchema.options[1].shape.kvb.description).toBe('V');
  });
});

describe('engine errors', () => {
  it('throws a typed CalcError for a stage cut off at idle', () => {
    const input = stageInputSchema.parse({ ...cc, bias: { kind: 'fixed', fixedBias: -40 } });
    expect(() => analyzeStage(input)).toThrow(CalcError);
    try {
      analyzeStage(input);
    } catch (err) {
      expect((err as CalcError).code).toBe('cutoff');
    }
  });

  it('rejects a pentode in the common-cathode topology', () => {
    const input = stageInputSchema.parse({ ...cc, tube: { model: 'koren-pentode', mu: 11, ex: 1.35, kg1: 650, kg2: 4200, kp: 60, kvb: 24 } });
    expect(() => analyzeStage(input)).toThrow(/pentode amplifier/);
  });
});

describe('ratings (common practice: near above 70 % by default)', () => {
  it('ok, near, over and not-checked', () => {
    const spec = { key: 'plate-dissipation' as const, label: 'Plate dissipation', unit: 'W' };
    expect(ratingCheck({ ...spec, value: 0.5, limit: 1 }, 0.7).status).toBe('ok');
    expect(ratingCheck({ ...spec, value: 0.8, limit: 1 }, 0.7).status).toBe('near');
    expect(ratingCheck({ ...spec, value: 0.8, limit: 1 }, 0.9).status).toBe('ok');
    const over = ratingCheck({ ...spec, value: 1.2, limit: 1 }, 0.7);
    expect(over.status).toBe('over');
    expect(over.percent).toBeCloseTo(120, 9);
    const missing = ratingCheck({ ...spec, value: 1.2, limit: undefined }, 0.7);
    expect(missing.status).toBe('not-checked');
    expect(missing.limit).toBeNull();
  });

  it('checks the stage against the tube ratings, with the grid-resistor limit by bias kind', () => {
    const withRatings = { ...tube, ratings: { plateVoltage: 300, plateDissipation: 0.1, gridResistanceCathodeBias: 2e6, gridResistanceFixedBias: 0.5e6 } };
    const r = analyzeStage(stageInputSchema.parse({ ...cc, tube: withRatings }));
    const by = Object.fromEntries(r.ratings.map((x) => [x.key, x]));
    expect(by['plate-dissipation']!.status).toBe('over');
    expect(by['plate-dissipation']!.value).toBeCloseTo(r.operatingPoint.plateDissipation, 12);
    expect(by['grid-resistance']!.limit).toBe(2e6);
    expect(by['cathode-current']!.status).toBe('not-checked');
    expect(r.warnings.some((w) => /Plate dissipation/.test(w))).toBe(true);
    const fixed = analyzeStage(stageInputSchema.parse({ ...cc, tube: withRatings, bias: { kind: 'fixed', fixedBias: -1.5 } }));
    const g = fixed.ratings.find((x) => x.key === 'grid-resistance')!;
    expect(g.limit).toBe(0.5e6);
    expect(g.status).toBe('over');
  });
});
