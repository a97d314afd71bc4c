// Output transformer model against ngspice: the transformer as a pair (or, centre-tapped, a trio) of coupled
// inductors with the given leakage, winding capacitance and winding resistances.
// Acceptance limits (engineering judgement, as for the rest of the engine): −3 dB points 2 %, output impedance
// at the speaker 2 %, power into the speaker 2 %, resonant peak 0.1 dB.
import { beforeAll, describe, expect, it } from 'vitest';
import { analyzeStage, tubeSubcircuit, SPICE_PRELUDE } from '@/lib/calc';
import { stageInputSchema, type StageInput } from '@/lib/calc/input';
import { analyzeTransformer, type TransformerParams } from '@/lib/calc/transformer';
import { acMagnitudes, firstBelow, ngspice, requireNgspice, spiceNum as n } from './support/run-ngspice';

requireNgspice();

/** Coupled-inductor lines for a two-winding transformer, primary p1→p2, secondary s1→s2 (exact T equivalent). */
function windings(p: TransformerParams, p1: string, p2: string, s1: string, s2: string): string[] {
  const ratio2 = p.primaryImpedance / p.speakerLoad;
  const lp = p.primaryInductance ?? 1e5;
  const ll = p.leakageInductance ?? 0;
  return [`L1 ${p1} ${p2} ${n(lp)}`, `L2 ${s1} ${s2} ${n((lp + ll) / ratio2)}`, `K1 L1 L2 ${n(Math.sqrt(lp / (lp + ll)))}`];
}

function secondary(p: TransformerParams, s: string, out: string): string[] {
  return [`RSEC ${s} ${out} ${n(Math.max(p.secondaryResistance ?? 0, 1e-6))}`, `RLOAD ${out} 0 ${n(p.speakerLoad)}`];
}

/** EMF source with its resistance into the transformer; AC response and, by current injection, output impedance. */
function networkNetlist(p: TransformerParams, rs: number, mode: 'gain' | 'zout'): string {
  return [
    '* transformer on a resistive source',
    `VS src 0 DC 0 AC ${mode === 'gain' ? 1 : 0}`,
    `RS src p ${n(rs)}`,
    ...(p.windingCapacitance ? [`CW p 0 ${n(p.windingCapacitance)}`] : []),
    `RP p m ${n(Math.max(p.primaryResistance, 1e-6))}`,
    ...windings(p, 'm', '0', 's', '0'),
    ...secondary(p, 's', 'o'),
    ...(mode === 'zout' ? ['IINJ 0 o DC 0 AC 1'] : []),
    '.control',
    'set filetype=ascii',
    mode === 'gain' ? 'ac dec 200 1 1meg' : 'ac lin 1 1000 1000',
    'wrdata {data:ac} v(o)',
    'quit',
    '.endc',
    '.end',
    '',
  ].join('\n');
}

const cases: Array<{ name: string; p: TransformerParams; rs: number }> = [
  { name: 'single-ended triode, 5k:8', rs: 1500, p: { primaryImpedance: 5000, speakerLoad: 8, primaryResistance: 150, secondaryResistance: 0.3, primaryInductance: 15, leakageInductance: 0.01, windingCapacitance: 300e-12 } },
  { name: 'single-ended pentode, 3k5:4 (high source)', rs: 30000, p: { primaryImpedance: 3500, speakerLoad: 4, primaryResistance: 200, secondaryResistance: 0.4, primaryInductance: 8, leakageInductance: 0.006, windingCapacitance: 500e-12 } },
  { name: 'push-pull, 6k6:8', rs: 3000, p: { primaryImpedance: 6600, speakerLoad: 8, primaryResistance: 180, secondaryResistance: 0.25, primaryInductance: 60, leakageInductance: 0.015, windingCapacitance: 1e-9 } },
  { name: 'push-pull, 4k:16', rs: 1200, p: { primaryImpedance: 4000, speakerLoad: 16, primaryResistance: 100, secondaryResistance: 0.5, primaryInductance: 30, leakageInductance: 0.004, windingCapacitance: 150e-12 } },
  { name: 'leakage only (no primary inductance, no capacitance)', rs: 2000, p: { primaryImpedance: 5000, speakerLoad: 8, primaryResistance: 120, secondaryResistance: null, primaryInductance: null, leakageInductance: 0.02, windingCapacitance: null } },
  { name: 'primary inductance only, 16 Ω', rs: 800, p: { primaryImpedance: 2500, speakerLoad: 16, primaryResistance: 60, secondaryResistance: 0.6, primaryInductance: 5, leakageInductance: null, windingCapacitance: null } },
];

