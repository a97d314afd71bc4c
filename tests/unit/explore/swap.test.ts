// Tube swap: every row agrees with a single analysis of the stage with that tube, and the suggested part change
// does what it says.
import { readFileSync } from 'node:fs';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { analyzeStage } from '@/lib/calc';
import { setPath, tubeSwap, type SwapCandidate } from '@/lib/calc/explore';
import { stageInputSchema, type StageInput } from '@/lib/validation/stage';

const fixture = (name: string): StageInput =>
  stageInputSchema.parse(JSON.parse(readFileSync(path.resolve(__dirname, '../../fixtures/stages', `${name}.json`), 'utf8')));

describe('tube swap', () => {
  const input = fixture('cc-12ax7-bypassed');
  const candidates: SwapCandidate[] = [
    { tubeId: 1, designation: '12AX7', tube: input.tube },
    { tubeId: 2, designation: '12AT7', tube: fixture('cc-12at7-bypassed').tube },
    { tubeId: 3, designation: '12AU7', tube: fixture('cc-12au7-fixed').tube },
    { tubeId: 4, designation: 'EL34', tube: fixture('pentode-el34-screen-resistor').tube },
  ];
  const rows = tubeSwap(input, candidates, 1);

  it('leaves out a pentode from a common-cathode triode stage', () => {
    expect(rows.map((r) => r.designation)).toEqual(['12AX7', '12AT7', '12AU7']);
    expect(rows[0]!.current).toBe(true);
  });

  it('reports what a single analysis of the swapped stage reports', () => {
    for (const row of rows) {
      const c = candidates.find((x) => x.tubeId === row.tubeId)!;
      const a = analyzeStage({ ...input, tube: c.tube } as StageInput);
      expect(row.plateCurrent).toBe(a.operatingPoint.plateCurrent);
      expect(row.plateCathodeVoltage).toBe(a.operatingPoint.plateCathodeVoltage);
      expect(row.gain).toBe(a.smallSignal.gain);
      expect(row.headroom).toBe(a.largeSignal.headroom.maxDrive);
      expect(row.thd).toBe(a.largeSignal.thdPercent);
      expect(row.plateDissipationPercent).toBe(a.ratings.find((r) => r.key === 'plate-dissipation')!.percent);
    }
  });

  it('re-solves the cathode resistor for the original plate current (to the nearest E24 value)', () => {
    const target = analyzeStage(input).operatingPoint.plateCurrent;
    const at = rows.find((r) => r.designation === '12AT7')!;
    // a 12AT7 (µ ≈ 60) draws several times the 12AX7's current on the same 1k5: a larger resistor is asked for
    expect(at.plateCurrent!).toBeGreaterThan(1.5 * target);
    const change = at.changes.find((c) => c.path === 'bias.cathodeResistor')!;
    expect(change.to).toBeGreaterThan(1500);
    const a = analyzeStage(setPath({ ...input, tube: candidates[1]!.tube } as StageInput, 'bias.cathodeResistor', change.to));
    expect(change.plateCurrent).toBeCloseTo(a.operatingPoint.plateCurrent, 9);
    // E24 steps are ~10 % apart, so the rounded value lands within ~6 % of the target current
    expect(Math.abs(a.operatingPoint.plateCurrent / target - 1)).toBeLessThan(0.06);
  });
});
