// The supply solver against ngspice on the same circuits (fixtures in tests/fixtures/supplies).
// ngspice runs a transient from the hand-estimate voltages and currents (not from our solution) for 4 s (8 s for the six-node ladder) and the last mains
// cycle is compared; the cycle before it must agree, which shows ngspice has reached its steady state.
// Silicon diodes: the SPICE diode model with the library's IS, N, RS on both sides. Vacuum rectifiers: the same
// drop law I = k·V^1.5 on both sides (a behavioural source in ngspice).
// Limits (the acceptance limits of the supply work): node DC within 1 %, ripple (peak-to-peak and rms) within
// 10 %, peak rectifier current within 10 %.
import { execFile, execFileSync } from 'node:child_process';
import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { solveSupply, supplyNetlist, type SupplyCircuit, type SupplyResult } from '@/lib/calc/supply';
import { pathDrop } from '@/lib/calc/supply/cycle';
import { prepareSupply } from '@/lib/calc/supply/solve';
import { supplyCircuitSchema } from '@/lib/validation/supply';

const FIXTURES = path.resolve(__dirname, '../fixtures/supplies');

function haveNgspice(): boolean {
  try {
    execFileSync('ngspice', ['-v'], { stdio: 'pipe' });
    return true;
  } catch {
    return false;
  }
}
const spiceAvailable = haveNgspice();
if (!spiceAvailable && !process.env.CI_ALLOW_NO_SPICE) throw new Error('ngspice is not on PATH (apt-get install -y ngspice); set CI_ALLOW_NO_SPICE=1 to skip these checks.');

type Drive = 'idle' | 'full';
// `stop`: transient length; the six-node ladder has a slow mode (about a second) and needs longer to settle
const CASES: { file: string; drive: Drive; what: string; stop?: number }[] = [
  { file: 'bridge-rc', drive: 'idle', what: 'silicon bridge, capacitor input, RC sections' },
  { file: 'centre-tap-lc', drive: 'idle', what: 'silicon centre tap at 60 Hz, capacitor input, choke then RC' },
  { file: 'vacuum-5ar4-cap', drive: 'idle', what: 'vacuum rectifier (5AR4 law), capacitor input' },
  { file: 'vacuum-5u4gb-choke-input', drive: 'idle', what: 'vacuum rectifier (5U4GB law), choke input' },
  { file: 'bridge-choke-input', drive: 'idle', what: 'silicon bridge, choke input' },
  { file: 'class-ab-six-nodes', drive: 'idle', what: 'six nodes, class-AB output stage at idle', stop: 8 },
  { file: 'class-ab-six-nodes', drive: 'full', what: 'six nodes, class-AB output stage at full drive', stop: 8 },
];

function load(file: string): SupplyCircuit {
  return supplyCircuitSchema.parse(JSON.parse(readFileSync(path.join(FIXTURES, `${file}.json`), 'utf8')));
}

/**
 * Hand estimates (common practice): capacitor input DC ≈ peak − rectifier drop − I/(4fC) (half the full-wave
 * ripple I/(2fC) below the peak); choke input DC ≈ 0.9·Vrms − drops − I·R. Later nodes: minus I·R of each series
 * part. Used to start ngspice and as rough checks, never as the reference.
 */
