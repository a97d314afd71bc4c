import { SPICE_PRELUDE, tubeSubcircuit } from '../spice';
import type { Circuit, Probe } from './circuit';
import type { ChainInput } from './input';
import { buildChain, type BuiltChain } from './network';

// Pure text generation: nothing here runs ngspice.

const num = (x: number) => (Number.isFinite(x) ? Number(x.toPrecision(12)).toString() : '0');
const INTERELECTRODE = /^C(GK|GA|AK)_/;

export type ChainNetlistOptions = {
  /** samples per period for the transient (default 256) */
  stepsPerPeriod?: number;
  /** frequencies for the small-signal check (output / source) */
  acFrequencies?: number[];
  /** settling time before the measured windows (default: from the circuit's slowest time constant) */
  settle?: number;
};

export type ChainNetlist = {
  text: string;
  /** probe name → what it measures, in the order the fourier blocks are printed */
  probes: Array<{ name: string; stage: string; what: 'input' | 'output' | 'power'; output?: string }>;
  settle: number;
  built: BuiltChain;
};

function slowestTimeConstant(c: Circuit): number {
  const resAt = new Map<string, number[]>();
  const fixed = new Set(c.fixed.map((f) => c.find(f.node)));
  for (const r of c.resistors) {
    for (const n of [c.find(r.a), c.find(r.b)]) {
      if (n === '0' || fixed.has(n)) continue; // ground and supplies are everyone's neighbours
      const list = resAt.get(n) ?? [];
      list.push(r.r);
      resAt.set(n, list);
    }
  }
  // resistance seen at a node: its resistors in parallel (ground and supplies: 0)
  const par = (node: string) => {
    const list = resAt.get(c.find(node));
    if (!list?.length) return 0;
    return 1 / list.reduce((g, r) => g + 1 / r, 0);
  };
  let tau = 0;
  for (const cap of c.capacitors) {
    if (INTERELECTRODE.test(cap.name)) continue;
    const t = cap.c * Math.max(par(cap.a) + par(cap.b), 1);
    // a source's DC block (1 F) starts charged and never moves: it sets no settling time
    if (t < 1e3) tau = Math.max(tau, t);
  }
  for (const l of c.inductors) tau = Math.max(tau, (4 * l.l) / Math.max(par(l.a) + par(l.b), 100));
  return tau;
}

/**
 * An ngspice batch netlist of the whole chain, written from the same circuit the engine solves. The control
 * block prints `res_op_<node>` lines, `res_ac_<k>_re/_im` (output probe / source at each check frequency) and,
 * for each probe, `res_w1_<k>` / `res_w2_<k>` (peak-to-peak in the first and the last of six periods after the settling
 * time: equal once the driven steady state is reached) and a fourier block (`RESULT fourier=<probe>`, last period).
 */
