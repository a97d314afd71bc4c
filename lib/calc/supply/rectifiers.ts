// A small library of rectifiers. Each value carries its source; "from memory" marks a value recalled without a
// source at hand (to be confirmed against the maker's sheet before it is relied on).
//
// Vacuum rectifiers are described by their voltage drop at a stated plate current: the plate law is taken as the
// space-charge (Child–Langmuir) law I = k·V^p with p = 3/2, so k = I / V^p from that one datasheet point. The
// same law is used by the ngspice comparison (a behavioural current source), so both solve the same circuit.
import { CalcError } from '../errors';

export type SiliconDiode = {
  type: string;
  label: string;
  /** SPICE diode parameters at 27 °C: saturation current, emission coefficient, ohmic resistance */
  is: number;
  n: number;
  rs: number;
  /** repetitive peak reverse voltage, average forward current, non-repetitive surge current */
  maxReverseVoltage: number;
  maxAverageCurrent: number;
  maxSurgeCurrent: number;
  sources: string[];
};

export type VacuumRectifier = {
  type: string;
  label: string;
  /** datasheet drop point: `dropVoltage` at `dropCurrent` per plate */
  dropVoltage: number;
  dropCurrent: number;
  exponent: number;
  heater: { voltage: number; current: number };
  maxPeakInverseVoltage: number;
  /** per plate */
  maxPeakCurrent: number;
  /** DC output current of the tube (both plates) */
  maxDcCurrent: number;
  /** largest capacitor directly after the rectifier, capacitor input */
  maxReservoir: number;
  sources: string[];
};

export const SILICON_DIODES: SiliconDiode[] = [
  {
    type: '1N4007',
    label: '1N4007 (1 A, 1000 V)',
    is: 7.03e-9,
    n: 1.81,
    rs: 0.034,
    maxReverseVoltage: 1000,
    maxAverageCurrent: 1,
    maxSurgeCurrent: 30,
    sources: ['1N400x series datasheets: VRRM 1000 V, IF(AV) 1 A, IFSM 30 A (from memory)', 'SPICE parameters IS 7.03 nA, N 1.81, RS 34 mΩ: a widely circulated vendor model (from memory)'],
  },
  {
    type: '1N5408',
    label: '1N5408 (3 A, 1000 V)',
    is: 2e-8,
    n: 1.8,
    rs: 0.015,
    maxReverseVoltage: 1000,
    maxAverageCurrent: 3,
    maxSurgeCurrent: 200,
    sources: ['1N540x series datasheets: VRRM 1000 V, IF(AV) 3 A, IFSM 200 A (from memory)', 'SPICE parameters IS 20 nA, N 1.8, RS 15 mΩ (from memory, generic 3 A rectifier)'],
  },
];

