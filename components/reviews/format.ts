import { formatEng } from '@/lib/format/number';

export function fmtValue(v: unknown, unit: string): string {
  if (v === null || v === undefined) return '—';
  if (typeof v === 'number') {
    if (!Number.isFinite(v)) return '—';
    if (unit === '%') return `${v.toFixed(2)} %`;
    if (unit === '') return Math.abs(v) >= 1000 || (Math.abs(v) < 0.01 && v !== 0) ? formatEng(v, '') : String(Number(v.toPrecision(4)));
    return formatEng(v, unit, 4);
  }
  if (typeof v === 'boolean') return v ? 'yes' : 'no';
  return String(v);
}

export const STATE_WORDS = { submitted: 'waiting for a decision', approved: 'approved', 'changes-requested': 'changes requested' } as const;
