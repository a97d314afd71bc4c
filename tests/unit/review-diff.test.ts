import { describe, expect, it } from 'vitest';
import { revisionHash } from '@/lib/review/content';
import { diffSnapshots, flatten, magnitudeChange } from '@/lib/review/diff';
import { canonicalJson, contentHash } from '@/lib/review/hash';
import type { RevisionSnapshot, SnapshotStage } from '@/lib/review/types';

function stage(over: Partial<SnapshotStage> & { id: number }): SnapshotStage {
  return {
    projectId: 1,
    position: over.id,
    name: `Stage ${over.id}`,
    topology: 'common-cathode',
    tubeTypeId: 1,
    tubeModelId: null,
    tubeDesignation: '12AX7',
    supplyNode: null,
    inputs: { topology: 'common-cathode', tubeId: 1, supply: 330, plateResistor: 100e3, gridResistor: 1e6, bias: { kind: 'cathode', cathodeResistor: 1500, cathodeBypass: 22e-6 } },
    version: 1,
    analysis: {
      operatingPoint: { plateVoltage: 222.5, plateCathodeVoltage: 220.9, plateCurrent: 1.0753e-3, gridCathodeVoltage: -1.61, cathodeVoltage: 1.61 },
      smallSignal: { gain: -61.7, gm: 1.8776e-3, ra: 48.97e3, mu: 91.98 },
      ratings: [{ key: 'plate-dissipation', label: 'Plate dissipation', value: 0.2375, limit: 1, unit: 'W', percent: 24, status: 'ok', caution: null }],
    } as never,
    analysisError: null,
    updatedAt: '2026-12-01T10:00:00.000Z',
    ...over,
  };
}

function snapshot(stages: SnapshotStage[], over: Partial<RevisionSnapshot> = {}): RevisionSnapshot {
  return { id: 1, name: 'Bench preamp', description: '', status: 'draft', archived: false, version: 3, owner: { id: 2, displayName: 'T' }, supply: { rawVoltage: 340 }, benchTolerances: {}, updatedAt: '2026-12-01T10:00:00.000Z', stages, ...over };
}

describe('canonical JSON and the content hash', () => {
  it('sorts keys at every depth and drops undefined, so key order does not change the hash', () => {
    expect(canonicalJson({ b: 1, a: { d: [1, { z: 1, y: 2 }], c: undefined } })).toBe('{"a":{"d":[1,{"y":2,"z":1}]},"b":1}');
    expect(contentHash({ a: 1, b: 2 })).toBe(contentHash({ b: 2, a: 1 }));
    // sha256 of the text '{"a":1}' (computed with `printf '{"a":1}' | sha256sum`)
    expect(contentHash({ a: 1 })).toBe('015abd7f5cc57a2dd94b7590f04ad8084273905ee33ec5cebeae62276a97f862');
  });

  it('ignores bookkeeping (status, versions, timestamps) but not the design', () => {
    const a = snapshot([stage({ id: 1 })]);
    const b = snapshot([stage({ id: 1, version: 7, updatedAt: '2027-01-01T00:00:00.000Z' })], { status: 'approved', version: 9 });
    expect(revisionHash(a)).toBe(revisionHash(b));
    const c = snapshot([stage({ id: 1, inputs: { ...stage({ id: 1 }).inputs, plateResistor: 220e3 } })]);
    expect(revisionHash(c)).not.toBe(revisionHash(a));
    expect(revisionHash(a)).toMatch(/^[0-9a-f]{64}$/);
  });
});

