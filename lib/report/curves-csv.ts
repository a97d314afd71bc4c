// CSV of a plotted curve of a stored stage analysis (SI units, one header row, '.' decimal separator).
import type { StageAnalysis } from '@/lib/calc';

export type CurveKind = 'plate' | 'transfer' | 'response' | 'waveform';

const num = (x: number) => (Number.isFinite(x) ? String(Number(x.toPrecision(8))) : '');
const row = (cells: (string | number)[]) => cells.map((c) => (typeof c === 'number' ? num(c) : /[",\n]/.test(c) ? `"${c.replace(/"/g, '""')}"` : c)).join(',');

export function curvesCsv(analysis: StageAnalysis, kind: CurveKind): string {
  const lines: string[] = [];
  if (kind === 'plate') {
    const p = analysis.plot;
    lines.push(row(['series', 'grid_voltage_V', 'plate_voltage_V', 'plate_current_A']));
    for (const c of p.curves) for (const pt of c.points) lines.push(row([c.bias ? 'curve (bias)' : 'curve', c.gridVoltage, pt.va, pt.ia]));
    for (const pt of p.dcLoadLine) lines.push(row(['dc load line', '', pt.va, pt.ia]));
    for (const pt of p.acLoadLine) lines.push(row(['ac load line', '', pt.va, pt.ia]));
    for (const pt of p.paMax) lines.push(row(['Pa(max)', '', pt.va, pt.ia]));
    lines.push(row(['operating point', analysis.operatingPoint.gridCathodeVoltage, p.operatingPoint.va, p.operatingPoint.ia]));
  } else if (kind === 'transfer') {
    lines.push(row(['grid_voltage_V', 'plate_current_A']));
    for (const pt of analysis.plot.transfer) lines.push(row([pt.vg, pt.ia]));
  } else if (kind === 'response') {
    lines.push(row(['frequency_Hz', 'magnitude_dB', 'phase_deg']));
    for (const pt of analysis.smallSignal.response) lines.push(row([pt.frequency, pt.magnitudeDb, pt.phaseDeg]));
  } else {
    const w = analysis.largeSignal.waveform;
    lines.push(row(['time_s', 'input_V', 'output_V']));
    w.t.forEach((t, i) => lines.push(row([t, w.input[i] ?? NaN, w.output[i] ?? NaN])));
  }
  return `${lines.join('\n')}\n`;
}
