// A curve file whose currents are implausible for the type (milliamperes sent with the unit "A") is not stored
// silently: the upload answers 422 naming the unit field and asks for confirmation; confirmed, it is stored.
import { readFileSync } from 'node:fs';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { POST as createTubeRoute } from '@/app/api/tubes/route';
import { POST as uploadRoute } from '@/app/api/tubes/[id]/curve-sets/route';
import { CurveSet, TubeType } from '@/models';
import { call } from '../support/api';

// the good fixture's values (milliamperes) under a header that names no unit, as many bench logs are written
const csv = Buffer.from(readFileSync(path.resolve(__dirname, '../fixtures/csv/good/basic-triode-ma.csv'), 'utf8').replace('plate_current_ma', 'plate_current'));
let tubeId = 0;

function form(fields: Record<string, string>) {
  const f = new FormData();
  f.set('file', new File([new Uint8Array(csv)], 'bench.csv', { type: 'text/csv' }));
  for (const [k, v] of Object.entries(fields)) f.set(k, v);
  return f;
}

beforeAll(async () => {
  // a small triode of the invented workshop, rated like a 12AX7 section: 1 W plate dissipation
  const r = await call(createTubeRoute, {
    as: 'designer',
    method: 'POST',
    body: { designation: `ZX-MAG${Date.now() % 100000}`, family: 'triode', ratings: { plateDissipation: { value: 1, source: 'test fixture' } } },
  });
  expect(r.status, JSON.stringify(r.json)).toBe(201);
  tubeId = r.json.tube.id;
});

afterAll(async () => {
  await TubeType.destroy({ where: { id: tubeId } });
});

describe('current magnitude check on curve uploads', () => {
  it('asks for confirmation when milliamperes arrive as amperes, stores nothing, then stores on confirmation', async () => {
    const wrong = await call(uploadRoute, { as: 'designer', method: 'POST', params: { id: String(tubeId) }, form: form({ currentUnit: 'A' }) });
    expect(wrong.status, JSON.stringify(wrong.json)).toBe(422);
    expect(wrong.json.error.details?.needsConfirmation, JSON.stringify(wrong.json)).toBe('confirmMagnitude');
    expect(wrong.json.error.fieldErrors.currentUnit[0]).toMatch(/implausible .* Were the values in milliamperes\?/);
    expect(await CurveSet.count({ where: { tubeTypeId: tubeId } })).toBe(0);

    const right = await call(uploadRoute, { as: 'designer', method: 'POST', params: { id: String(tubeId) }, form: form({ currentUnit: 'mA' }) });
    expect(right.status, JSON.stringify(right.json)).toBe(201);

    const confirmed = await call(uploadRoute, { as: 'designer', method: 'POST', params: { id: String(tubeId) }, form: form({ currentUnit: 'A', confirmMagnitude: 'yes' }) });
    expect(confirmed.status, JSON.stringify(confirmed.json)).toBe(201);
    expect(await CurveSet.count({ where: { tubeTypeId: tubeId } })).toBe(2);
  });
});
