// CSV of every plotted view of a stage analysis: written the same way by the stage editor's download buttons and
// by GET /api/stages/{id}/curves, so the same plot has the same columns wherever it is downloaded from.
import type { StageAnalysis } from '@/lib/calc';
import { writeCsv } from '@/lib/format/csv';

import type { CurveKind } from './curve-kinds';

export { CURVE_KINDS, type CurveKind } from './curve-kinds';

/** File-name part for each kind (`{stage}-{name}.csv`). */
export const CURVE_FILE_NAMES: Record<CurveKind, string> = { plate: 'plate-curves', transfer: 'transfer', waveform: 'waveform', spectrum: 'harmonics', response: 'response' };

export function curvesCsv(a: StageAnalysis, kind: CurveKind): string {
  switch (kind) {
    case 'plate': {
      const p = a.plot;
      const rows: (string | number)[][] = [];
      for (const c of p.curves) for (const pt of c.points) rows.push([c.bias ? 'bias curve' : 'plate curve', c.gridVoltage, pt.va, pt.ia]);
      for (const pt of p.dcLoadLine) rows.push(['DC load line', '', pt.va, pt.ia]);
      for (const pt of p.acLoadLine) rows.push(['AC load line', '', pt.va, pt.ia]);
      for (const pt of p.paMax) rows.push(['Pa(max)', '', pt.va, pt.ia]);
      rows.push(['operating point', a.operatingPoint.gridCathodeVoltage, p.operatingPoint.va, p.operatingPoint.ia]);
      return writeCsv(['series', 'gridVoltage', 'plateVoltage', 'plateCurrent'], rows);
    }
    case 'transfer':
      return writeCsv(['gridVoltage', 'plateCurrent'], a.plot.transfer.map((pt) => [pt.vg, pt.ia]));
    case 'waveform': {
      const w = a.largeSignal.waveform;
      return writeCsv(['time', 'inputVoltage', 'outputVoltage'], w.t.map((t, i) => [t, w.input[i], w.output[i]]));
    }
    case 'spectrum':
      return writeCsv(['harmonicOrder', 'amplitude', 'levelReFundamental'], a.largeSignal.harmonics.map((h) => [h.order, h.amplitude, h.db]));
    case 'response':
      return writeCsv(['frequency', 'magnitude', 'phase'], a.smallSignal.response.map((pt) => [pt.frequency, pt.magnitudeDb, pt.phaseDeg]));
  }
}
