import { CalcError } from '../errors';
import type { StageInput } from '../input';
import { Circuit, type Probe } from './circuit';
import { pushPullWithTransformer, singleEndedWithTransformer } from '../feedback/output-transformer';
import { applyFeedback } from '../feedback/circuit';
import type { ChainElement, ChainInput, ChainLink, PassiveInput, RcNetworkInput, VolumeControlInput } from './input';

/** Magnetising inductance of a single-ended output transformer (as in the single-stage netlists). */
export const PRIMARY_INDUCTANCE = 20;
/** Coupling capacitor of a source that drives a self-biased follower (the single-stage convention). */
const SOURCE_COUPLING = 1;

/** What a chain element exposes to its neighbours once its own parts are in the circuit. */
export type Ports = {
  id: string;
  topology: string;
  /** input name → grid node, the node its grid resistor returns to, and the resistor (null: a passive input) */
  inputs: Record<string, { node: string; ret: string; rg: number | null }>;
  /** output name → node a link takes the signal from (and the probe for its level) */
  outputs: Record<string, { node: string; probe: Probe }>;
  main: string;
  power: { probe: Probe; load: number } | null;
  /** tubes of the stage; a class-AB pair cuts off each half by design */
  tubes: string[];
  cutoffIsLimit: boolean;
  /** the stage's own load, used on each of `loadOn` that no link takes */
  ownLoad: { resistance: number; couplingCapacitor: number } | null;
  loadOn?: string[];
  /** the source resistance given with the stage (used for the first element only) */
  sourceResistance: number;
};

export type StageBuilder = (c: Circuit, id: string, input: any) => Ports;

const node = (id: string, n: string) => `${id}.${n}`;

function bias(c: Circuit, id: string, b: { kind: 'cathode'; cathodeResistor: number; cathodeBypass: number | null } | { kind: 'fixed'; fixedBias: number }) {
  if (b.kind === 'fixed') {
    c.fix(node(id, 'gret'), b.fixedBias);
    return { cathode: '0', ret: node(id, 'gret') };
  }
  c.resistor(`RK_${id}`, node(id, 'cath'), '0', b.cathodeResistor);
  if (b.cathodeBypass) c.capacitor(`CK_${id}`, node(id, 'cath'), '0', b.cathodeBypass);
  return { cathode: node(id, 'cath'), ret: '0' };
}

function screen(c: Circuit, id: string, s: StageInput extends infer _ ? any : never, pentode: boolean): string | null {
  if (!pentode || !s) return null;
  const g2 = node(id, 'g2');
  if (s.kind === 'fixed') {
    if (s.supply !== undefined) c.fix(g2, s.supply);
    else c.alias(g2, node(id, 'bplus'));
  } else {
    c.resistor(`RSCR_${id}`, node(id, 'bplus'), g2, s.resistor);
    if (s.bypass) c.capacitor(`CSCR_${id}`, g2, '0', s.bypass);
  }
  return g2;
}

const single = (n: string): Probe => [[n, 1]];

function plateAmplifier(c: Circuit, id: string, input: Extract<StageInput, { topology: 'common-cathode' | 'pentode-amplifier' }>): Ports {
  const pentode = input.tube.model === 'koren-pentode';
  c.fix(node(id, 'bplus'), input.supply);
  c.resistor(`RA_${id}`, node(id, 'bplus'), node(id, 'plate'), input.plateResistor);
  const b = bias(c, id, input.bias);
  const g2 = input.topology === 'pentode-amplifier' ? screen(c, id, input.screen, pentode) : null;
  c.addTube(`X_${id}`, id, input.tube, node(id, 'plate'), node(id, 'grid'), b.cathode, g2);
  return {
    id,
    topology: input.topology,
    inputs: { grid: { node: node(id, 'grid'), ret: b.ret, rg: input.gridResistor } },
    outputs: { plate: { node: node(id, 'plate'), probe: single(node(id, 'plate')) } },
    main: 'plate',
    power: null,
    tubes: [`X_${id}`],
    cutoffIsLimit: true,
    ownLoad: input.load ?? null,
    sourceResistance: input.sourceResistance,
  };
}

