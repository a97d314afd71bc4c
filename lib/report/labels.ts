// Words and units for stage inputs and topologies, shared by the project screens and the PDF report.
import { formatEng } from '@/lib/format/number';

export const TOPOLOGY_LABELS: Record<string, string> = {
  'common-cathode': 'Common cathode',
  'cathode-follower': 'Cathode follower',
  'pentode-amplifier': 'Pentode amplifier',
  'single-ended-output': 'Single-ended output',
  'push-pull-output': 'Push-pull output',
  'long-tailed-pair': 'Long-tailed pair',
  'split-load': 'Split-load splitter',
};

const FIELDS: Record<string, { label: string; unit: string }> = {
  supply: { label: 'Supply (B+)', unit: 'V' },
  gridResistor: { label: 'Grid resistor', unit: 'Ω' },
  sourceResistance: { label: 'Source resistance', unit: 'Ω' },
  heaterElevation: { label: 'Heater elevation', unit: 'V' },
  derating: { label: 'Derating (near above)', unit: '' },
  plateResistor: { label: 'Plate resistor', unit: 'Ω' },
  cathodeResistor: { label: 'Cathode resistor', unit: 'Ω' },
  cathodeBypass: { label: 'Cathode bypass', unit: 'F' },
  fixedBias: { label: 'Fixed bias', unit: 'V' },
  gridVoltage: { label: 'Grid voltage', unit: 'V' },
  biasResistor: { label: 'Bias resistor', unit: 'Ω' },
  resistor: { label: 'Screen resistor', unit: 'Ω' },
  bypass: { label: 'Screen bypass', unit: 'F' },
  resistance: { label: 'Load resistance', unit: 'Ω' },
  couplingCapacitor: { label: 'Coupling capacitor', unit: 'F' },
  primaryImpedance: { label: 'Primary impedance', unit: 'Ω' },
  plateToPlateImpedance: { label: 'Plate-to-plate impedance', unit: 'Ω' },
  primaryResistance: { label: 'Primary DC resistance', unit: 'Ω' },
  amplitude: { label: 'Drive amplitude (peak)', unit: 'V' },
  frequency: { label: 'Drive frequency', unit: 'Hz' },
  class: { label: 'Class', unit: '' },
  kind: { label: 'Kind', unit: '' },
  inverting: { label: 'Plate resistor, inverting', unit: 'Ω' },
  nonInverting: { label: 'Plate resistor, non-inverting', unit: 'Ω' },
  tailResistor: { label: 'Tail resistor', unit: 'Ω' },
  tailSupply: { label: 'Tail return voltage', unit: 'V' },
  current: { label: 'Tail current', unit: 'A' },
  secondGridBypass: { label: 'Grid 2 bypass', unit: 'F' },
};
const GROUP: Record<string, string> = { bias: 'Bias', screen: 'Screen', load: 'Load', drive: 'Drive', tail: 'Tail', grids: 'Grids' };

export type InputRow = { path: string; label: string; value: string };

/** The stage body as label/value rows in engineering notation (tubeId and topology left out). */
export function inputRows(inputs: Record<string, unknown>): InputRow[] {
  const rows: InputRow[] = [];
  const walk = (obj: Record<string, unknown>, prefix: string) => {
    for (const [k, v] of Object.entries(obj)) {
      if (!prefix && (k === 'tubeId' || k === 'topology')) continue;
      const path = prefix ? `${prefix}.${k}` : k;
      if (v && typeof v === 'object' && !Array.isArray(v)) {
        walk(v as Record<string, unknown>, path);
        continue;
      }
      const f = FIELDS[k] ?? { label: k, unit: '' };
      const group = prefix ? GROUP[prefix.split('.')[0]!] : undefined;
      const label = group && k === 'kind' ? `${group} kind` : f.label;
      const value = v === null ? 'none' : k === 'derating' && typeof v === 'number' ? `${Math.round(v * 100)} % of rating` : typeof v === 'number' ? formatEng(v, f.unit, 4) : String(v);
      rows.push({ path, label, value });
    }
  };
  walk(inputs, '');
  return rows;
}

export const LIMIT_WORDS: Record<string, string> = {
  'grid-conduction': 'grid conduction',
  cutoff: 'cutoff',
  'plate-saturation': 'plate saturation',
  none: 'no limit found',
};
