// POST /api/analyze-supply: a supply circuit with explicit load currents, solved without saving anything.
import { readFileSync } from 'node:fs';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { call } from '../support/api';

const handler = async () => (await import('@/app/api/analyze-supply/route')).POST;
const fixture = (name: string) => JSON.parse(readFileSync(path.resolve(__dirname, '../fixtures/supplies', `${name}.json`), 'utf8'));

describe('POST /api/analyze-supply', () => {
  it('answers per node dc, ripple, the rectifier peak current, the turn-on peak and the ratings', async () => {
    const res = await call(await handler(), { as: 'technician', method: 'POST', body: fixture('class-ab-six-nodes') });
    expect(res.status).toBe(200);
    const { supply } = res.json;
    expect(supply.nodes).toHaveLength(6);
    expect(supply.nodes[0]).toMatchObject({ key: 'B+1', name: 'Output plates' });
    for (const n of supply.nodes) {
      expect(n.dc).toBeGreaterThan(0);
      expect(n.ripplePeakToPeak).toBeGreaterThanOrEqual(0);
      expect(n.rippleRms).toBeGreaterThanOrEqual(0);
      expect(n.fullDrive.dc).toBeLessThan(n.dc);
    }
    // the class-AB stage draws more at full drive: the reservoir sags
    expect(supply.nodes[0].sag).toBeGreaterThan(5);
    expect(supply.rectifierPeakCurrent).toBeGreaterThan(supply.fullDriveTotalCurrent);
    expect(supply.unloadedPeak).toBeGreaterThan(330 * Math.SQRT2);
    expect(supply.ratings.map((r: { key: string }) => r.key)).toEqual(expect.arrayContaining(['rectifier-piv', 'secondary-current', 'capacitor-voltage-0', 'choke-current-0']));
    expect(supply.waveform.idle.reservoir.length).toBeGreaterThan(100);
  });

  it('names the field of a structural mistake (422 with fieldErrors)', async () => {
    const body = { ...fixture('bridge-rc'), sections: [{ kind: 'capacitor', capacitance: '10u' }] };
    const res = await call(await handler(), { as: 'designer', method: 'POST', body });
    expect(res.status).toBe(422);
    const { error } = res.json;
    expect(Object.keys(error.fieldErrors)).toContain('sections.0');
  });

  it('an unknown rectifier type is a 422 from the engine, not a 500', async () => {
    const body = { ...fixture('vacuum-5ar4-cap'), rectifier: { kind: 'vacuum', type: 'ZZ99' } };
    const res = await call(await handler(), { as: 'designer', method: 'POST', body });
    expect(res.status).toBe(422);
    const { error } = res.json;
    expect(error.code).toBe('calc_invalid-input');
    expect(error.message).toMatch(/ZZ99/);
  });

  it('needs a session', async () => {
    const res = await call(await handler(), { method: 'POST', body: fixture('bridge-rc') });
    expect(res.status).toBe(401);
  });
});
