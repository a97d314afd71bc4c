import type { StageInput, Tube } from './input';
import { defaultRgi } from './models/registry';

// Pure text generation: nothing here runs ngspice.

const num = (x: number) => (Number.isFinite(x) ? Number(x.toPrecision(12)).toString() : '0');

/** Definitions every netlist needs once: ngspice-39 has pwr() (signed) but no pwrs(). */
export const SPICE_PRELUDE = [
  '.func pwrs(x,y) {sgn(x)*pwr(x,y)}',
  '.func softplus(x) {x > 30 ? x : ln(1+exp(x))}',
  '.model DGRID D(IS=1n RS=1 N=1)',
].join('\n');

/**
 * Koren-form subcircuit. Pin order: triode P G K; pentode / beam tetrode P G1 K G2.
 * The grid diode (DGRID, with RGI in series) runs from grid to cathode.
 */
export function tubeSubcircuit(tube: Tube, name: string): string {
  const rgi = defaultRgi(tube);
  const caps = tube.capacitances;
  const lines: string[] = [];
  const capLines = (p: string, g: string, k: string) =>
    caps
      ? [`CGK ${g} ${k} ${num(caps.cgk)}`, `CGA ${g} ${p} ${num(caps.cga)}`, `CAK ${p} ${k} ${num(caps.cak)}`].filter(
          (l) => !/ 0$/.test(l),
        )
      : [];
  if (tube.model === 'koren-triode') {
    const vct = tube.vct ?? 0;
    lines.push(
      `.subckt ${name} 1 2 3`,
      `* plate=1 grid=2 cathode=3; mu=${num(tube.mu)} ex=${num(tube.ex)} kg1=${num(tube.kg1)} kp=${num(tube.kp)} kvb=${num(tube.kvb)}`,
      `BE1 7 0 V = v(1,3)/${num(tube.kp)}*softplus(${num(tube.kp)}*(1/${num(tube.mu)}+(v(2,3)+${num(vct)})/sqrt(${num(tube.kvb)}+v(1,3)*v(1,3))))`,
      'RE1 7 0 1G',
      `BP 1 3 I = (pwr(v(7),${num(tube.ex)})+pwrs(v(7),${num(tube.ex)}))/${num(tube.kg1)}`,
    );
  } else if (tube.model === 'child-langmuir') {
    lines.push(
      `.subckt ${name} 1 2 3`,
      `* plate=1 grid=2 cathode=3; 3/2-power law, perveance=${num(tube.perveance)} mu=${num(tube.mu)}`,
      `BP 1 3 I = (v(1,3) > 0 && v(2,3)+v(1,3)/${num(tube.mu)} > 0) ? ${num(tube.perveance)}*pwr(v(2,3)+v(1,3)/${num(tube.mu)},1.5) : 0`,
    );
  } else {
    const vct = tube.vct ?? 0;
    lines.push(
      `.subckt ${name} 1 2 3 4`,
      `* plate=1 grid1=2 cathode=3 screen=4; mu=${num(tube.mu)} ex=${num(tube.ex)} kg1=${num(tube.kg1)} kg2=${num(tube.kg2)} kp=${num(tube.kp)} kvb=${num(tube.kvb)}`,
      `BE1 7 0 V = v(4,3) > 0 ? v(4,3)/${num(tube.kp)}*softplus(${num(tube.kp)}*(1/${num(tube.mu)}+(v(2,3)+${num(vct)})/v(4,3))) : 0`,
      'RE1 7 0 1G',
      `BP 1 3 I = v(1,3) > 0 ? (pwr(v(7),${num(tube.ex)})+pwrs(v(7),${num(tube.ex)}))/${num(tube.kg1)}*atan(v(1,3)/${num(tube.kvb)}) : 0`,
      `BS 4 3 I = (v(4,3) > 0 && v(2,3)+v(4,3)/${num(tube.mu)} > 0) ? pwr(v(2,3)+v(4,3)/${num(tube.mu)},${num(tube.ex)})/${num(tube.kg2)} : 0`,
    );
  }
  lines.push(`RGI 2 8 ${num(rgi)}`, 'DG 8 3 DGRID', ...capLines('1', '2', '3'), `.ends ${name}`);
  return lines.join('\n');
}

