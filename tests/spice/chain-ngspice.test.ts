// Whole chains against ngspice (Debian's package, `ngspice -b`): the netlist is written from the same circuit the
// engine solves (Koren subcircuits with their grid-current diodes, lib/calc/spice.ts). Acceptance limits (product
// requirement, engineering judgement): each stage's output level within 1 %, the chain's THD within 5 % relative or
// 0.02 % absolute below clipping and 10 % past it, the response within 0.2 dB at 20 Hz, 1 kHz and 20 kHz, output
// power within 2 %. ngspice's transient is checked for steady state by comparing the peak-to-peak of two windows five periods apart.
import { execFile, execFileSync } from 'node:child_process';
import { mkdtempSync, readdirSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { chainInputSchema, type ChainInput } from '@/lib/calc/chain/input';
import { analyzeChain, type ChainAnalysis } from '@/lib/calc/chain/solve';
import { chainNetlist, type ChainNetlist } from '@/lib/calc/chain/spice';

const FIXTURES = path.resolve(__dirname, '../fixtures/chains');

function haveNgspice(): boolean {
  try {
    execFileSync('ngspice', ['-v'], { stdio: 'pipe' });
    return true;
  } catch {
    return false;
  }
}
const spiceAvailable = haveNgspice();
if (!spiceAvailable && !process.env.CI_ALLOW_NO_SPICE) {
  throw new Error('ngspice is not on PATH (apt-get install -y ngspice); set CI_ALLOW_NO_SPICE=1 to skip these checks.');
}

type Fourier = { thdPercent: number; h1: number };
type Parsed = { values: Record<string, number>; fourier: Record<string, Fourier> };

function parse(text: string): Parsed {
  const values: Record<string, number> = {};
  for (const m of text.matchAll(/^\s*res_(\w+)\s*=\s*([-+0-9.eE]+)/gm)) values[m[1] as string] = Number(m[2]);
  const fourier: Record<string, Fourier> = {};
  for (const block of text.split(/RESULT fourier=/).slice(1)) {
    const key = block.split(/\n/)[0]!.trim();
    const thd = /THD:\s*([-+0-9.eE]+)\s*%/.exec(block);
    const h1 = /^\s*1\s+[-+0-9.eE]+\s+([-+0-9.eE]+)\s+/m.exec(block);
    fourier[key] = { thdPercent: thd ? Number(thd[1]) : Number.NaN, h1: h1 ? Number(h1[1]) : Number.NaN };
  }
  return { values, fourier };
}

function run(netlist: string, dir: string, name: string): Promise<string> {
  const file = path.join(dir, `${name}.cir`);
  writeFileSync(file, netlist);
  return new Promise((resolve, reject) => {
    execFile('ngspice', ['-b', file], { maxBuffer: 64 * 1024 * 1024, timeout: 1_500_000 }, (err, stdout, stderr) => {
      if (err) reject(new Error(`ngspice failed on ${name}: ${err.message}\n${stderr}`));
      else resolve(stdout);
    });
  });
}

type Case = { name: string; chain: ChainInput; clipped: boolean; result: ChainAnalysis; netlist: ChainNetlist; spice?: Parsed };

const only = process.env.CHAIN_CASE;
const cases: Case[] = readdirSync(FIXTURES)
  .filter((f) => f.endsWith('.json') && (!only || only.split(',').some((o) => f.startsWith(o))))
  .sort()
  .map((f) => {
    const chain = chainInputSchema.parse(JSON.parse(readFileSync(path.join(FIXTURES, f), 'utf8')));
    const result = analyzeChain(chain, { sweep: false });
    return { name: f.replace(/\.json$/, ''), chain, clipped: result.stages.some((s) => s.clipped), result, netlist: chainNetlist(chain) };
  });

const rel = (a: number, b: number) => Math.abs(a - b) / Math.max(Math.abs(b), 1e-30);
const db = (x: number) => 20 * Math.log10(x);

describe.skipIf(!spiceAvailable)('whole chains against ngspice', () => {
  beforeAll(async () => {
    const dir = mkdtempSync(path.join(tmpdir(), 'anodyne-chain-spice-'));
    // two at a time: the machine is shared
    for (let i = 0; i < cases.length; i += 2) {
      const batch = cases.slice(i, i + 2);
      const outs = await Promise.all(batch.map((c) => run(c.netlist.text, dir, c.name)));
      outs.forEach((t, k) => (batch[k]!.spice = parse(t)));
    }
  }, 1_800_000);

  it('covers the required chains', () => {
    if (only) return;
    const names = cases.map((c) => c.name);
    expect(names.length).toBeGreaterThanOrEqual(8);
    expect(cases.some((c) => c.clipped)).toBe(true);
  });

  for (const c of cases) {
    describe(c.name, () => {
      it('ngspice reached the driven steady state (two windows agree)', () => {
        c.netlist.probes.forEach((p, k) => {
          if (p.what === 'input') return;
          const w1 = c.spice!.values[`w1_${k}`]!;
          const w2 = c.spice!.values[`w2_${k}`]!;
          expect(Number.isFinite(w1) && w1 > 0, p.name).toBe(true);
          expect(rel(w1, w2), `${p.name} peak-to-peak, first and last window`).toBeLessThan(0.002);
        });
      });

      it('each stage output level within 1 %', () => {
        for (const p of c.netlist.probes.filter((p) => p.what === 'output')) {
          const spice = c.spice!.fourier[p.name]!.h1;
          const engine = c.result.stages.find((s) => s.id === p.stage)!.outputs[p.output!]!.amplitude;
          expect(rel(engine, spice), `${p.stage}.${p.output}: engine ${engine} V, ngspice ${spice} V`).toBeLessThan(0.01);
        }
      });

      it(`chain THD within ${c.clipped ? '10' : '5'} % relative (or 0.02 % absolute)`, () => {
        const last = c.netlist.probes.filter((p) => p.what === 'output' && p.stage === c.result.output.stage && p.output === c.result.output.name)[0]!;
        const spice = c.spice!.fourier[last.name]!.thdPercent;
        const engine = c.result.output.thdPercent;
        const ok = Math.abs(engine - spice) <= 0.02 || rel(engine, spice) <= (c.clipped ? 0.1 : 0.05);
        expect(ok, `THD engine ${engine} %, ngspice ${spice} %`).toBe(true);
      });

      it('response within 0.2 dB at 20 Hz, 1 kHz and 20 kHz', async () => {
        const { compile, linearise, solveDc } = await import('@/lib/calc/chain/mna');
        const { responseAt } = await import('@/lib/calc/chain/solve');
        const cp = compile(c.netlist.built.circuit);
        const rows = responseAt(cp, linearise(cp, solveDc(cp)), c.netlist.built.output.probe, [20, 1000, 20000]);
        rows.forEach((row, k) => {
          const re = c.spice!.values[`ac_${k}_re`]!;
          const im = c.spice!.values[`ac_${k}_im`]!;
          const spiceDb = db(Math.hypot(re, im));
          expect(Math.abs(row.magnitudeDb - spiceDb), `${row.frequency} Hz: engine ${row.magnitudeDb} dB, ngspice ${spiceDb} dB`).toBeLessThan(0.2);
        });
      });

      it('output power within 2 % (power stages)', () => {
        const p = c.netlist.probes.find((p) => p.what === 'power' && p.stage === c.result.output.stage);
        if (!p) {
          expect(c.result.output.power).toBeNull();
          return;
        }
        const port = c.netlist.built.ports.find((x) => x.id === p.stage)!;
        const a = c.spice!.fourier[p.name]!.h1;
        const spice = (a * a) / (2 * port.power!.load);
        expect(rel(c.result.output.power!, spice), `engine ${c.result.output.power} W, ngspice ${spice} W`).toBeLessThan(0.02);
      });
    });
  }
});