export const VACUUM_RECTIFIERS: VacuumRectifier[] = [
  {
    type: '5Y3GT',
    label: '5Y3GT (directly heated, 125 mA)',
    dropVoltage: 60,
    dropCurrent: 0.125,
    exponent: 1.5,
    heater: { voltage: 5, current: 2 },
    maxPeakInverseVoltage: 1400,
    maxPeakCurrent: 0.44,
    maxDcCurrent: 0.125,
    maxReservoir: 20e-6,
    sources: [
      'Drop ≈ 60 V at 125 mA and largest input capacitor 20 µF: summary of the RCA 5Y3GT sheet in a public tube database (the sheet itself gives curves, not a single drop figure)',
      'Heater 5 V 2 A, PIV 1400 V, peak plate current 440 mA, DC output 125 mA (from memory)',
    ],
  },
  {
    type: '5AR4',
    label: '5AR4 / GZ34 (indirectly heated, 250 mA)',
    dropVoltage: 17,
    dropCurrent: 0.25,
    exponent: 1.5,
    heater: { voltage: 5, current: 1.9 },
    maxPeakInverseVoltage: 1500,
    maxPeakCurrent: 0.75,
    maxDcCurrent: 0.25,
    maxReservoir: 60e-6,
    sources: ['Drop 17 V at 250 mA, heater 5 V 1.9 A, PIV 1500 V, peak 750 mA per plate, DC 250 mA, largest input capacitor 60 µF (from memory)'],
  },
  {
    type: '5U4GB',
    label: '5U4GB (directly heated, 275 mA)',
    dropVoltage: 50,
    dropCurrent: 0.275,
    exponent: 1.5,
    heater: { voltage: 5, current: 3 },
    maxPeakInverseVoltage: 1550,
    maxPeakCurrent: 1.0,
    maxDcCurrent: 0.275,
    maxReservoir: 40e-6,
    sources: [
      'Heater 5 V 3 A, peak plate current 1 A, largest input capacitor 40 µF: magazine review of the 5U4 citing the General Electric sheet',
      'Drop 50 V at 275 mA, PIV 1550 V, DC output 275 mA (from memory; the 5U4G/5Z3 sheet gives 58 V at 225 mA per plate)',
    ],
  },
  {
    type: '6X4',
    label: '6X4 / EZ90 (noval-size, 90 mA)',
    dropVoltage: 22,
    dropCurrent: 0.07,
    exponent: 1.5,
    heater: { voltage: 6.3, current: 0.6 },
    maxPeakInverseVoltage: 1250,
    maxPeakCurrent: 0.245,
    maxDcCurrent: 0.09,
    maxReservoir: 10e-6,
    sources: ['Drop 22 V at 70 mA, heater 6.3 V 0.6 A, PIV 1250 V, peak 245 mA per plate, DC 90 mA, largest input capacitor 10 µF (from memory)'],
  },
  {
    type: 'EZ80',
    label: 'EZ80 / 6V4 (noval, 90 mA)',
    dropVoltage: 25,
    dropCurrent: 0.09,
    exponent: 1.5,
    heater: { voltage: 6.3, current: 0.6 },
    maxPeakInverseVoltage: 1000,
    maxPeakCurrent: 0.27,
    maxDcCurrent: 0.09,
    maxReservoir: 50e-6,
    sources: ['Drop 25 V at 90 mA, heater 6.3 V 0.6 A, PIV 1000 V, peak 270 mA per anode, DC 90 mA, largest input capacitor 50 µF (from memory)'],
  },
  {
    type: 'EZ81',
    label: 'EZ81 / 6CA4 (noval, 150 mA)',
    dropVoltage: 20,
    dropCurrent: 0.15,
    exponent: 1.5,
    heater: { voltage: 6.3, current: 1 },
    maxPeakInverseVoltage: 1300,
    maxPeakCurrent: 0.5,
    maxDcCurrent: 0.15,
    maxReservoir: 50e-6,
    sources: ['Heater 6.3 V 1 A: repair forum thread quoting the 6CA4 rating', 'Drop 20 V at 150 mA, PIV 1300 V, peak 500 mA per anode, DC 150 mA, largest input capacitor 50 µF (from memory)'],
  },
];

export const DEFAULT_SILICON = '1N4007';

export function siliconDiode(type: string | undefined): SiliconDiode {
  const key = (type ?? DEFAULT_SILICON).trim().toUpperCase();
  const d = SILICON_DIODES.find((x) => x.type.toUpperCase() === key);
  if (!d) throw new CalcError('invalid-input', `Unknown silicon diode '${type}'. Choose one of ${SILICON_DIODES.map((x) => x.type).join(', ')}.`);
  return d;
}

const ALIASES: Record<string, string> = { GZ34: '5AR4', EZ90: '6X4', '6V4': 'EZ80', '6CA4': 'EZ81', '5Y3': '5Y3GT', '5U4': '5U4GB', '5U4G': '5U4GB' };

export function vacuumRectifier(type: string | undefined): VacuumRectifier {
  if (!type) throw new CalcError('invalid-input', `Choose a vacuum rectifier type: ${VACUUM_RECTIFIERS.map((x) => x.type).join(', ')}.`);
  let key = type.trim().toUpperCase();
  key = ALIASES[key] ?? key;
  const r = VACUUM_RECTIFIERS.find((x) => x.type.toUpperCase() === key);
  if (!r) throw new CalcError('invalid-input', `Unknown vacuum rectifier '${type}'. Choose one of ${VACUUM_RECTIFIERS.map((x) => x.type).join(', ')}.`);
  return r;
}

/** k of I = k·V^p through the datasheet drop point. */
export function vacuumPerveance(r: VacuumRectifier): number {
  return r.dropCurrent / Math.pow(r.dropVoltage, r.exponent);
}

/** Thermal voltage kT/q at 27 °C, the temperature ngspice assumes by default. */
export const THERMAL_VOLTAGE_27C = (1.380649e-23 * 300.15) / 1.602176634e-19;