describe('output transformer network vs ngspice', () => {
  for (const { name, p, rs } of cases) {
    it(name, async () => {
      const ours = analyzeTransformer(p, rs, null);
      const gain = await ngspice(networkNetlist(p, rs, 'gain'), `xf-gain-${cases.findIndex((c) => c.name === name)}`);
      const { f, mag } = acMagnitudes(gain.tables.ac as number[][]);
      // mid band: the resistive divider (computed), which ngspice must also show at 1 kHz within 0.05 dB
      const i1k = f.findIndex((x) => x >= 1000);
      expect(20 * Math.log10((mag[i1k] as number) / ours.midbandTransfer)).toBeCloseTo(0, 1);
      const level = ours.midbandTransfer * Math.SQRT1_2;
      const low = firstBelow(f, mag, level, 1000, -1);
      const high = firstBelow(f, mag, level, 1000, 1);
      if (ours.lowCutoff === null) expect(low).toBeNull();
      else expect(Math.abs((low as number) / ours.lowCutoff - 1)).toBeLessThan(0.02);
      if (ours.highCutoff === null) expect(high).toBeNull();
      else expect(Math.abs((high as number) / ours.highCutoff - 1)).toBeLessThan(0.02);
      const spicePeakDb = 20 * Math.log10(Math.max(...mag) / ours.midbandTransfer);
      if (ours.peak) expect(Math.abs(spicePeakDb - ours.peak.db)).toBeLessThan(0.1);
      else expect(spicePeakDb).toBeLessThan(0.15);
      const z = await ngspice(networkNetlist(p, rs, 'zout'), `xf-zout-${cases.findIndex((c) => c.name === name)}`);
      const row = (z.tables.ac as number[][])[0] as number[];
      // the injection sees Zout ∥ RL: take RL away
      const zr = row[1] as number;
      const zi = row[2] as number;
      const d = zr * zr + zi * zi;
      const yr = zr / d - 1 / p.speakerLoad;
      const yi = -zi / d;
      const zout = 1 / Math.hypot(yr, yi);
      expect(Math.abs(zout / ours.outputImpedance - 1)).toBeLessThan(0.02);
    });
  }

  it('handbook relations beside them (common practice): low corner = R∥/(2π·Lp), damping factor = RL / Zout', () => {
    const { p, rs } = cases[0] as (typeof cases)[number];
    const ours = analyzeTransformer(p, rs, null);
    const n2 = p.primaryImpedance / p.speakerLoad;
    const rSource = rs + p.primaryResistance;
    const rLoad = n2 * ((p.secondaryResistance ?? 0) + p.speakerLoad);
    const rPar = (rSource * rLoad) / (rSource + rLoad);
    expect(Math.abs(ours.lowCutoff! / (rPar / (2 * Math.PI * p.primaryInductance!)) - 1)).toBeLessThan(0.01);
    // mid-band output impedance: (Rs + Rp)/n² + Rsec
    expect(Math.abs(ours.outputImpedance / (rSource / n2 + (p.secondaryResistance ?? 0)) - 1)).toBeLessThan(0.01);
    expect(ours.dampingFactor).toBeCloseTo(p.speakerLoad / ours.outputImpedance, 10);
    // leakage alone: high corner = R/(2π·Ll) with R = the source side and the load in series (common practice)
    const leak = cases[4] as (typeof cases)[number];
    const r4 = analyzeTransformer(leak.p, leak.rs, null);
    const rTot = leak.rs + leak.p.primaryResistance + leak.p.primaryImpedance;
    expect(Math.abs(r4.highCutoff! / (rTot / (2 * Math.PI * leak.p.leakageInductance!)) - 1)).toBeLessThan(0.01);
    expect(r4.notModelled.map((x) => x.limit)).toEqual(['low-frequency', 'resonance', 'secondary-loss']);
  });
});

// ---- whole output stages with the transformer: Koren tubes (capacitances left out so only the transformer
// shapes the response), power into the speaker from the transient, corners from the AC sweep.
const triode300b = { model: 'koren-triode', name: '300B (Koren 1996)', mu: 3.95, ex: 1.4, kg1: 1550, kp: 65, kvb: 300, rgi: 1000 } as const;
const pentode6l6 = { model: 'koren-pentode', name: '6L6GC (Koren 1996)', mu: 8.7, ex: 1.35, kg1: 1460, kg2: 4500, kp: 48, kvb: 12 } as const;

const seStage = stageInputSchema.parse({
  topology: 'single-ended-output',
  tube: triode300b,
  supply: 306,
  gridResistor: '100k',
  primaryImpedance: '3k',
  primaryResistance: 100,
  bias: { kind: 'fixed', fixedBias: -61 },
  drive: { amplitude: 20, frequency: 1000 },
  transformer: { speakerLoad: 8, secondaryResistance: 0.35, primaryInductance: 12, leakageInductance: '8m', windingCapacitance: '400p' },
});
const ppStage = stageInputSchema.parse({
  topology: 'push-pull-output',
  tube: pentode6l6,
  class: 'AB',
  supply: 450,
  gridResistor: '100k',
  plateToPlateImpedance: '5k6',
  primaryResistance: 200,
  bias: { kind: 'fixed', fixedBias: -37 },
  screen: { kind: 'fixed', supply: 400 },
  drive: { amplitude: 10, frequency: 1000 },
  transformer: { speakerLoad: 8, secondaryResistance: 0.3, primaryInductance: 40, leakageInductance: '12m', windingCapacitance: '600p' },
});