describe('revision diff', () => {
  it('flattens nested inputs to dotted paths, using keys inside keyed arrays', () => {
    expect(flatten({ bias: { kind: 'cathode', cathodeResistor: 1500 }, nodes: [{ key: 'B2', r: 1 }] })).toEqual({ 'bias.kind': 'cathode', 'bias.cathodeResistor': 1500, 'nodes.B2.key': 'B2', 'nodes.B2.r': 1 });
  });

  it('reports changed inputs and results side by side, and added and removed stages', () => {
    const base = snapshot([stage({ id: 1 }), stage({ id: 2, name: 'Driver' })]);
    const changed = stage({
      id: 1,
      inputs: { ...stage({ id: 1 }).inputs, bias: { kind: 'cathode', cathodeResistor: 2200, cathodeBypass: 22e-6 } },
      analysis: { ...(stage({ id: 1 }).analysis as object), operatingPoint: { plateVoltage: 240, plateCathodeVoltage: 238, plateCurrent: 0.9e-3, gridCathodeVoltage: -1.98, cathodeVoltage: 1.98 } } as never,
    });
    const next = snapshot([changed, stage({ id: 3, name: 'Cathode follower', topology: 'cathode-follower' })], { name: 'Bench preamp mk2' });
    const diff = diffSnapshots(base, next, 4);

    expect(diff.base).toEqual({ number: 4 });
    expect(diff.project).toEqual([expect.objectContaining({ path: 'name', before: 'Bench preamp', after: 'Bench preamp mk2', change: 'changed' })]);
    expect(diff.counts).toEqual({ added: 1, removed: 1, changed: 1, unchanged: 0 });

    const s1 = diff.stages.find((s) => s.stageId === 1)!;
    expect(s1.change).toBe('changed');
    expect(s1.inputs).toEqual([expect.objectContaining({ path: 'inputs.bias.cathodeResistor', label: 'Cathode resistor', unit: 'Ω', before: 1500, after: 2200, change: 'changed' })]);
    const ia = s1.results.find((r) => r.path === 'analysis.operatingPoint.plateCurrent')!;
    expect(ia).toMatchObject({ before: 1.0753e-3, after: 0.9e-3, change: 'changed', unit: 'A' });
    // |0.9| / |1.0753| − 1 = −16.3 %: the current became smaller
    expect(ia.magnitude?.direction).toBe('smaller');
    expect(ia.magnitude?.percent).toBeCloseTo(-16.3, 1);
    // Gain did not change: listed for the side-by-side view, flagged the same.
    expect(s1.results.find((r) => r.path === 'analysis.smallSignal.gain')!.change).toBe('same');

    expect(diff.stages.find((s) => s.stageId === 2)!.change).toBe('removed');
    const added = diff.stages.find((s) => s.stageId === 3)!;
    expect(added.change).toBe('added');
    expect(added.inputs.every((c) => c.change === 'added')).toBe(true);
  });

  it('says which way the magnitude of a negative value moved instead of a signed percentage', () => {
    // a gain going from −57.3 to −64.5 is a larger gain (12.6 % more), not "−13 %"
    expect(magnitudeChange(-57.3, -64.5)).toEqual({ direction: 'larger', percent: expect.closeTo(12.57, 1) });
    expect(magnitudeChange(-64.5, -57.3).direction).toBe('smaller');
    expect(magnitudeChange(-1.5, 1.5)).toEqual({ direction: 'sign-changed', percent: null });
    expect(magnitudeChange(0, 2)).toEqual({ direction: 'larger', percent: null });
    expect(magnitudeChange(2, 2).direction).toBe('same');
  });

  it('marks every stage unchanged when nothing differs, and treats a first revision as all new', () => {
    const a = snapshot([stage({ id: 1 })]);
    expect(diffSnapshots(a, snapshot([stage({ id: 1, version: 5 })]), 1).counts).toEqual({ added: 0, removed: 0, changed: 0, unchanged: 1 });
    const first = diffSnapshots(null, a);
    expect(first.base).toBeNull();
    expect(first.stages[0]!.change).toBe('added');
  });

  it('shows a calculation error appearing as a result change', () => {
    const a = snapshot([stage({ id: 1 })]);
    const b = snapshot([stage({ id: 1, analysis: null, analysisError: { code: 'cutoff', message: 'The tube is cut off at this bias.' } })]);
    const s = diffSnapshots(a, b, 1).stages[0]!;
    expect(s.change).toBe('changed');
    expect(s.results.find((r) => r.path === 'analysisError')).toMatchObject({ before: null, after: 'The tube is cut off at this bias.', change: 'added' });
    expect(s.results.find((r) => r.path === 'analysis.operatingPoint.plateCurrent')).toMatchObject({ after: null, change: 'removed' });
  });
});