function handEstimate(c: SupplyCircuit, drive: Drive) {
  const p = prepareSupply(c);
  const { net, source, frequency } = p;
  const currents = drive === 'full' ? net.full : net.idle;
  const through: number[] = new Array(net.k).fill(0);
  for (let j = net.k - 1; j >= 0; j--) through[j] = currents[j]! + net.conductance[j]! * source.peak + (j + 1 < net.k ? through[j + 1]! : 0);
  const total = through[0]!;
  const dc: number[] = [];
  let ripple0: number;
  if (net.capacitorInput) {
    ripple0 = total / (2 * frequency * net.capacitance[0]!);
    dc.push(source.peak - pathDrop(source.law, 3 * total) - ripple0 / 2);
  } else {
    const vrms = source.peak / Math.SQRT2;
    dc.push(0.9 * vrms - pathDrop(source.law, total) - (source.resistance + net.branchInto[0]!.resistance) * total);
    // second harmonic of full-wave rectified sine 4·Vpk/(3π), reduced by the LC divider (common practice)
    const w = 2 * Math.PI * 2 * frequency;
    ripple0 = (2 * (4 * source.peak) / (3 * Math.PI)) / (w * w * net.branchInto[0]!.inductance * net.capacitance[0]! - 1);
  }
  for (let j = 1; j < net.k; j++) dc.push(dc[j - 1]! - net.branchInto[j]!.resistance * through[j]!);
  return { dc, ripple0, through };
}

type Window = { dc: number[]; pp: number[]; rms: number[]; peakCurrent: number; previousDc: number[] };

function readWindow(file: string, nodes: number, period: number): Window {
  const rows = readFileSync(file, 'utf8')
    .trim()
    .split('\n')
    .slice(1)
    .map((l) => l.trim().split(/\s+/).map(Number));
  const t = rows.map((r) => r[0]!);
  const tEnd = t[t.length - 1]!;
  const stat = (col: number, from: number, to: number) => {
    let area = 0;
    let min = Infinity;
    let max = -Infinity;
    const seg: [number, number][] = [];
    for (let i = 1; i < rows.length; i++) {
      if (t[i]! <= from || t[i - 1]! >= to) continue;
      seg.push([i - 1, i]);
    }
    for (const [a, b] of seg) {
      area += 0.5 * (rows[a]![col]! + rows[b]![col]!) * (t[b]! - t[a]!);
      min = Math.min(min, rows[a]![col]!, rows[b]![col]!);
      max = Math.max(max, rows[a]![col]!, rows[b]![col]!);
    }
    const span = t[seg[seg.length - 1]![1]]! - t[seg[0]![0]]!;
    const mean = area / span;
    let sq = 0;
    for (const [a, b] of seg) sq += 0.5 * ((rows[a]![col]! - mean) ** 2 + (rows[b]![col]! - mean) ** 2) * (t[b]! - t[a]!);
    return { mean, pp: max - min, rms: Math.sqrt(sq / span), max };
  };
  const last = (col: number) => stat(col, tEnd - period, tEnd);
  const before = (col: number) => stat(col, tEnd - 2 * period, tEnd - period);
  const cols = Array.from({ length: nodes }, (_, j) => j + 2);
  return {
    dc: cols.map((c) => last(c).mean),
    pp: cols.map((c) => last(c).pp),
    rms: cols.map((c) => last(c).rms),
    previousDc: cols.map((c) => before(c).mean),
    peakCurrent: last(1).max,
  };
}

function runNgspice(file: string): Promise<void> {
  return new Promise((resolve, reject) => {
    execFile('ngspice', ['-b', file], { maxBuffer: 16 * 1024 * 1024, timeout: 180_000 }, (err, _out, stderr) => (err ? reject(new Error(`ngspice failed on ${file}: ${err.message}\n${stderr}`)) : resolve()));
  });
}

type Row = { name: string; what: string; drive: Drive; stop: number; circuit: SupplyCircuit; ours: SupplyResult; spice?: Window; hand: ReturnType<typeof handEstimate> };
const rows: Row[] = CASES.map(({ file, drive, what, stop }) => {
  const circuit = load(file);
  return { name: `${file} (${drive})`, what, drive, stop: stop ?? 4, circuit, ours: solveSupply(circuit), hand: handEstimate(circuit, drive) };
});

const rel = (a: number, b: number) => Math.abs(a - b) / Math.max(Math.abs(b), 1e-30);

