import { formatEng, formatRatio } from '@/lib/format/number';

/** A metric value on screen: percent shares as percent, ratios plain, the rest in engineering notation. */
export function formatMetric(v: number | null | undefined, unit: string, digits = 3): string {
  if (typeof v !== 'number' || !Number.isFinite(v)) return '–';
  if (unit === '%') return `${formatRatio(v, digits)} %`;
  if (unit === '') return formatRatio(v, digits);
  return formatEng(v, unit, digits).replace(/^-/, '−');
}

export const percent = (share: number, digits = 1) => `${(100 * share).toFixed(digits)} %`;

export const PART_WORDS: Record<string, string> = {
  plateResistor: 'Plate resistor',
  cathodeResistor: 'Cathode resistor',
  'bias.cathodeResistor': 'Cathode resistor',
  'bias.biasResistor': 'Bias resistor',
  'bias.cathodeBypass': 'Cathode bypass capacitor',
  'screen.resistor': 'Screen resistor',
  'screen.bypass': 'Screen bypass capacitor',
  'load.resistance': 'Load (next grid leak)',
  'load.couplingCapacitor': 'Coupling capacitor',
  gridResistor: 'Grid resistor',
  biasResistor: 'Bias resistor',
  'plateResistors.inverting': 'Plate resistor (inverting side)',
  'plateResistors.nonInverting': 'Plate resistor (non-inverting side)',
  'tail.biasResistor': 'Tail bias resistor',
  'tail.tailResistor': 'Tail resistor',
  'secondGridBypass': 'Second grid bypass capacitor',
};

export const METRIC_WORDS: Record<string, { label: string; unit: string }> = {
  plateCurrent: { label: 'Plate current', unit: 'A' },
  plateCathodeVoltage: { label: 'Plate to cathode', unit: 'V' },
  plateVoltage: { label: 'Plate to ground', unit: 'V' },
  cathodeVoltage: { label: 'Cathode to ground', unit: 'V' },
  gridCathodeVoltage: { label: 'Grid to cathode', unit: 'V' },
  screenCurrent: { label: 'Screen current', unit: 'A' },
  plateDissipationShare: { label: 'Plate dissipation, % of rating', unit: '%' },
  screenDissipationShare: { label: 'Screen dissipation, % of rating', unit: '%' },
  gain: { label: 'Gain (magnitude)', unit: '' },
  headroom: { label: 'Headroom (grid drive)', unit: 'V' },
  thd: { label: 'THD', unit: '%' },
  outputPower: { label: 'Output power', unit: 'W' },
  splitterBalance: { label: 'Splitter balance (output ratio)', unit: 'dB' },
};
