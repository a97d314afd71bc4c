import type { BenchComparison, PlateCurrentMethod } from '@/lib/calc/bench';
import { formatEng } from '@/lib/format/number';

export const fmt = (v: number | null | undefined, unit: string, digits = 3) => (typeof v === 'number' && Number.isFinite(v) ? formatEng(v, unit, digits) : '—');

export function fmtDeviation(d: number | null) {
  if (d === null) return '—';
  const p = d * 100;
  return `${p > 0 ? '+' : p < 0 ? '−' : ''}${Math.abs(p).toFixed(Math.abs(p) < 10 ? 1 : 0)} %`;
}

export const fmtTolerance = (c: Pick<BenchComparison, 'tolerance'>) => `±${Math.round(c.tolerance * 1000) / 10} %`;

export const ROUTE_WORDS: Record<PlateCurrentMethod, string> = {
  measured: 'the plate current you measured',
  cathode: 'the cathode voltage and the cathode resistor (Ik = Vk / Rk)',
  'plate-resistor': 'the drop across the plate resistor ((B+ − Vplate) / Ra)',
  'primary-resistance': 'the drop across the transformer primary ((B+ − Vplate) / Rdc)',
};