export type SpiceAnalysis = 'op' | 'ac' | 'tran';
export type NetlistOptions = {
  analyses: SpiceAnalysis[];
  /** samples per period for the transient (default 256) */
  stepsPerPeriod?: number;
  /**
   * push-pull only: drive grid 2 with its own sine (V peak at the grid, phase in degrees relative to grid 1's
   * drive) instead of the antiphase copy of grid 1's — the netlist for `analyzePushPullDriven`
   */
  secondGrid?: { amplitude: number; phaseDeg: number };
};

/** Magnetising inductance of the modelled output transformer (large enough to be invisible at 1 kHz). */
const PRIMARY_INDUCTANCE = 20;

type Built = {
  body: string[];
  out: string;
  grid: string;
  plate: string;
  cathode: string;
  screen: string | null;
  tau: number;
  power: string | null;
  sourceScale: number;
  /** phase splitters: the second output and the second section's plate and meter */
  out2?: string;
  plate2?: string;
  meter2?: string;
};

function biasParts(bias: { kind: 'cathode'; cathodeResistor: number; cathodeBypass: number | null } | { kind: 'fixed'; fixedBias: number }, cath: string) {
  if (bias.kind === 'fixed') {
    return { lines: [`VBIAS gret 0 DC ${num(bias.fixedBias)}`, `RKG ${cath} 0 1e-6`].filter((l) => !l.startsWith('RKG')), ret: 'gret', tau: 0, cathode: '0' };
  }
  const lines = [`RK ${cath} 0 ${num(bias.cathodeResistor)}`];
  if (bias.cathodeBypass) lines.push(`CK ${cath} 0 ${num(bias.cathodeBypass)}`);
  return { lines, ret: '0', tau: bias.cathodeBypass ? bias.cathodeBypass * bias.cathodeResistor : 0, cathode: cath };
}

function screenLines(screen: { kind: 'fixed'; supply?: number } | { kind: 'resistor'; resistor: number; bypass: number | null } | undefined) {
  if (!screen) return { lines: [] as string[], tau: 0 };
  if (screen.kind === 'fixed') {
    return { lines: screen.supply !== undefined ? [`VSCR g2 0 DC ${num(screen.supply)}`] : ['VSCR g2 bplus DC 0'], tau: 0 };
  }
  const lines = [`RSCR bplus g2 ${num(screen.resistor)}`];
  if (screen.bypass) lines.push(`CSCR g2 0 ${num(screen.bypass)}`);
  return { lines, tau: screen.bypass ? screen.bypass * screen.resistor : 0 };
}

/** Input coupling capacitor for the splitters' AC-coupled grids: a real value, so the transient settles to the drive's steady state. */
const SPLITTER_INPUT_CAPACITOR = 100e-9;

function inputLines(input: StageInput, grid: string, ret: string, acCoupled: boolean, couplingCapacitor = 1) {
  const rs = input.sourceResistance;
  const rg = input.gridResistor;
  const lines: string[] = [];
  const src = rs > 0 || acCoupled ? 'src' : grid;
  const amp = rs > 0 && !acCoupled ? (input.drive.amplitude * (rs + rg)) / rg : input.drive.amplitude;
  lines.push(`VIN ${src} ${acCoupled ? '0' : ret} DC 0 AC 1 SIN(0 ${num(amp)} ${num(input.drive.frequency)})`);
  if (acCoupled) {
    lines.push(rs > 0 ? `RS src sc ${num(rs)}` : 'RS src sc 1e-3', `CIN sc ${grid} ${num(couplingCapacitor)}`);
  } else if (rs > 0) {
    lines.push(`RS src ${grid} ${num(rs)}`);
  }
  lines.push(`RG ${grid} ${ret} ${num(rg)}`);
  return lines;
}

