import { formatMaybe } from '@/lib/format/number';
import { FAMILY_LABELS, type TubeFamily } from '@/lib/validation/tube';

export function familyLabel(family: TubeFamily, sections: number): string {
  const name = FAMILY_LABELS[family];
  return sections > 1 ? `${sections === 2 ? 'Dual' : `${sections}×`} ${name.toLowerCase()}` : name;
}

export function heaterText(h: { voltage?: number; current?: number; directlyHeated?: boolean }): string {
  if (h.voltage === undefined && h.current === undefined) return '–';
  return `${formatMaybe(h.voltage, 'V')} ${formatMaybe(h.current, 'A')}${h.directlyHeated ? ' (filament)' : ''}`;
}

export const PARAMETER_LABELS: Record<string, { label: string; unit: string }> = {
  mu: { label: 'MU', unit: '' },
  ex: { label: 'EX', unit: '' },
  kg1: { label: 'KG1', unit: '' },
  kg2: { label: 'KG2', unit: '' },
  kp: { label: 'KP', unit: '' },
  kvb: { label: 'KVB', unit: '' },
  vct: { label: 'VCT', unit: 'V' },
  rgi: { label: 'RGI', unit: 'Ω' },
};

export function parameterText(key: string, value: number, kind: string): string {
  if (key === 'kvb') return `${Number(value.toPrecision(4))} ${kind === 'koren-pentode' ? 'V' : 'V²'}`;
  const meta = PARAMETER_LABELS[key];
  if (meta?.unit) return formatMaybe(value, meta.unit, 4);
  return String(Number(value.toPrecision(4)));
}

export function tubeQueryKey(id: number) {
  return ['tube', id] as const;
}