function cathodeFollower(c: Circuit, id: string, input: Extract<StageInput, { topology: 'cathode-follower' }>): Ports {
  c.fix(node(id, 'bplus'), input.supply);
  if (input.plateResistor > 0) c.resistor(`RP_${id}`, node(id, 'bplus'), node(id, 'plate'), input.plateResistor);
  else c.alias(node(id, 'plate'), node(id, 'bplus'));
  c.addTube(`X_${id}`, id, input.tube, node(id, 'plate'), node(id, 'grid'), node(id, 'cath'), null);
  let ret: string;
  if (input.bias.kind === 'self') {
    c.resistor(`RB_${id}`, node(id, 'cath'), node(id, 'tap'), input.bias.biasResistor);
    c.resistor(`RREST_${id}`, node(id, 'tap'), '0', input.cathodeResistor - input.bias.biasResistor);
    ret = node(id, 'tap');
  } else {
    c.resistor(`RK_${id}`, node(id, 'cath'), '0', input.cathodeResistor);
    c.fix(node(id, 'gret'), input.bias.gridVoltage);
    ret = node(id, 'gret');
  }
  return {
    id,
    topology: input.topology,
    inputs: { grid: { node: node(id, 'grid'), ret, rg: input.gridResistor } },
    outputs: { cathode: { node: node(id, 'cath'), probe: single(node(id, 'cath')) } },
    main: 'cathode',
    power: null,
    tubes: [`X_${id}`],
    cutoffIsLimit: true,
    ownLoad: input.load ?? null,
    sourceResistance: input.sourceResistance,
  };
}

function singleEnded(c: Circuit, id: string, input: Extract<StageInput, { topology: 'single-ended-output' }>): Ports {
  const pentode = input.tube.model === 'koren-pentode';
  if (input.transformer) return singleEndedWithTransformer(c, id, input, { bias: (cc, i) => bias(cc, i, input.bias), screen: () => screen(c, id, input.screen, pentode) });
  c.fix(node(id, 'bplus'), input.supply);
  if (input.primaryResistance > 0) c.resistor(`RDC_${id}`, node(id, 'bplus'), node(id, 'np'), input.primaryResistance);
  else c.alias(node(id, 'np'), node(id, 'bplus'));
  c.inductor(`LP_${id}`, node(id, 'np'), node(id, 'plate'), PRIMARY_INDUCTANCE);
  c.resistor(`RZP_${id}`, node(id, 'np'), node(id, 'plate'), input.primaryImpedance);
  const b = bias(c, id, input.bias);
  const g2 = screen(c, id, input.screen, pentode);
  c.addTube(`X_${id}`, id, input.tube, node(id, 'plate'), node(id, 'grid'), b.cathode, g2);
  return {
    id,
    topology: input.topology,
    inputs: { grid: { node: node(id, 'grid'), ret: b.ret, rg: input.gridResistor } },
    outputs: { plate: { node: node(id, 'plate'), probe: single(node(id, 'plate')) } },
    main: 'plate',
    power: { probe: [[node(id, 'np'), 1], [node(id, 'plate'), -1]], load: input.primaryImpedance },
    tubes: [`X_${id}`],
    cutoffIsLimit: true,
    ownLoad: null,
    sourceResistance: input.sourceResistance,
  };
}