function build(input: StageInput, options: NetlistOptions = { analyses: [] }): Built {
  const pentode = input.tube.model === 'koren-pentode';
  const tubeCall = (x: string, p: string, g: string, k: string) => `${x} ${p} ${g} ${k}${pentode ? ` g2t${x}` : ''} TUBE`;
  const screenMeter = (x: string) => (pentode ? [`VMS${x} g2 g2t${x} DC 0`] : []);
  const body: string[] = [`VBP bplus 0 DC ${num(input.supply)}`];
  switch (input.topology) {
    case 'common-cathode':
    case 'pentode-amplifier': {
      const b = biasParts(input.bias, 'cath');
      const s = input.topology === 'pentode-amplifier' ? screenLines(input.screen) : { lines: [], tau: 0 };
      body.push(`RA bplus plate ${num(input.plateResistor)}`, 'VMP plate pt DC 0', tubeCall('XT', 'pt', 'grid', b.cathode), ...screenMeter('XT'), ...b.lines, ...s.lines);
      body.push(...inputLines(input, 'grid', b.ret, false));
      let out = 'plate';
      let tau = Math.max(b.tau, s.tau);
      if (input.load) {
        body.push(`CC plate out ${num(input.load.couplingCapacitor)}`, `RL out 0 ${num(input.load.resistance)}`);
        out = 'out';
        tau = Math.max(tau, input.load.couplingCapacitor * (input.load.resistance + input.plateResistor));
      }
      return { body, out, grid: 'grid', plate: 'plate', cathode: b.cathode, screen: pentode ? 'g2' : null, tau, power: null, sourceScale: 1 };
    }
    case 'cathode-follower': {
      body.push(input.plateResistor > 0 ? `RP bplus plate ${num(input.plateResistor)}` : 'VRP bplus plate DC 0', 'VMP plate pt DC 0', tubeCall('XT', 'pt', 'grid', 'cath'));
      let tau = 0;
      if (input.bias.kind === 'self') {
        body.push(`RB cath tap ${num(input.bias.biasResistor)}`, `RREST tap 0 ${num(input.cathodeResistor - input.bias.biasResistor)}`);
        body.push(...inputLines(input, 'grid', 'tap', true));
      } else {
        body.push(`RK cath 0 ${num(input.cathodeResistor)}`, `VGB gret 0 DC ${num(input.bias.gridVoltage)}`);
        body.push(...inputLines(input, 'grid', 'gret', false));
      }
      let out = 'cath';
      if (input.load) {
        body.push(`CC cath out ${num(input.load.couplingCapacitor)}`, `RL out 0 ${num(input.load.resistance)}`);
        out = 'out';
        tau = input.load.couplingCapacitor * (input.load.resistance + 1000);
      }
      return { body, out, grid: 'grid', plate: 'plate', cathode: 'cath', screen: null, tau, power: null, sourceScale: 1 };
    }
    case 'single-ended-output': {
      const b = biasParts(input.bias, 'cath');
      const s = pentode ? screenLines(input.screen) : { lines: [], tau: 0 };
      const zp = input.primaryImpedance;
      body.push(
        input.primaryResistance > 0 ? `RDC bplus np ${num(input.primaryResistance)}` : 'VDC bplus np DC 0',
        `LP np plate ${PRIMARY_INDUCTANCE}`,
        `RZP np plate ${num(zp)}`,
        `BPOW pout 0 V = v(np)-v(plate)`,
        'RPOW pout 0 1G',
        'VMP plate pt DC 0',
        tubeCall('XT', 'pt', 'grid', b.cathode),
        ...screenMeter('XT'),
        ...b.lines,
        ...s.lines,
      );
      body.push(...inputLines(input, 'grid', b.ret, false));
      const tau = Math.max(b.tau, s.tau, PRIMARY_INDUCTANCE / Math.min(zp, 1000));
      return { body, out: 'plate', grid: 'grid', plate: 'plate', cathode: b.cathode, screen: pentode ? 'g2' : null, tau, power: `pout ${num(zp)}`, sourceScale: 1 };
    }
    case 'push-pull-output': {
      // Ideal centre-tapped transformer: each half carries v = (i1 − i2)·Raa/4 (derivation in push-pull-output.ts).
      const b = biasParts(input.bias, 'cath');
      const s = pentode ? screenLines(input.screen) : { lines: [], tau: 0 };
      const half = input.primaryResistance / 2;
      const raa = input.plateToPlateImpedance;
      body.push(
        half > 0 ? `RH1 bplus n1 ${num(half)}` : 'VH1 bplus n1 DC 0',
        half > 0 ? `RH2 bplus n2 ${num(half)}` : 'VH2 bplus n2 DC 0',
        `BT1 n1 plate1 V = (i(VMP1)-i(VMP2))*${num(raa / 4)}`,
        `BT2 plate2 n2 V = (i(VMP1)-i(VMP2))*${num(raa / 4)}`,
        'VMP1 plate1 pt1 DC 0',
        'VMP2 plate2 pt2 DC 0',
        `BVPP vpp 0 V = (i(VMP1)-i(VMP2))*${num(raa / 2)}`,
        'RVPP vpp 0 1G',
        tubeCall('X1', 'pt1', 'grid1', b.cathode),
        tubeCall('X2', 'pt2', 'grid2', b.cathode),
        ...screenMeter('X1'),
        ...screenMeter('X2'),
        ...b.lines,
        ...s.lines,
      );
      const rs = input.sourceResistance;
      const rg = input.gridResistor;
      const amp = rs > 0 ? (input.drive.amplitude * (rs + rg)) / rg : input.drive.amplitude;
      body.push(
        `VIN src1 ${b.ret} DC 0 AC 1 SIN(0 ${num(amp)} ${num(input.drive.frequency)})`,
        options.secondGrid
          ? `VIN2 src2 ${b.ret} DC 0 AC 0 SIN(0 ${num((options.secondGrid.amplitude * (rs + rg)) / rg)} ${num(input.drive.frequency)} 0 0 ${num(options.secondGrid.phaseDeg)})`
          : `EINV src2 ${b.ret} src1 ${b.ret} -1`,
        `RS1 src1 grid1 ${num(Math.max(rs, 1e-3))}`,
        `RS2 src2 grid2 ${num(Math.max(rs, 1e-3))}`,
        `RG1 grid1 ${b.ret} ${num(rg)}`,
        `RG2 grid2 ${b.ret} ${num(rg)}`,
      );
      return { body, out: 'vpp', grid: 'grid1', plate: 'plate1', cathode: b.cathode, screen: pentode ? 'g2' : null, tau: Math.max(b.tau, s.tau), power: `vpp ${num(raa)}`, sourceScale: 1 };
    }
    case 'long-tailed-pair': {
      const tail = input.tail;
      body.push(
        `RA1 bplus plate1 ${num(input.plateResistors.inverting)}`,
        `RA2 bplus plate2 ${num(input.plateResistors.nonInverting)}`,
        'VMP1 plate1 pt1 DC 0',
        'VMP2 plate2 pt2 DC 0',
        tubeCall('X1', 'pt1', 'grid1', 'cath'),
        tubeCall('X2', 'pt2', 'grid2', 'cath'),
      );
      let tap = 'cath';
      if (tail.kind === 'resistor') {
        if (tail.biasResistor > 0) {
          body.push(`RB cath tap ${num(tail.biasResistor)}`);
          tap = 'tap';
        }
        if (tail.tailSupply !== 0) body.push(`RT ${tap} vtail ${num(tail.tailResistor)}`, `VTAIL vtail 0 DC ${num(tail.tailSupply)}`);
        else body.push(`RT ${tap} 0 ${num(tail.tailResistor)}`);
      } else {
        body.push(`ITAIL cath 0 DC ${num(tail.current)}`);
      }
      let ret: string;
      if (input.grids.kind === 'bias-tap') {
        ret = tap;
        body.push(...inputLines(input, 'grid1', tap, true, SPLITTER_INPUT_CAPACITOR));
      } else {
        ret = 'gref';
        body.push(`VGREF gref 0 DC ${num(input.grids.gridVoltage)}`, ...inputLines(input, 'grid1', 'gref', false));
      }
      body.push(`RG2 grid2 ${ret} ${num(input.gridResistor)}`, `CG2 grid2 0 ${num(input.secondGridBypass)}`);
      let out = 'plate1';
      let out2 = 'plate2';
      let tau = Math.max(input.secondGridBypass, input.grids.kind === 'bias-tap' ? SPLITTER_INPUT_CAPACITOR : 0) * input.gridResistor;
      if (input.load) {
        const l = input.load;
        body.push(`CC1 plate1 out1 ${num(l.couplingCapacitor)}`, `RL1 out1 0 ${num(l.resistance)}`, `CC2 plate2 out2 ${num(l.couplingCapacitor)}`, `RL2 out2 0 ${num(l.resistance)}`);
        out = 'out1';
        out2 = 'out2';
        tau = Math.max(tau, l.couplingCapacitor * (l.resistance + input.plateResistors.inverting));
      }
      return { body, out, out2, grid: 'grid1', plate: 'plate1', plate2: 'plate2', meter2: 'VMP2', cathode: 'cath', screen: null, tau, power: null, sourceScale: 1 };
    }
    case 'split-load': {
      body.push(`RA bplus plate ${num(input.plateResistor)}`, 'VMP plate pt DC 0', tubeCall('XT', 'pt', 'grid', 'cath'));
      let tap = 'cath';
      if (input.biasResistor > 0) {
        body.push(`RB cath tap ${num(input.biasResistor)}`);
        tap = 'tap';
      }
      body.push(`RK ${tap} 0 ${num(input.cathodeResistor)}`);
      if (input.bias.kind === 'bootstrapped') body.push(...inputLines(input, 'grid', tap, true, SPLITTER_INPUT_CAPACITOR));
      else body.push(`VGB gret 0 DC ${num(input.bias.gridVoltage)}`, ...inputLines(input, 'grid', 'gret', false));
      let out = 'plate';
      let out2 = 'cath';
      // the bootstrapped grid resistor looks about ten times larger to its coupling capacitor
      let tau = input.bias.kind === 'bootstrapped' ? SPLITTER_INPUT_CAPACITOR * input.gridResistor * 3 : 0;
      if (input.load) {
        const l = input.load;
        body.push(`CC1 plate outp ${num(l.couplingCapacitor)}`, `RL1 outp 0 ${num(l.resistance)}`, `CC2 cath outk ${num(l.couplingCapacitor)}`, `RL2 outk 0 ${num(l.resistance)}`);
        out = 'outp';
        out2 = 'outk';
        tau = l.couplingCapacitor * (l.resistance + input.plateResistor);
      }
      return { body, out, out2, grid: 'grid', plate: 'plate', cathode: 'cath', screen: null, tau, power: null, sourceScale: 1 };
    }
  }
}

