// The SPICE export runs in ngspice: fetch a model's subcircuit through the route, wrap it in a tiny netlist with
// fixed plate/grid (and screen) sources, run `ngspice -b`, and compare the plate current with the engine's.
import { execFileSync } from 'node:child_process';
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { GET as spiceRoute } from '@/app/api/tubes/[id]/models/[modelId]/spice/route';
import { korenPentodePlateCurrent, korenTriodeCurrent } from '@/lib/calc';
import { TubeModel, TubeType } from '@/models';
import { call } from '../support/api';

const dir = mkdtempSync(path.join(tmpdir(), 'anodyne-tube-spice-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

async function exported(designation: string) {
  const t = (await TubeType.findOne({ where: { designation } }))!;
  const m = (await TubeModel.findOne({ where: { tubeTypeId: t.id, isDefault: true } }))!;
  const r = await call(spiceRoute, { as: 'technician', params: { id: String(t.id), modelId: String(m.id) } });
  expect(r.status).toBe(200);
  expect(r.res.headers.get('content-disposition')).toMatch(/attachment; filename=".+\.inc"/);
  return { text: await r.res.text(), name: r.res.headers.get('x-subcircuit-name')!, params: m.parameters };
}

function runOp(include: string, name: string, pins: string, sources: string[]): number {
  const inc = path.join(dir, `${name}.inc`);
  writeFileSync(inc, include);
  const cir = path.join(dir, `${name}-${Math.random().toString(36).slice(2)}.cir`);
  writeFileSync(
    cir,
    [`* operating point of ${name}`, `.include ${inc}`, ...sources, `X1 ${pins} ${name}`, '.control', 'op', 'let ia = -i(VA)', 'echo "RESULT ia=$&ia"', 'quit 0', '.endc', '.end', ''].join('\n'),
  );
  let out: string;
  try {
    out = execFileSync('ngspice', ['-b', cir], { encoding: 'utf8', stdio: ['ignore', 'pipe', 'pipe'] });
  } catch (e) {
    const err = e as { stdout?: string; stderr?: string };
    throw new Error(`ngspice failed:\n${err.stdout}\n${err.stderr}\n${readFileSync(cir, 'utf8')}\n${include}`);
  }
  const m = /RESULT ia=([-+0-9.eE]+)/.exec(out);
  if (!m) throw new Error(`no result from ngspice:\n${out}`);
  return Number(m[1]);
}

describe('SPICE subcircuit export in ngspice', () => {
  it('12AX7 (Koren 1996): ngspice plate current matches korenTriodeCurrent within 0.5 %', async () => {
    const { text, name, params } = await exported('12AX7');
    expect(text).toContain(`.subckt ${name} 1 2 3`);
    expect(text).toContain('Source of the parameters: Koren 1996, Glass Audio 8(5)');
    const p = params as { mu: number; ex: number; kg1: number; kp: number; kvb: number };
    // points around the §6 A operating point (221 V, −1.61 V) and the §4.3 datasheet points of the reference sheet
    for (const [va, vg] of [[250, -2], [221, -1.61], [100, -1], [300, -3]] as const) {
      const spice = runOp(text, name, 'a g 0', [`VA a 0 DC ${va}`, `VG g 0 DC ${vg}`]);
      const engine = korenTriodeCurrent(p, va, vg);
      expect(Math.abs(spice / engine - 1), `Va ${va} V, Vg ${vg} V: ngspice ${spice}, engine ${engine}`).toBeLessThan(0.005);
    }
  });

  it('300B (Koren 1996): matches at the datasheet point 300 V, −61 V', async () => {
    const { text, name, params } = await exported('300B');
    const spice = runOp(text, name, 'a g 0', ['VA a 0 DC 300', 'VG g 0 DC -61']);
    const engine = korenTriodeCurrent(params as never, 300, -61);
    // reference sheet §4.3 [C]: 58.4 mA for Koren's 300B at this point
    expect(engine).toBeCloseTo(58.4e-3, 4);
    expect(Math.abs(spice / engine - 1)).toBeLessThan(0.005);
  });

  it('EL34 (Koren 1996 pentode): matches korenPentodePlateCurrent with a fixed screen supply', async () => {
    const { text, name, params } = await exported('EL34');
    expect(text).toContain(`.subckt ${name} 1 2 3 4`);
    for (const [va, vg, vg2] of [[250, -12.2, 250], [400, -20, 300]] as const) {
      const spice = runOp(text, name, 'a g 0 s', [`VA a 0 DC ${va}`, `VG g 0 DC ${vg}`, `VS s 0 DC ${vg2}`]);
      const engine = korenPentodePlateCurrent(params as never, va, vg, vg2);
      expect(Math.abs(spice / engine - 1), `Va ${va}, Vg ${vg}, Vg2 ${vg2}`).toBeLessThan(0.005);
    }
  });
});