function pushPull(c: Circuit, id: string, input: Extract<StageInput, { topology: 'push-pull-output' }>): Ports {
  const pentode = input.tube.model === 'koren-pentode';
  if (input.transformer) return pushPullWithTransformer(c, id, input, { bias: (cc, i) => bias(cc, i, input.bias), screen: () => screen(c, id, input.screen, pentode) });
  c.fix(node(id, 'bplus'), input.supply);
  const half = input.primaryResistance / 2;
  for (const k of ['1', '2']) {
    if (half > 0) c.resistor(`RH${k}_${id}`, node(id, 'bplus'), node(id, `n${k}`), half);
    else c.alias(node(id, `n${k}`), node(id, 'bplus'));
  }
  c.winding(`T_${id}`, node(id, 'n1'), node(id, 'plate1'), node(id, 'n2'), node(id, 'plate2'), input.plateToPlateImpedance / 4);
  const b = bias(c, id, input.bias);
  const g2 = screen(c, id, input.screen, pentode);
  c.addTube(`X1_${id}`, id, input.tube, node(id, 'plate1'), node(id, 'grid1'), b.cathode, g2);
  c.addTube(`X2_${id}`, id, input.tube, node(id, 'plate2'), node(id, 'grid2'), b.cathode, g2);
  const primary: Probe = [[node(id, 'n1'), 1], [node(id, 'plate1'), -1], [node(id, 'plate2'), 1], [node(id, 'n2'), -1]];
  return {
    id,
    topology: input.topology,
    inputs: {
      grid1: { node: node(id, 'grid1'), ret: b.ret, rg: input.gridResistor },
      grid2: { node: node(id, 'grid2'), ret: b.ret, rg: input.gridResistor },
    },
    outputs: { 'plate-to-plate': { node: node(id, 'plate1'), probe: primary } },
    main: 'plate-to-plate',
    power: { probe: primary, load: input.plateToPlateImpedance },
    tubes: [`X1_${id}`, `X2_${id}`],
    cutoffIsLimit: input.class === 'A',
    ownLoad: null,
    sourceResistance: input.sourceResistance,
  };
}

function longTailedPair(c: Circuit, id: string, input: Extract<StageInput, { topology: 'long-tailed-pair' }>): Ports {
  c.fix(node(id, 'bplus'), input.supply);
  c.resistor(`RA1_${id}`, node(id, 'bplus'), node(id, 'plate1'), input.plateResistors.inverting);
  c.resistor(`RA2_${id}`, node(id, 'bplus'), node(id, 'plate2'), input.plateResistors.nonInverting);
  c.addTube(`X1_${id}`, id, input.tube, node(id, 'plate1'), node(id, 'grid1'), node(id, 'cath'), null);
  c.addTube(`X2_${id}`, id, input.tube, node(id, 'plate2'), node(id, 'grid2'), node(id, 'cath'), null);
  let tap = node(id, 'cath');
  const tail = input.tail;
  if (tail.kind === 'resistor') {
    if (tail.biasResistor > 0) {
      c.resistor(`RB_${id}`, node(id, 'cath'), node(id, 'tap'), tail.biasResistor);
      tap = node(id, 'tap');
    }
    if (tail.tailSupply !== 0) {
      c.fix(node(id, 'vtail'), tail.tailSupply);
      c.resistor(`RT_${id}`, tap, node(id, 'vtail'), tail.tailResistor);
    } else c.resistor(`RT_${id}`, tap, '0', tail.tailResistor);
  } else {
    c.current(`IT_${id}`, node(id, 'cath'), '0', tail.current);
  }
  let ret = tap;
  if (input.grids.kind === 'dc') {
    ret = node(id, 'gref');
    c.fix(ret, input.grids.gridVoltage);
  }
  c.resistor(`RG2_${id}`, node(id, 'grid2'), ret, input.gridResistor);
  c.capacitor(`CG2_${id}`, node(id, 'grid2'), '0', input.secondGridBypass);
  return {
    id,
    topology: input.topology,
    inputs: { grid: { node: node(id, 'grid1'), ret, rg: input.gridResistor } },
    outputs: {
      inverting: { node: node(id, 'plate1'), probe: single(node(id, 'plate1')) },
      'non-inverting': { node: node(id, 'plate2'), probe: single(node(id, 'plate2')) },
    },
    main: 'inverting',
    power: null,
    tubes: [`X1_${id}`, `X2_${id}`],
    cutoffIsLimit: true,
    ownLoad: input.load ?? null,
    loadOn: ['inverting', 'non-inverting'],
    sourceResistance: input.sourceResistance,
  };
}

