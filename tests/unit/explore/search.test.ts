// Part search: the exhaustive search finds the same best candidate as a brute-force loop over direct analyses.
import { readFileSync } from 'node:fs';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { analyzeStage } from '@/lib/calc';
import { evaluateCandidate, localRunner, paretoFront, prepareSearch, runSearch, SERIES, seriesValues, setPath } from '@/lib/calc/explore';
import { stageInputSchema, type StageInput } from '@/lib/validation/stage';

const fixture = (name: string): StageInput =>
  stageInputSchema.parse(JSON.parse(readFileSync(path.resolve(__dirname, '../../fixtures/stages', `${name}.json`), 'utf8')));

describe('E series (IEC 60063)', () => {
  it('has 12, 24 and 96 values per decade; E96 values are 10^(i/96) rounded to three figures', () => {
    expect(SERIES.E12).toHaveLength(12);
    expect(SERIES.E24).toHaveLength(24);
    expect(SERIES.E96).toHaveLength(96);
    SERIES.E96.forEach((v, i) => expect(v).toBeCloseTo(Number((10 ** (i / 96)).toPrecision(3)), 10));
    for (const v of SERIES.E12) expect(SERIES.E24).toContain(v);
    expect(seriesValues('E12', 47e3, 470e3)).toEqual([47e3, 56e3, 68e3, 82e3, 100e3, 120e3, 150e3, 180e3, 220e3, 270e3, 330e3, 390e3, 470e3]);
  });
});

describe('part search', () => {
  const input = fixture('cc-12ax7-bypassed');
  const spec = {
    input,
    free: [
      { path: 'plateResistor', min: 47e3, max: 470e3, series: 'E12' as const },
      { path: 'bias.cathodeResistor', min: 470, max: 4700, series: 'E12' as const },
    ],
    constraints: [
      { metric: 'gain' as const, op: 'atLeast' as const, value: 58 },
      { metric: 'plateDissipationShare' as const, op: 'atMost' as const, value: 70 },
    ],
    objective: { metric: 'headroom' as const, direction: 'maximize' as const },
    maxEvaluations: 1000,
    seed: 1,
  };

  it('searches a small space exhaustively and finds the brute-force best', async () => {
    const setup = prepareSearch(spec);
    expect(setup.mode).toBe('exhaustive');
    expect(setup.size).toBe(13 * 13);
    const result = await runSearch(setup, localRunner(setup), 50);
    expect(result.evaluations).toBe(169);

    // brute force with the full analysis the stage editor uses
    let best: { rp: number; rk: number; headroom: number } | null = null;
    let feasible = 0;
    for (const rp of seriesValues('E12', 47e3, 470e3)) {
      for (const rk of seriesValues('E12', 470, 4700)) {
        const a = analyzeStage(setPath(setPath(input, 'plateResistor', rp), 'bias.cathodeResistor', rk));
        const pd = a.ratings.find((r) => r.key === 'plate-dissipation')!.percent!;
        if (Math.abs(a.smallSignal.gain) >= 58 && pd <= 70) {
          feasible++;
          const h = a.largeSignal.headroom.maxDrive;
          if (!best || h > best.headroom) best = { rp, rk, headroom: h };
        }
      }
    }
    expect(best).not.toBeNull();
    expect(result.feasible).toBe(feasible);
    expect(result.best[0]!.parts).toEqual([best!.rp, best!.rk]);
    expect(result.best[0]!.metrics.headroom).toBeCloseTo(best!.headroom, 4);
    // the ranking is by the objective among feasible candidates
    const h = result.best.filter((c) => c.feasible).map((c) => c.metrics.headroom!);
    expect([...h].sort((a, b) => b - a)).toEqual(h);
  });

  it('keeps a Pareto front in which no candidate dominates another', async () => {
    const setup = prepareSearch({ ...spec, tradeoff: [{ metric: 'headroom', direction: 'maximize' }, { metric: 'gain', direction: 'maximize' }] });
    const result = await runSearch(setup, localRunner(setup), 50);
    expect(result.front.length).toBeGreaterThan(1);
    for (const a of result.front) {
      for (const b of result.front) {
        if (a === b) continue;
        const dominates = a.metrics.headroom! >= b.metrics.headroom! && a.metrics.gain! >= b.metrics.gain! && (a.metrics.headroom! > b.metrics.headroom! || a.metrics.gain! > b.metrics.gain!);
        expect(dominates).toBe(false);
      }
    }
    expect(paretoFront(setup, result.front)).toHaveLength(result.front.length);
  });

  it('uses the genetic search when the space is larger than the budget, and reports candidates as analysed', async () => {
    const setup = prepareSearch({ ...spec, maxEvaluations: 120 });
    expect(setup.mode).toBe('genetic');
    const result = await runSearch(setup, localRunner(setup));
    expect(result.evaluations).toBe(120);
    const top = result.best[0]!;
    expect(top.feasible).toBe(true);
    const again = evaluateCandidate(setup, top.index);
    expect(again.metrics.headroom).toBe(top.metrics.headroom);
    const a = analyzeStage(setPath(setPath(input, 'plateResistor', top.parts[0]), 'bias.cathodeResistor', top.parts[1]));
    expect(Math.abs(a.smallSignal.gain)).toBeGreaterThanOrEqual(58 - 1e-6);
  });

  it('refuses a part the stage does not have and a range with no series value', () => {
    expect(() => prepareSearch({ ...spec, free: [{ path: 'screen.resistor', min: 1e3, max: 2e3, series: 'E12' }] })).toThrow(/no part/);
    expect(() => prepareSearch({ ...spec, free: [{ path: 'plateResistor', min: 101e3, max: 102e3, series: 'E12' }] })).toThrow(/No E12 value/);
  });
});