describe.skipIf(!spiceAvailable)('supply solver against ngspice', () => {
  beforeAll(async () => {
    const dir = mkdtempSync(path.join(tmpdir(), 'anodyne-supply-spice-'));
    // two at a time: the machine has two cores
    const jobs = rows.map((r, i) => async () => {
      const f = r.ours.mainsFrequency;
      const dataFile = path.join(dir, `case${i}.dat`);
      const cir = path.join(dir, `case${i}.cir`);
      writeFileSync(cir, supplyNetlist(r.circuit, { stop: r.stop, window: 2 / f, maxStep: 1 / f / 1000, initial: r.hand.dc, initialCurrents: r.hand.through, drive: r.drive, dataFile }));
      await runNgspice(cir);
      r.spice = readWindow(dataFile, r.ours.nodes.length, 1 / f);
    });
    const queue = [...jobs];
    await Promise.all([0, 1].map(async () => {
      for (let job = queue.shift(); job; job = queue.shift()) await job();
    }));
  }, 300_000);

  for (const r of rows) {
    describe(`${r.name}: ${r.what}`, () => {
      const mine = (j: number) => (r.drive === 'full' ? r.ours.nodes[j]!.fullDrive : r.ours.nodes[j]!);
      it('ngspice reached its steady state (two consecutive cycles agree within 0.002 %)', () => {
        r.spice!.dc.forEach((v, j) => expect(rel(v, r.spice!.previousDc[j]!), `node ${j}`).toBeLessThan(2e-5));
      });
      it('node DC voltages within 1 %', () => {
        r.ours.nodes.forEach((_, j) => expect(rel(mine(j).dc, r.spice!.dc[j]!), `node ${j}: ${mine(j).dc.toFixed(3)} V vs ngspice ${r.spice!.dc[j]!.toFixed(3)} V`).toBeLessThan(0.01));
      });
      it('ripple peak-to-peak and rms within 10 % (both under 1 mV p-p where ngspice reads under 1 mV)', () => {
        r.ours.nodes.forEach((_, j) => {
          // below about 1 mV p-p on a 300–400 V node, ngspice's own tolerances (reltol 1e-5 of the node voltage
          // per time point) dominate what it prints: there both must simply be small
          if (r.spice!.pp[j]! < 1e-3) {
            expect(mine(j).ripplePeakToPeak, `node ${j} p-p`).toBeLessThan(1e-3);
            return;
          }
          expect(rel(mine(j).ripplePeakToPeak, r.spice!.pp[j]!), `node ${j} p-p: ${mine(j).ripplePeakToPeak} vs ${r.spice!.pp[j]}`).toBeLessThan(0.1);
          expect(rel(mine(j).rippleRms, r.spice!.rms[j]!), `node ${j} rms: ${mine(j).rippleRms} vs ${r.spice!.rms[j]}`).toBeLessThan(0.1);
        });
      });
      it('peak rectifier current within 10 %', () => {
        const ours = r.drive === 'full' ? r.ours.rectifier.fullDrivePeakCurrent : r.ours.rectifier.idlePeakCurrent;
        expect(rel(ours, r.spice!.peakCurrent), `${ours} A vs ngspice ${r.spice!.peakCurrent} A`).toBeLessThan(0.1);
      });
      it('agrees roughly with the hand estimates (common practice; these ignore conduction angle and winding drop)', () => {
        // the reservoir DC sits below the hand estimate for a capacitor input (the winding resistance narrows the
        // conduction) and within 12 % of it; the reservoir ripple within a factor 0.5–1.5 of the estimate
        const dc0 = mine(0).dc;
        if (r.ours.capacitorInput) expect(dc0).toBeLessThan(r.hand.dc[0]!);
        expect(rel(dc0, r.hand.dc[0]!)).toBeLessThan(0.12);
        const ratio = mine(0).ripplePeakToPeak / r.hand.ripple0;
        expect(ratio).toBeGreaterThan(0.5);
        expect(ratio).toBeLessThan(1.5);
      });
    });
  }
});