function splitLoad(c: Circuit, id: string, input: Extract<StageInput, { topology: 'split-load' }>): Ports {
  c.fix(node(id, 'bplus'), input.supply);
  c.resistor(`RA_${id}`, node(id, 'bplus'), node(id, 'plate'), input.plateResistor);
  c.addTube(`X_${id}`, id, input.tube, node(id, 'plate'), node(id, 'grid'), node(id, 'cath'), null);
  let tap = node(id, 'cath');
  if (input.biasResistor > 0) {
    c.resistor(`RB_${id}`, node(id, 'cath'), node(id, 'tap'), input.biasResistor);
    tap = node(id, 'tap');
  }
  c.resistor(`RK_${id}`, tap, '0', input.cathodeResistor);
  let ret = tap;
  if (input.bias.kind === 'dc-coupled') {
    ret = node(id, 'gret');
    c.fix(ret, input.bias.gridVoltage);
  }
  return {
    id,
    topology: input.topology,
    inputs: { grid: { node: node(id, 'grid'), ret, rg: input.gridResistor } },
    outputs: {
      plate: { node: node(id, 'plate'), probe: single(node(id, 'plate')) },
      cathode: { node: node(id, 'cath'), probe: single(node(id, 'cath')) },
    },
    main: 'plate',
    power: null,
    tubes: [`X_${id}`],
    cutoffIsLimit: true,
    ownLoad: input.load ?? null,
    loadOn: ['plate', 'cathode'],
    sourceResistance: input.sourceResistance,
  };
}

/** Fraction of the track below the wiper: linear, or the usual audio (log) law, about 10 % at half rotation. */
export function volumeFraction(v: VolumeControlInput): number {
  const s = Math.min(1, Math.max(0, v.setting));
  return v.taper === 'linear' ? s : (Math.pow(10, 2 * s) - 1) / 99;
}

/** Smallest resistance a track end is given (a wiper at an end still has contact resistance). */
const MIN_TRACK = 1;

function volumeControl(c: Circuit, id: string, v: VolumeControlInput): Ports {
  const a = volumeFraction(v);
  c.resistor(`RVU_${id}`, node(id, 'in'), node(id, 'out'), Math.max(v.resistance * (1 - a), MIN_TRACK));
  c.resistor(`RVL_${id}`, node(id, 'out'), '0', Math.max(v.resistance * a, MIN_TRACK));
  return passivePorts(id, v.topology);
}

function rcNetwork(c: Circuit, id: string, v: RcNetworkInput): Ports {
  let at = node(id, 'in');
  let k = 0;
  const branch = (from: string, to: string, b: RcNetworkInput['branches'][number], tag: string) => {
    if (b.resistance !== undefined && b.capacitance !== undefined) {
      if (b.arrangement === 'parallel') {
        c.resistor(`R${tag}`, from, to, b.resistance);
        c.capacitor(`C${tag}`, from, to, b.capacitance);
      } else {
        c.resistor(`R${tag}`, from, `${id}.m${tag}`, b.resistance);
        c.capacitor(`C${tag}`, `${id}.m${tag}`, to, b.capacitance);
      }
    } else if (b.resistance !== undefined) c.resistor(`R${tag}`, from, to, b.resistance);
    else c.capacitor(`C${tag}`, from, to, b.capacitance as number);
  };
  for (const b of v.branches) {
    k++;
    const tag = `N${k}_${id}`;
    if (b.position === 'series') {
      const next = node(id, `n${k}`);
      branch(at, next, b, tag);
      at = next;
    } else branch(at, '0', b, tag);
  }
  c.alias(node(id, 'out'), at);
  return passivePorts(id, v.topology);
}

function passivePorts(id: string, topology: string): Ports {
  return {
    id,
    topology,
    inputs: { in: { node: node(id, 'in'), ret: '0', rg: null } },
    outputs: { out: { node: node(id, 'out'), probe: single(node(id, 'out')) } },
    main: 'out',
    power: null,
    tubes: [],
    cutoffIsLimit: false,
    ownLoad: null,
    sourceResistance: 0,
  };
}

