import type { CurveColumnKey } from './types';

export const CANONICAL_COLUMN_NAMES: Record<CurveColumnKey, string> = {
  gridVoltage: 'grid_voltage',
  plateVoltage: 'plate_voltage',
  plateCurrent: 'plate_current',
  screenVoltage: 'screen_voltage',
  screenCurrent: 'screen_current',
};

export const REQUIRED_COLUMNS: readonly CurveColumnKey[] = ['gridVoltage', 'plateVoltage', 'plateCurrent'];

export const COLUMN_QUANTITY: Record<CurveColumnKey, 'voltage' | 'current'> = {
  gridVoltage: 'voltage',
  plateVoltage: 'voltage',
  plateCurrent: 'current',
  screenVoltage: 'voltage',
  screenCurrent: 'current',
};

// Compared with underscores removed, so "grid_voltage", "grid voltage", "Grid-Voltage" and "gridvoltage" all match.
const ALIASES: Record<CurveColumnKey, readonly string[]> = {
  gridVoltage: ['gridvoltage', 'grid1voltage', 'g1voltage', 'controlgridvoltage', 'vg', 'vg1', 'ug', 'ug1', 'vgk', 'vg1k', 'eg', 'eg1', 'ec', 'ec1'],
  plateVoltage: ['platevoltage', 'anodevoltage', 'va', 'ua', 'vp', 'vak', 'vpk', 'ea', 'eb', 'ep'],
  plateCurrent: ['platecurrent', 'anodecurrent', 'ia', 'ip', 'ib'],
  screenVoltage: ['screenvoltage', 'grid2voltage', 'g2voltage', 'screengridvoltage', 'vg2', 'vg2k', 'ug2', 'vs', 'eg2', 'ec2'],
  screenCurrent: ['screencurrent', 'grid2current', 'g2current', 'screengridcurrent', 'ig2', 'is', 'ic2'],
};

const ALIAS_LOOKUP = new Map<string, CurveColumnKey>();
for (const key of Object.keys(ALIASES) as CurveColumnKey[]) {
  for (const alias of ALIASES[key]) ALIAS_LOOKUP.set(alias, key);
}

export type HeaderUnit = 'V' | 'mA' | 'A' | { unsupported: string };

export type RecognisedHeader =
  | { recognised: true; key: CurveColumnKey; unit: HeaderUnit | null }
  | { recognised: false };

function normaliseUnit(raw: string): HeaderUnit {
  const u = raw.trim().replace(/µ|μ/g, 'u').toLowerCase();
  if (u === 'v' || u === 'volt' || u === 'volts') return 'V';
  if (u === 'ma' || u === 'milliamp' || u === 'milliamps') return 'mA';
  if (u === 'a' || u === 'amp' || u === 'amps' || u === 'ampere' || u === 'amperes') return 'A';
  return { unsupported: raw.trim() };
}

const SUFFIX_UNIT = /_(v|ma|a|ua|µa|μa|mv|kv)$/;

/**
 * Recognises a header cell: "plate_current_ma", "Ia (mA)", "Va [V]", "Vg1", "Plate-Voltage", "ig2_mA" ...
 * A unit may be written in brackets or as a trailing "_unit" word.
 */
export function recogniseHeader(raw: string): RecognisedHeader {
  let text = raw.replace(/^\uFEFF/, '').trim();
  let unitText: string | null = null;
  const bracket = /[([]\s*([^)\]]*?)\s*[)\]]/.exec(text);
  if (bracket) {
    unitText = bracket[1] ?? '';
    text = (text.slice(0, bracket.index) + text.slice(bracket.index + bracket[0].length)).trim();
  }
  const name = text
    .toLowerCase()
    .replace(/[\s\-./,:]+/g, '_')
    .replace(/^_+|_+$/g, '');

  const direct = ALIAS_LOOKUP.get(name.replace(/_/g, ''));
  if (direct) return { recognised: true, key: direct, unit: unitText === null ? null : normaliseUnit(unitText) };
  const suffix = SUFFIX_UNIT.exec(name);
  if (suffix && unitText === null) {
    const key = ALIAS_LOOKUP.get(name.slice(0, suffix.index).replace(/_/g, ''));
    if (key) return { recognised: true, key, unit: normaliseUnit(suffix[1] ?? '') };
  }
  return { recognised: false };
}
