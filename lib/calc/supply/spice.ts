// ngspice text for a supply circuit (text only; running it is the caller's business).
// Silicon diodes use the SPICE diode model with the library's IS, N, RS; a vacuum rectifier plate is a
// behavioural current source with the engine's own law I = k·max(V, 0)^p.
import { prepareSupply } from './solve';
import type { SupplyCircuit } from './types';

export type SupplyNetlistOptions = {
  /** transient length and the window saved at its end, s */
  stop?: number;
  window?: number;
  /** maximum time step, s */
  maxStep?: number;
  /** node voltages to start the transient from (e.g. the hand estimate), V per node */
  initial?: number[];
  /** currents in the branch into each node to start from, A (chokes only) */
  initialCurrents?: number[];
  /** mains factor (1 ± variation) */
  mainsFactor?: number;
  /** the idle or full-drive currents of the loads */
  drive?: 'idle' | 'full';
  /** file that `wrdata` writes */
  dataFile?: string;
};

const num = (v: number) => (Number.isInteger(v) ? String(v) : v.toPrecision(10));

export function supplyNetlist(circuit: SupplyCircuit, o: SupplyNetlistOptions = {}): string {
  const p = prepareSupply(circuit);
  const { net, source, frequency } = p;
  const peak = source.peak * (o.mainsFactor ?? 1);
  const f = frequency;
  const stop = o.stop ?? 2;
  const window = o.window ?? 1 / f;
  const maxStep = o.maxStep ?? 1 / f / 1000;
  const L: string[] = ['* Anodyne supply circuit', `.param vpk=${num(peak)}`];
  const rs = source.resistance;
  const law = p.rectifier.law;
  if (law.kind === 'diode') L.push(`.model DREC D(IS=${num(law.is)} N=${num(law.n)} RS=${num(law.rs)})`);
  // the rectifier output rout feeds the first element through a 0 V source that measures the rectifier current
  if (p.rectifier.kind === 'silicon-bridge') {
    L.push('VSEC p0 nn SIN(0 {vpk} ' + f + ')');
    L.push(`RSEC p0 pp ${num(Math.max(rs, 1e-6))}`);
    // a few pF at the diode nodes give the commutation a defined charge (without them the floating winding stalls the time step)
    L.push('RFLOAT nn 0 1e9', 'CPP pp 0 10p', 'CNN nn 0 10p');
    L.push('D1 pp rout DREC', 'D2 nn rout DREC', 'D3 0 pp DREC', 'D4 0 nn DREC');
  } else {
    L.push('VSA sa 0 SIN(0 {vpk} ' + f + ' 0 0 0)');
    L.push('VSB sb 0 SIN(0 {vpk} ' + f + ' 0 0 180)');
    L.push(`RSA sa pa ${num(Math.max(rs, 1e-6))}`, `RSB sb pb ${num(Math.max(rs, 1e-6))}`, 'CPA pa 0 10p', 'CPB pb 0 10p');
    if (law.kind === 'diode') L.push('D1 pa rout DREC', 'D2 pb rout DREC');
    else {
      L.push(`B1 pa rout I = ${num(law.k)}*pwr(max(v(pa,rout),0),${num(law.p)})`);
      L.push(`B2 pb rout I = ${num(law.k)}*pwr(max(v(pb,rout),0),${num(law.p)})`);
      L.push('RLA pa rout 1e9', 'RLB pb rout 1e9');
    }
  }
  const node = (j: number) => `n${j}`;
  if (net.capacitorInput) L.push(`VIR rout ${node(0)} 0`);
  else L.push('VIR rout rin 0');
  const ic: string[] = [];
  for (let j = 0; j < net.k; j++) {
    const v0 = o.initial?.[j];
    L.push(`C${j} ${node(j)} 0 ${num(net.capacitance[j]!)}${v0 !== undefined ? ` IC=${num(v0)}` : ''}`);
    if (v0 !== undefined) ic.push(`v(${node(j)})=${num(v0)}`);
    const br = net.branchInto[j];
    if (br) {
      const from = j === 0 ? 'rin' : node(j - 1);
      if (br.inductance > 0) {
        const i0 = o.initialCurrents?.[j];
        L.push(`L${j} ${from} m${j} ${num(br.inductance)}${i0 !== undefined ? ` IC=${num(i0)}` : ''}`);
        L.push(`RB${j} m${j} ${node(j)} ${num(Math.max(br.resistance, 1e-6))}`);
      } else L.push(`RB${j} ${from} ${node(j)} ${num(br.resistance)}`);
    }
    const cur = o.drive === 'full' ? net.full[j]! : net.idle[j]!;
    if (cur > 0) L.push(`IL${j} ${node(j)} 0 DC ${num(cur)}`);
    if (net.conductance[j]! > 0) L.push(`RL${j} ${node(j)} 0 ${num(1 / net.conductance[j]!)}`);
  }
  const vecs = ['i(VIR)', ...Array.from({ length: net.k }, (_, j) => `v(${node(j)})`)];
  L.push('.options reltol=1e-5 abstol=1e-10 vntol=1e-7 method=gear');
  L.push('.control');
  L.push('set noaskquit');
  L.push('set wr_singlescale');
  L.push('set wr_vecnames');
  L.push(`tran ${num(maxStep)} ${num(stop)} ${num(stop - window)} ${num(maxStep)}${o.initial ? ' uic' : ''}`);
  L.push(`wrdata ${o.dataFile ?? 'supply.dat'} ${vecs.join(' ')}`);
  L.push('quit');
  L.push('.endc');
  L.push('.end');
  return L.join('\n') + '\n';
}
