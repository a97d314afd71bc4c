// Output stages with a real transformer, as chain circuit elements: the equivalent circuit of transformer.ts
// built from R, L, C and an ideal transformer, so the speaker is a node of the circuit (feedback can be taken
// from it). Used by the chain builders when an output stage carries a `transformer` entry.
import type { OutputTransformer, StageInput } from '../input';
import type { Circuit, Probe } from '../chain/circuit';
import type { Ports } from '../chain/network';
import { turnsRatio } from '../transformer';

/** Magnetising inductance standing in for an empty value (its bass corner is far below 1 Hz at audio impedances). */
export const UNMODELLED_PRIMARY_INDUCTANCE = 1e4;

const node = (id: string, n: string) => `${id}.${n}`;

type SE = Extract<StageInput, { topology: 'single-ended-output' }>;
type PP = Extract<StageInput, { topology: 'push-pull-output' }>;

/** Secondary side from the ideal transformer's secondary node `sx`: leakage (referred), Rsec, the speaker load. */
function secondary(c: Circuit, id: string, x: OutputTransformer, n: number): string {
  const sx = node(id, 'sx');
  const spk = node(id, 'speaker');
  let at = sx;
  if (x.leakageInductance) {
    c.inductor(`LL_${id}`, at, node(id, 'sl'), x.leakageInductance / (n * n));
    at = node(id, 'sl');
  }
  if (x.secondaryResistance && x.secondaryResistance > 0) c.resistor(`RSEC_${id}`, at, spk, x.secondaryResistance);
  else c.alias(spk, at);
  c.resistor(`RSPK_${id}`, spk, '0', x.speakerLoad);
  return spk;
}

/**
 * Single-ended: B+ ─ Rdc ─ np ─[Lp ∥ ideal primary]─ plate, Cw from plate to B+ (signal ground); the ideal
 * transformer's secondary feeds the leakage, the secondary resistance and the speaker. The speaker is in phase
 * with the plate (ratio n = √(Zp/RL)); a negative ratio is the reversed secondary.
 */
export function singleEndedWithTransformer(
  c: Circuit,
  id: string,
  input: SE,
  parts: { bias: (c: Circuit, id: string) => { cathode: string; ret: string }; screen: () => string | null },
): Ports {
  const x = input.transformer!;
  const n = turnsRatio({ primaryImpedance: input.primaryImpedance, speakerLoad: x.speakerLoad });
  c.fix(node(id, 'bplus'), input.supply);
  if (input.primaryResistance > 0) c.resistor(`RDC_${id}`, node(id, 'bplus'), node(id, 'np'), input.primaryResistance);
  else c.alias(node(id, 'np'), node(id, 'bplus'));
  c.inductor(`LP_${id}`, node(id, 'np'), node(id, 'plate'), x.primaryInductance ?? UNMODELLED_PRIMARY_INDUCTANCE);
  c.idealTransformer(`XF_${id}`, node(id, 'plate'), node(id, 'np'), node(id, 'sx'), '0', n);
  if (x.windingCapacitance) c.capacitor(`CW_${id}`, node(id, 'plate'), node(id, 'bplus'), x.windingCapacitance);
  const spk = secondary(c, id, x, n);
  const b = parts.bias(c, id);
  const g2 = parts.screen();
  c.addTube(`X_${id}`, id, input.tube, node(id, 'plate'), node(id, 'grid'), b.cathode, g2);
  const speaker: Probe = [[spk, 1]];
  return {
    id,
    topology: input.topology,
    inputs: { grid: { node: node(id, 'grid'), ret: b.ret, rg: input.gridResistor } },
    outputs: { speaker: { node: spk, probe: speaker }, plate: { node: node(id, 'plate'), probe: [[node(id, 'plate'), 1]] } },
    main: 'speaker',
    power: { probe: speaker, load: x.speakerLoad },
    tubes: [`X_${id}`],
    cutoffIsLimit: true,
    ownLoad: null,
    sourceResistance: input.sourceResistance,
  };
}

/**
 * Push-pull: each half-primary is an ideal transformer of ratio n/2 onto the same secondary node (equal volts per
 * turn, ampere-turns balanced: a centre-tapped winding). The magnetising inductance sits on the secondary
 * (Lp/n², the same branch referred), Cw across the whole primary. The speaker is in phase with plate 1.
 */
export function pushPullWithTransformer(
  c: Circuit,
  id: string,
  input: PP,
  parts: { bias: (c: Circuit, id: string) => { cathode: string; ret: string }; screen: () => string | null },
): Ports {
  const x = input.transformer!;
  const n = turnsRatio({ primaryImpedance: input.plateToPlateImpedance, speakerLoad: x.speakerLoad });
  c.fix(node(id, 'bplus'), input.supply);
  const half = input.primaryResistance / 2;
  for (const k of ['1', '2']) {
    if (half > 0) c.resistor(`RH${k}_${id}`, node(id, 'bplus'), node(id, `n${k}`), half);
    else c.alias(node(id, `n${k}`), node(id, 'bplus'));
  }
  c.idealTransformer(`XF1_${id}`, node(id, 'plate1'), node(id, 'n1'), node(id, 'sx'), '0', n / 2);
  c.idealTransformer(`XF2_${id}`, node(id, 'n2'), node(id, 'plate2'), node(id, 'sx'), '0', n / 2);
  c.inductor(`LP_${id}`, node(id, 'sx'), '0', (x.primaryInductance ?? UNMODELLED_PRIMARY_INDUCTANCE) / (n * n));
  if (x.windingCapacitance) c.capacitor(`CW_${id}`, node(id, 'plate1'), node(id, 'plate2'), x.windingCapacitance);
  const spk = secondary(c, id, x, n);
  const b = parts.bias(c, id);
  const g2 = parts.screen();
  c.addTube(`X1_${id}`, id, input.tube, node(id, 'plate1'), node(id, 'grid1'), b.cathode, g2);
  c.addTube(`X2_${id}`, id, input.tube, node(id, 'plate2'), node(id, 'grid2'), b.cathode, g2);
  const speaker: Probe = [[spk, 1]];
  return {
    id,
    topology: input.topology,
    inputs: {
      grid1: { node: node(id, 'grid1'), ret: b.ret, rg: input.gridResistor },
      grid2: { node: node(id, 'grid2'), ret: b.ret, rg: input.gridResistor },
    },
    outputs: {
      speaker: { node: spk, probe: speaker },
      'plate-to-plate': { node: node(id, 'plate1'), probe: [[node(id, 'plate1'), 1], [node(id, 'plate2'), -1]] },
    },
    main: 'speaker',
    power: { probe: speaker, load: x.speakerLoad },
    tubes: [`X1_${id}`, `X2_${id}`],
    cutoffIsLimit: input.class === 'A',
    ownLoad: null,
    sourceResistance: input.sourceResistance,
  };
}