function stageNetlist(input: StageInput): string {
  if (input.topology !== 'single-ended-output' && input.topology !== 'push-pull-output') throw new Error('output stages only');
  const x = input.transformer!;
  const fixedBias = input.bias.kind === 'fixed' ? input.bias.fixedBias : 0;
  const amp = input.drive.amplitude;
  const lines = ['* output stage with a real transformer', SPICE_PRELUDE, tubeSubcircuit(input.tube, 'TUBE'), `VBP bplus 0 DC ${n(input.supply)}`];
  const lp = x.primaryInductance ?? 1e5;
  const ll = x.leakageInductance ?? 0;
  if (input.topology === 'single-ended-output') {
    const p: TransformerParams = { primaryImpedance: input.primaryImpedance, primaryResistance: input.primaryResistance, ...x };
    lines.push(
      `RDC bplus np ${n(Math.max(input.primaryResistance, 1e-6))}`,
      ...windings(p, 'np', 'plate', 's', '0'),
      ...(x.windingCapacitance ? [`CW plate bplus ${n(x.windingCapacitance)}`] : []),
      ...secondary(p, 's', 'o'),
      'XT plate grid 0 TUBE',
      `VIN grid 0 DC ${n(fixedBias)} AC 1 SIN(${n(fixedBias)} ${n(amp)} 1000)`,
    );
  } else {
    const ratio2 = input.plateToPlateImpedance / x.speakerLoad;
    const k = Math.sqrt(lp / (lp + ll));
    const half = input.primaryResistance / 2;
    lines.push(
      `RH1 bplus n1 ${n(half)}`,
      `RH2 bplus n2 ${n(half)}`,
      `L1A plate1 n1 ${n(lp / 4)}`,
      `L1B n2 plate2 ${n(lp / 4)}`,
      `L2 s 0 ${n((lp + ll) / ratio2)}`,
      'K12 L1A L1B 1',
      `K1S L1A L2 ${n(k)}`,
      `K2S L1B L2 ${n(k)}`,
      ...(x.windingCapacitance ? [`CW plate1 plate2 ${n(x.windingCapacitance)}`] : []),
      `RSEC s o ${n(x.secondaryResistance ?? 1e-6)}`,
      `RLOAD o 0 ${n(x.speakerLoad)}`,
      `VSCR g2 0 DC ${n(input.screen?.kind === 'fixed' ? (input.screen.supply ?? input.supply) : input.supply)}`,
      'X1 plate1 grid1 0 g2 TUBE',
      'X2 plate2 grid2 0 g2 TUBE',
      `VBIAS gb 0 DC ${n(fixedBias)}`,
      `VIN grid1 gb DC 0 AC 1 SIN(0 ${n(amp)} 1000)`,
      'EINV grid2 gb grid1 gb -1',
    );
  }
  lines.push(
    '.options reltol=1e-6 abstol=1e-13 vntol=1e-9 itl1=500 itl4=100',
    '.control',
    'set filetype=ascii',
    'set numdgt=10',
    'ac dec 200 1 1meg',
    'wrdata {data:ac} v(o)',
    'tran 3.90625e-6 0.4 0.3 3.90625e-6',
    'fourier 1000 v(o)',
    'let res_vo = 0',
    'quit',
    '.endc',
    '.end',
    '',
  );
  return lines.join('\n');
}

describe('output stages with a transformer vs ngspice', () => {
  const runs: Record<string, Awaited<ReturnType<typeof ngspice>>> = {};
  beforeAll(async () => {
    const [a, b] = await Promise.all([ngspice(stageNetlist(seStage), 'xf-stage-se'), ngspice(stageNetlist(ppStage), 'xf-stage-pp')]);
    runs.se = a;
    runs.pp = b;
  }, 300_000);

  for (const [key, input] of [['se', seStage], ['pp', ppStage]] as const) {
    it(`${input.topology}: power into the speaker and −3 dB points`, () => {
      const ours = analyzeStage(input);
      const xf = ours.transformer!;
      const run = runs[key]!;
      // fourier table: harmonic 1 row "1 1000 <magnitude> ..."
      const m = /^\s*1\s+1000\s+([-+0-9.eE]+)/m.exec(run.stdout);
      expect(m).not.toBeNull();
      const v1 = Number(m![1]);
      const spicePower = (v1 * v1) / (2 * xf.speakerLoad);
      expect(Math.abs(ours.largeSignal.outputPower! / spicePower - 1)).toBeLessThan(0.02);
      expect(Math.abs(xf.speakerPower! / spicePower - 1)).toBeLessThan(0.02);
      const { f, mag } = acMagnitudes(run.tables.ac as number[][]);
      const ref = mag[f.findIndex((x) => x >= 1000)] as number;
      const low = firstBelow(f, mag, ref * Math.SQRT1_2, 1000, -1);
      const high = firstBelow(f, mag, ref * Math.SQRT1_2, 1000, 1);
      expect(Math.abs(low! / xf.lowCutoff! - 1)).toBeLessThan(0.02);
      expect(Math.abs(high! / xf.highCutoff! - 1)).toBeLessThan(0.02);
    });
  }
});
