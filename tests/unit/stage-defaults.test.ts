// A new stage of each topology starts from a suitable library type with a model, and its starting parts give a
// valid idle point within that type's ratings (the seeded library: Koren's published sets and datasheet ratings).
import { describe, expect, it } from 'vitest';
import { newStageDefaults, TOPOLOGIES, toStageBodyInput } from '@/components/stage-editor/form';
import { suitableTube } from '@/components/stage-editor/tube-choice';
import { analyzeStage } from '@/lib/calc';
import { stageInputSchema } from '@/lib/calc/input';
import { engineTubeFrom } from '@/lib/tubes/engine-tube';
import { TUBE_LIBRARY } from '@/seeders/20261202000200-tube-library';

const options = TUBE_LIBRARY.map((t, i) => ({ id: i + 1, designation: t.designation, family: t.family, rated: !!t.ratings.plateDissipation, models: t.model ? [t.model] : [] }));

describe('new stage defaults', () => {
  for (const { value: topology } of TOPOLOGIES) {
    it(`${topology}: a usual type with a model, idle within ratings`, () => {
      const id = suitableTube(topology, options);
      expect(id).not.toBe('');
      const seed = TUBE_LIBRARY[Number(id) - 1]!;
      expect(seed.model, `${seed.designation} has a model`).toBeTruthy();
      expect(seed.ratings.plateDissipation, `${seed.designation} has ratings`).toBeTruthy();
      if (topology.includes('output') || topology === 'pentode-amplifier') expect(seed.designation).not.toMatch(/^12A/);

      const v = newStageDefaults(topology, { tubeId: id });
      const { tubeId: _t, ...body } = toStageBodyInput(v, { tubeIsPentode: seed.family !== 'triode' });
      const tube = engineTubeFrom(seed as never, { name: 'Koren', kind: seed.model!.kind, parameters: seed.model!.parameters });
      const a = analyzeStage(stageInputSchema.parse({ ...body, tube }));
      const op = a.operatingPoint;
      const supply = Number(v.supply);
      // a valid idle point: current flows, the plate sits well inside the supply (not saturated, not cut off)
      expect(op.plateCurrent).toBeGreaterThan(0.3e-3);
      expect(op.plateCathodeVoltage).toBeGreaterThan(0.15 * supply);
      expect(op.plateCathodeVoltage).toBeLessThan(supply);
      const over = a.ratings.filter((r) => r.status === 'over').map((r) => `${r.label} ${r.value} > ${r.limit}`);
      expect(over, `${topology} on ${seed.designation}`).toEqual([]);
    });
  }

  it('starts output stages with a grid resistor within the usual limits (fixed bias 100 kΩ, cathode bias 220 kΩ)', () => {
    expect(newStageDefaults('push-pull-output').gridResistor).toBe('100k');
    expect(newStageDefaults('single-ended-output').gridResistor).toBe('220k');
  });
});
