// Amplifiers with global feedback for the ngspice checks and the benchmark (invented workshop values; tube
// parameters are the published Koren fits used elsewhere in the suite).
import { chainInputSchema, type ChainInputRaw } from '@/lib/calc/chain/input';

const ax7 = { model: 'koren-triode', name: '12AX7 (Koren 1996)', mu: 100, ex: 1.4, kg1: 1060, kp: 600, kvb: 300, capacitances: { cgk: '2.3p', cga: '2.4p', cak: '0.9p' } } as const;
const au7 = { model: 'koren-triode', name: '12AU7 (Koren 1996)', mu: 21.5, ex: 1.3, kg1: 1180, kp: 84, kvb: 300, capacitances: { cgk: '2.3p', cga: '2.2p', cak: '1p' } } as const;
const el34 = { model: 'koren-pentode', name: 'EL34 (Koren 1996)', mu: 11, ex: 1.35, kg1: 650, kg2: 4200, kp: 60, kvb: 24, capacitances: { cgk: '15p', cga: '1p', cak: '8p' } } as const;
const l6 = { model: 'koren-pentode', name: '6L6GC (Koren 1996)', mu: 8.7, ex: 1.35, kg1: 1460, kg2: 4500, kp: 48, kvb: 12, capacitances: { cgk: '14p', cga: '0.85p', cak: '12p' } } as const;
const b300 = { model: 'koren-triode', name: '300B (Koren 1996)', mu: 3.95, ex: 1.4, kg1: 1550, kp: 65, kvb: 300, rgi: 1000, capacitances: { cgk: '17p', cga: '11p', cak: '7.5p' } } as const;

type Fb = { resistor: number; shuntResistor: number; capacitor?: number | null; dominantPole?: { stage: string; capacitance: number } | null };

/** 12AX7 → EL34 single-ended (pentode), transformer 3k:8. */
export function seAmp(fb: Fb, amplitude = 0.2): ChainInputRaw {
  return {
    input: { amplitude, frequency: 1000 },
    stages: [
      { id: 'v1', topology: 'common-cathode', tube: ax7, supply: 300, gridResistor: '1M', plateResistor: '100k', bias: { kind: 'cathode', cathodeResistor: '1k5', cathodeBypass: '22u' } },
      { id: 'v2', topology: 'single-ended-output', tube: el34, supply: 300, gridResistor: '220k', primaryImpedance: '3k', primaryResistance: 120, bias: { kind: 'fixed', fixedBias: -16 }, screen: { kind: 'fixed', supply: 250 },
        transformer: { speakerLoad: 8, secondaryResistance: 0.3, primaryInductance: 10, leakageInductance: '8m', windingCapacitance: '500p' } },
    ],
    links: [{ from: 'v1', to: 'v2', coupling: { kind: 'capacitor', capacitance: '47n' } }],
    feedback: { from: 'v2', to: 'v1', capacitor: null, ...fb },
  };
}

/** 12AU7 → 300B single-ended (triode), transformer 3k5:8. */
export function seTriodeAmp(fb: Fb, amplitude = 1.5): ChainInputRaw {
  return {
    input: { amplitude, frequency: 1000 },
    stages: [
      { id: 'v1', topology: 'common-cathode', tube: au7, supply: 330, gridResistor: '470k', plateResistor: '33k', bias: { kind: 'cathode', cathodeResistor: '1k', cathodeBypass: '47u' } },
      { id: 'v2', topology: 'single-ended-output', tube: b300, supply: 360, gridResistor: '100k', primaryImpedance: '3k5', primaryResistance: 110, bias: { kind: 'fixed', fixedBias: -72 },
        transformer: { speakerLoad: 8, secondaryResistance: 0.25, primaryInductance: 12, leakageInductance: '6m', windingCapacitance: '300p' } },
    ],
    links: [{ from: 'v1', to: 'v2', coupling: { kind: 'capacitor', capacitance: '100n' } }],
    feedback: { from: 'v2', to: 'v1', capacitor: null, ...fb },
  };
}

/** 12AX7 → 12AU7 long-tailed pair → 6L6GC push-pull, transformer 6k6:8 (three stages and the loop). */
export function ppAmp(fb: Fb, amplitude = 0.3): ChainInputRaw {
  return {
    input: { amplitude, frequency: 1000 },
    stages: [
      { id: 'v1', topology: 'common-cathode', tube: ax7, supply: 300, gridResistor: '1M', plateResistor: '100k', bias: { kind: 'cathode', cathodeResistor: '1k5', cathodeBypass: '22u' } },
      { id: 'v2', topology: 'long-tailed-pair', tube: au7, supply: 400, gridResistor: '1M', plateResistors: { inverting: '82k', nonInverting: '100k' },
        tail: { kind: 'resistor', biasResistor: '820', tailResistor: '22k', tailSupply: 0 }, grids: { kind: 'bias-tap' }, secondGridBypass: '100n' },
      { id: 'v3', topology: 'push-pull-output', tube: l6, class: 'AB', supply: 430, gridResistor: '220k', plateToPlateImpedance: '6k6', primaryResistance: 180, bias: { kind: 'fixed', fixedBias: -38 }, screen: { kind: 'fixed', supply: 400 },
        transformer: { speakerLoad: 8, secondaryResistance: 0.25, primaryInductance: 40, leakageInductance: '15m', windingCapacitance: '800p' } },
    ],
    links: [
      { from: 'v1', to: 'v2', input: 'grid', coupling: { kind: 'capacitor', capacitance: '47n' } },
      { from: 'v2', output: 'non-inverting', to: 'v3', input: 'grid1', coupling: { kind: 'capacitor', capacitance: '100n' } },
      { from: 'v2', output: 'inverting', to: 'v3', input: 'grid2', coupling: { kind: 'capacitor', capacitance: '100n' } },
    ],
    feedback: { from: 'v3', to: 'v1', capacitor: null, ...fb },
  };
}

export const parseChain = (raw: ChainInputRaw) => chainInputSchema.parse(raw);