export function chainNetlist(chain: ChainInput, options: ChainNetlistOptions = {}): ChainNetlist {
  const built = buildChain(chain);
  const c = built.circuit;
  const name = (n: string) => {
    const r = c.find(n);
    return r === '0' ? '0' : `n_${r.replace(/[^A-Za-z0-9]/g, '_')}`;
  };
  const lines: string[] = ['* Anodyne chain netlist', SPICE_PRELUDE];
  const tubeTypes = new Map<string, string>();
  c.tubes.forEach((t, i) => {
    const key = JSON.stringify(t.tube);
    if (!tubeTypes.has(key)) {
      const sub = `TUBE${tubeTypes.size + 1}`;
      tubeTypes.set(key, sub);
      lines.push(tubeSubcircuit(t.tube, sub));
    }
    void i;
  });
  const f = chain.input.frequency;
  const amp = chain.input.amplitude;
  c.fixed.forEach((fx, i) => {
    if (fx.signal !== 0) {
      lines.push(`V${i + 1} ${name(fx.node)} 0 DC ${num(fx.dc)} AC 1 ${fx.signal < 0 ? 180 : 0} SIN(${num(fx.dc)} ${num(amp * fx.signal)} ${num(f)})`);
    } else lines.push(`V${i + 1} ${name(fx.node)} 0 DC ${num(fx.dc)}`);
  });
  c.resistors.forEach((r, i) => lines.push(`R${i + 1} ${name(r.a)} ${name(r.b)} ${num(r.r)}`));
  c.capacitors.forEach((cap, i) => {
    if (!INTERELECTRODE.test(cap.name)) lines.push(`C${i + 1} ${name(cap.a)} ${name(cap.b)} ${num(cap.c)}`);
  });
  c.inductors.forEach((l, i) => lines.push(`L${i + 1} ${name(l.a)} ${name(l.b)} ${num(l.l)}`));
  c.currents.forEach((s, i) => lines.push(`I${i + 1} ${name(s.a)} ${name(s.b)} DC ${num(s.i)}`));
  c.windings.forEach((w, i) => {
    const a = `VWA${i + 1}`;
    const b = `VWB${i + 1}`;
    lines.push(
      `${a} ${name(w.n1)} wa${i + 1} DC 0`,
      `${b} ${name(w.n2)} wb${i + 1} DC 0`,
      `BWA${i + 1} wa${i + 1} ${name(w.p1)} V = (i(${a})-i(${b}))*${num(w.k)}`,
      `BWB${i + 1} wb${i + 1} ${name(w.p2)} V = -(i(${a})-i(${b}))*${num(w.k)}`,
    );
  });
  c.tubes.forEach((t, i) => {
    const sub = tubeTypes.get(JSON.stringify(t.tube))!;
    const pins = [t.plate, t.grid, t.cathode, ...(t.tube.model === 'koren-pentode' ? [t.screen ?? t.cathode] : [])].map(name);
    lines.push(`X${i + 1} ${pins.join(' ')} ${sub}`);
  });
  // probes as behavioural sources (a weighted sum of node voltages)
  const probes: ChainNetlist['probes'] = [];
  const probeLine = (pname: string, p: Probe) => {
    const expr = p.map(([n, w]) => `${num(w)}*v(${name(n)})`).join('+').replace(/\*v\(0\)/g, '*0');
    lines.push(`B${pname} ${pname} 0 V = ${expr}`, `R${pname} ${pname} 0 1G`);
  };
  built.ports.forEach((port, i) => {
    const first = Object.values(port.inputs)[0]!;
    probeLine(`pi${i}`, [[first.node, 1]]);
    probes.push({ name: `pi${i}`, stage: port.id, what: 'input' });
    Object.entries(port.outputs).forEach(([oname, o], k) => {
      probeLine(`po${i}_${k}`, o.probe);
      probes.push({ name: `po${i}_${k}`, stage: port.id, what: 'output', output: oname });
    });
    if (port.power) {
      probeLine(`pp${i}`, port.power.probe);
      probes.push({ name: `pp${i}`, stage: port.id, what: 'power' });
    }
  });
  probeLine('pout', built.output.probe);
  const period = 1 / f;
  const steps = options.stepsPerPeriod ?? 256;
  const dt = period / steps;
  const settle = options.settle ?? Math.min(3, Math.max(20 * period, 5 * slowestTimeConstant(c)));
  const t1 = settle + period;
  const t2 = settle + 6 * period;
  lines.push('.options reltol=1e-6 abstol=1e-13 vntol=1e-9 itl1=500 itl4=100', '.control', 'set noaskquit', 'set numdgt=10', 'set nfreqs=11', 'op');
  const opNodes = [...new Set(c.tubes.flatMap((t) => [t.plate, t.grid, t.cathode]).map(name))].filter((n) => n !== '0');
  for (const n of opNodes) lines.push(`let res_op_${n} = v(${n})`, `print res_op_${n}`);
  (options.acFrequencies ?? [20, 1000, 20000]).forEach((fr, k) => {
    lines.push(`ac lin 1 ${num(fr)} ${num(fr)}`, `let res_ac_${k}_re = real(v(pout))`, `let res_ac_${k}_im = imag(v(pout))`, `print res_ac_${k}_re res_ac_${k}_im`);
  });
  if (amp > 0) {
    // one transient; the peak-to-peak of each probe in the first and the last period shows whether it settled
    lines.push(`tran ${num(dt)} ${num(t2)} ${num(settle - period)} ${num(dt)}`);
    probes.forEach((p, k) => {
      lines.push(
        `meas tran res_w1_${k} pp v(${p.name}) from=${num(settle)} to=${num(t1)}`,
        `meas tran res_w2_${k} pp v(${p.name}) from=${num(t2 - period)} to=${num(t2)}`,
      );
    });
    lines.push(`print ${probes.map((_, k) => `res_w1_${k} res_w2_${k}`).join(' ')}`);
    for (const p of probes) lines.push(`echo "RESULT fourier=${p.name}"`, `fourier ${num(f)} v(${p.name})`);
  }
  lines.push('quit', '.endc', '.end', '');
  return { text: lines.join('\n'), probes, settle, built };
}