/**
 * Builders by topology. Splitters and other stage kinds register here (`registerStageBuilder`) with their input
 * and output names, so the chain solver needs no change for them.
 */
const builders: Record<string, StageBuilder> = {
  'common-cathode': plateAmplifier,
  'pentode-amplifier': plateAmplifier,
  'cathode-follower': cathodeFollower,
  'single-ended-output': singleEnded,
  'push-pull-output': pushPull,
  'long-tailed-pair': longTailedPair,
  'split-load': splitLoad,
  'volume-control': volumeControl,
  'rc-network': rcNetwork,
};

export function registerStageBuilder(topology: string, builder: StageBuilder): void {
  builders[topology] = builder;
}

export type BuiltChain = {
  circuit: Circuit;
  ports: Ports[];
  /** per element: how each input is fed (for the blocking note) */
  feeds: Record<string, Record<string, 'source' | 'capacitor' | 'direct'>>;
  links: ChainLink[];
  output: { id: string; name: string; probe: Probe };
  power: { probe: Probe; load: number } | null;
  /** the signal source node (unit amplitude) */
  source: string;
};

/** Links the caller left out: capacitor coupling from each element's main output to the next one's input(s). */
export function defaultLinks(elements: Array<{ id: string; topology: string }>, capacitance = 100e-9): ChainLink[] {
  const links: ChainLink[] = [];
  for (let i = 1; i < elements.length; i++) {
    const from = elements[i - 1]!;
    const to = elements[i]!;
    const coupling = { kind: 'capacitor' as const, capacitance };
    if (to.topology === 'push-pull-output') {
      const outs = SPLITTER_OUTPUTS[from.topology];
      if (outs) {
        links.push({ from: from.id, output: outs[0], to: to.id, input: 'grid1', coupling });
        links.push({ from: from.id, output: outs[1], to: to.id, input: 'grid2', coupling });
        continue;
      }
    }
    links.push({ from: from.id, to: to.id, coupling });
  }
  return links;
}

/** Output pairs of the phase splitters (in-phase first): a pair feeding a push-pull stage links both. */
export const SPLITTER_OUTPUTS: Record<string, [string, string]> = {
  'long-tailed-pair': ['non-inverting', 'inverting'],
  'split-load': ['cathode', 'plate'],
};