/** Frequencies at which the netlist reports the response from the source EMF (`res_resp<i>_mag`, `_ph`). */
export const RESPONSE_FREQUENCIES = [20, 1000, 20000];

/**
 * An ngspice batch netlist for the stage. The control block prints machine-readable lines
 * `res_op_vplate = …`, `res_op_vcath`, `res_op_vgrid`, `res_op_iplate` (+ `res_op_vscreen`, `res_op_iscreen`),
 * `res_ac_gain`, `res_ac_phase` (grid to output at the drive frequency; `print` with numdgt=10 because
 * `echo $&x` keeps only 6 digits), then `RESULT fourier=output` / `RESULT fourier=power load=R` each followed
 * by ngspice's fourier table, taken after the transient has settled. Plate and grid are tube 1's for push-pull.
 */
export function stageNetlist(input: StageInput, options: NetlistOptions = { analyses: ['op', 'ac', 'tran'] }): string {
  const b = build(input, options);
  const f = input.drive.frequency;
  const period = 1 / f;
  const steps = options.stepsPerPeriod ?? 256;
  const settle = Math.min(2, Math.max(10 * period, 6 * b.tau));
  const tstop = settle + period;
  const pentode = input.tube.model === 'koren-pentode';
  const meter = input.topology === 'push-pull-output' || input.topology === 'long-tailed-pair' ? 'VMP1' : 'VMP';
  const lines = [
    `* Anodyne stage netlist: ${input.topology}`,
    SPICE_PRELUDE,
    tubeSubcircuit(input.tube, 'TUBE'),
    ...b.body,
    '.options reltol=1e-6 abstol=1e-13 vntol=1e-9 itl1=500 itl4=100',
    '.control',
    'set noaskquit',
    'set numdgt=10',
    'set nfreqs=11',
  ];
  if (options.analyses.includes('op')) {
    lines.push(
      'op',
      `let res_op_vplate = v(${b.plate})`,
      `let res_op_vcath = v(${b.cathode === '0' ? b.grid : b.cathode})${b.cathode === '0' ? '*0' : ''}`,
      `let res_op_vgrid = v(${b.grid})`,
      `let res_op_iplate = i(${meter})`,
      'print res_op_vplate res_op_vcath res_op_vgrid res_op_iplate',
    );
    if (b.plate2 && b.meter2) lines.push(`let res_op_vplate2 = v(${b.plate2})`, `let res_op_iplate2 = i(${b.meter2})`, 'print res_op_vplate2 res_op_iplate2');
    if (pentode && b.screen) {
      const sm = input.topology === 'push-pull-output' ? 'VMSX1' : 'VMSXT';
      lines.push(`let res_op_vscreen = v(${b.screen})`, `let res_op_iscreen = i(${sm})`, 'print res_op_vscreen res_op_iscreen');
    }
  }
  // the splitters' input capacitor is a real value for the transient; the AC analyses take it as a short, as
  // the engine's drive at the grid does
  const cin = /^CIN \S+ \S+ (\S+)$/m.exec(b.body.join('\n'))?.[1];
  const cinReal = cin !== undefined && cin !== '1';
  if (options.analyses.includes('ac')) {
    if (cinReal) lines.push('alter CIN = 1');
    lines.push(
      `ac lin 1 ${num(f)} ${num(f)}`,
      `let r_g = v(${b.out})/v(${b.grid})`,
      'let res_ac_gain = mag(r_g)',
      'let res_ac_phase = ph(r_g)',
      'print res_ac_gain res_ac_phase',
    );
    if (b.out2) {
      lines.push(`let r_g2 = v(${b.out2})/v(${b.grid})`, 'let res_ac_gain2 = mag(r_g2)', 'let res_ac_phase2 = ph(r_g2)', 'print res_ac_gain2 res_ac_phase2');
    }
    // response from the source EMF (VIN is 1 V AC) to the output(s)
    RESPONSE_FREQUENCIES.forEach((fr, i) => {
      lines.push(`ac lin 1 ${num(fr)} ${num(fr)}`, `let res_resp${i}_mag = mag(v(${b.out}))`, `let res_resp${i}_ph = ph(v(${b.out}))`, `print res_resp${i}_mag res_resp${i}_ph`);
      if (b.out2) lines.push(`let res_resp${i}_mag2 = mag(v(${b.out2}))`, `let res_resp${i}_ph2 = ph(v(${b.out2}))`, `print res_resp${i}_mag2 res_resp${i}_ph2`);
    });
  }
  if (options.analyses.includes('tran') && input.drive.amplitude > 0) {
    const dt = period / steps;
    // steady state check: the output's peak-to-peak and mean over the last period and over a period 20 % earlier
    const early = 0.8 * tstop;
    if (cinReal && options.analyses.includes('ac')) lines.push(`alter CIN = ${cin}`);
    lines.push(
      `tran ${num(dt)} ${num(tstop)} ${num(Math.min(settle - period, early - period))} ${num(dt)}`,
      `meas tran res_win1_pp PP v(${b.out}) from=${num(early - period)} to=${num(early)}`,
      `meas tran res_win2_pp PP v(${b.out}) from=${num(tstop - period)} to=${num(tstop)}`,
      `meas tran res_win1_avg AVG v(${b.out}) from=${num(early - period)} to=${num(early)}`,
      `meas tran res_win2_avg AVG v(${b.out}) from=${num(tstop - period)} to=${num(tstop)}`,
      'print res_win1_pp res_win2_pp res_win1_avg res_win2_avg',
      `echo "RESULT fourier=output"`,
      `fourier ${num(f)} v(${b.out})`,
    );
    if (b.out2) lines.push(`echo "RESULT fourier=output2"`, `fourier ${num(f)} v(${b.out2})`);
    if (b.power) {
      const [node, load] = b.power.split(' ');
      lines.push(`echo "RESULT fourier=power load=${load}"`, `fourier ${num(f)} v(${node})`);
    }
  }
  lines.push('quit', '.endc', '.end', '');
  return lines.join('\n');
}
