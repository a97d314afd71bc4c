// ngspice netlists of a chain with its feedback loop, written from the engine's own circuit (test support).
// The loop's break resistor is replaced by a voltage source VZ (tap − speaker) so the loop gain can be measured
// by double injection: a series voltage (VZ AC 1) and a shunt current into the tap (IZ AC 1).
import type { Circuit } from '@/lib/calc/chain/circuit';
import { SPICE_PRELUDE, tubeSubcircuit } from '@/lib/calc';
import { spiceNum as num } from './run-ngspice';

export type Run =
  | { kind: 'ac'; inject: 'input' | 'voltage' | 'current' | 'output'; from: number; to: number; perDecade: number }
  | { kind: 'tran'; amplitude: number; frequency: number; settle: number; stepsPerPeriod: number };

export function feedbackNetlist(c: Circuit, speaker: string, tap: string, run: Run): string {
  const name = (n: string) => {
    const r = c.find(n);
    return r === '0' ? '0' : `n_${r.replace(/[^A-Za-z0-9]/g, '_')}`;
  };
  const lines = ['* amplifier with global feedback', SPICE_PRELUDE];
  const subs = new Map<string, string>();
  for (const t of c.tubes) {
    // interelectrode capacitances are circuit capacitors (written below), not part of the subcircuit
    const key = JSON.stringify({ ...t.tube, capacitances: undefined });
    if (!subs.has(key)) {
      const sub = `TUBE${subs.size + 1}`;
      subs.set(key, sub);
      lines.push(tubeSubcircuit({ ...t.tube, capacitances: undefined }, sub));
    }
  }
  c.fixed.forEach((fx, i) => {
    if (fx.signal !== 0 && run.kind === 'tran') {
      lines.push(`VF${i} ${name(fx.node)} 0 DC ${num(fx.dc)} SIN(${num(fx.dc)} ${num(run.amplitude * fx.signal)} ${num(run.frequency)})`);
    } else if (fx.signal !== 0 && run.kind === 'ac' && run.inject === 'input') {
      lines.push(`VF${i} ${name(fx.node)} 0 DC ${num(fx.dc)} AC ${num(Math.abs(fx.signal))} ${fx.signal < 0 ? 180 : 0}`);
    } else lines.push(`VF${i} ${name(fx.node)} 0 DC ${num(fx.dc)}`);
  });
  for (const r of c.resistors) {
    if (r.name === 'RBRK_FB') continue;
    lines.push(`R_${r.name} ${name(r.a)} ${name(r.b)} ${num(r.r)}`);
  }
  for (const x of c.capacitors) if (c.find(x.a) !== c.find(x.b)) lines.push(`C_${x.name} ${name(x.a)} ${name(x.b)} ${num(x.c)}`);
  for (const l of c.inductors) lines.push(`L_${l.name} ${name(l.a)} ${name(l.b)} ${num(l.l)}`);
  if (c.windings.length) throw new Error('ideal windings are not written here; give the output stage its transformer');
  c.transformers.forEach((t, i) => {
    // ideal transformer: E sets the primary voltage from the secondary's, F returns ratio × the primary current
    lines.push(
      `E_XF${i} ${name(t.p1)} xp${i} ${name(t.s1)} ${name(t.s2)} ${num(t.ratio)}`,
      `V_XF${i} xp${i} ${name(t.p2)} DC 0`,
      `F_XF${i} ${name(t.s2)} ${name(t.s1)} V_XF${i} ${num(t.ratio)}`,
    );
  });
  c.tubes.forEach((t, i) => {
    const sub = subs.get(JSON.stringify({ ...t.tube, capacitances: undefined }))!;
    const pins = [t.plate, t.grid, t.cathode, ...(t.tube.model === 'koren-pentode' ? [t.screen ?? t.cathode] : [])].map(name);
    lines.push(`X${i} ${pins.join(' ')} ${sub}`);
  });
  const spk = name(speaker);
  const tp = name(tap);
  const vz = run.kind === 'ac' && run.inject === 'voltage' ? 'AC 1' : '';
  lines.push(`VZ ${tp} ${spk} DC 0 ${vz}`);
  if (run.kind === 'ac' && run.inject === 'current') lines.push(`IZ 0 ${tp} DC 0 AC 1`);
  if (run.kind === 'ac' && run.inject === 'output') lines.push(`IO 0 ${spk} DC 0 AC 1`);
  lines.push('.options reltol=1e-6 abstol=1e-13 vntol=1e-9 itl1=500 itl4=100', '.control', 'set filetype=ascii', 'set numdgt=10');
  if (run.kind === 'ac') {
    lines.push(`ac dec ${run.perDecade} ${num(run.from)} ${num(run.to)}`, `wrdata {data:ac} v(${spk}) v(${tp}) i(VZ)`);
  } else {
    const period = 1 / run.frequency;
    const dt = period / run.stepsPerPeriod;
    lines.push(`tran ${num(dt)} ${num(run.settle + period)} ${num(run.settle - 2 * period)} ${num(dt)}`, `fourier ${num(run.frequency)} v(${spk})`);
  }
  lines.push('quit', '.endc', '.end', '');
  return lines.join('\n');
}