export function buildChain(chain: ChainInput): BuiltChain {
  const c = new Circuit();
  const ports: Ports[] = chain.stages.map((s: ChainElement) => {
    const build = builders[s.topology];
    if (!build) throw new CalcError('invalid-input', `Stage '${s.id}': the topology '${s.topology}' cannot be used in a chain yet.`);
    return build(c, s.id, s);
  });
  const byId = new Map(ports.map((p) => [p.id, p]));
  const links = chain.links ?? defaultLinks(chain.stages);
  const feeds: BuiltChain['feeds'] = {};
  const linkedOutputs = new Set<string>();
  const fed = new Set<string>();
  links.forEach((l, i) => {
    const from = byId.get(l.from);
    const to = byId.get(l.to);
    if (!from || !to) throw new CalcError('invalid-input', `Link ${i + 1} joins '${l.from}' to '${l.to}', but the chain has no element '${from ? l.to : l.from}'.`);
    const outName = l.output ?? from.main;
    const out = from.outputs[outName];
    if (!out) throw new CalcError('invalid-input', `Link ${i + 1}: '${l.from}' has no output '${outName}' (it has ${Object.keys(from.outputs).join(', ')}).`);
    const inName = l.input ?? Object.keys(to.inputs)[0]!;
    const inp = to.inputs[inName];
    if (!inp) throw new CalcError('invalid-input', `Link ${i + 1}: '${l.to}' has no input '${inName}' (it has ${Object.keys(to.inputs).join(', ')}).`);
    const key = `${l.to}/${inName}`;
    if (fed.has(key)) throw new CalcError('invalid-input', `Link ${i + 1}: input '${inName}' of '${l.to}' is already driven.`);
    fed.add(key);
    linkedOutputs.add(`${l.from}/${outName}`);
    (feeds[l.to] ??= {})[inName] = l.coupling.kind;
    if (l.coupling.kind === 'capacitor') {
      c.capacitor(`CC${i + 1}`, out.node, inp.node, l.coupling.capacitance);
      if (inp.rg !== null) c.resistor(`RG${i + 1}`, inp.node, inp.ret, inp.rg);
      else c.resistor(`RG${i + 1}`, inp.node, '0', 1e9); // a DC path for a passive input behind a capacitor
    } else {
      c.alias(inp.node, out.node);
    }
  });
  // the signal source drives the first element's unfed inputs (a push-pull pair first in the chain gets antiphase)
  const first = ports[0]!;
  const source = 'src';
  const unfed = Object.entries(first.inputs).filter(([name]) => !fed.has(`${first.id}/${name}`));
  if (unfed.length === 0) throw new CalcError('invalid-input', `The first element '${first.id}' has no free input for the signal.`);
  const retDc = (ret: string) => {
    if (ret === '0') return 0;
    const f = c.fixed.find((x) => c.find(x.node) === c.find(ret));
    return f ? f.dc : null;
  };
  unfed.forEach(([name, inp], k) => {
    const sign = k === 0 ? 1 : -1;
    const src = k === 0 ? source : `${source}${k + 1}`;
    (feeds[first.id] ??= {})[name] = 'source';
    const dc = retDc(inp.ret);
    const rs = first.sourceResistance;
    if (dc === null) {
      c.fix(src, 0, sign);
      c.resistor(`RS${k + 1}`, src, `${src}.c`, Math.max(rs, 1e-3));
      c.capacitor(`CIN${k + 1}`, `${src}.c`, inp.node, SOURCE_COUPLING);
    } else {
      c.fix(src, dc, sign);
      if (rs > 0) c.resistor(`RS${k + 1}`, src, inp.node, rs);
      else c.alias(inp.node, src);
    }
    if (inp.rg !== null && (rs > 0 || dc === null)) c.resistor(`RG_${first.id}_${name}`, inp.node, inp.ret, inp.rg);
  });
  for (const p of ports.slice(1)) {
    for (const name of Object.keys(p.inputs)) {
      if (!fed.has(`${p.id}/${name}`)) throw new CalcError('invalid-input', `Input '${name}' of '${p.id}' is not connected to anything.`);
    }
  }
  // own loads where nothing else is connected
  for (const p of ports) {
    if (!p.ownLoad) continue;
    (p.loadOn ?? [p.main]).forEach((name, k) => {
      if (linkedOutputs.has(`${p.id}/${name}`)) return;
      const o = p.outputs[name]!;
      c.capacitor(`CL${k}_${p.id}`, o.node, `${p.id}.load${k}`, p.ownLoad!.couplingCapacitor);
      c.resistor(`RL${k}_${p.id}`, `${p.id}.load${k}`, '0', p.ownLoad!.resistance);
    });
  }
  if (chain.feedback) applyFeedback(c, ports, chain.feedback);
  const last = ports[ports.length - 1]!;
  return {
    circuit: c,
    ports,
    feeds,
    links,
    output: { id: last.id, name: last.main, probe: last.outputs[last.main]!.probe },
    power: last.power,
    source,
  };
}

/** A passive network on its own: ideal source into its input, nothing on its output. */
export function buildPassiveAlone(p: { id: string } & PassiveInput): { circuit: Circuit; probe: Probe } {
  const c = new Circuit();
  const build = builders[p.topology]!;
  const ports = build(c, p.id, p);
  c.fix('src', 0, 1);
  c.alias(ports.inputs.in!.node, 'src');
  c.resistor('RLEAK', ports.outputs.out!.node, '0', 1e12);
  return { circuit: c, probe: ports.outputs.out!.probe };
}
