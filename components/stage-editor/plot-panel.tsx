'use client';

// The big plate-curve plot and, below it, the other views switched by a segmented control. Drawing only:
// every series comes from the engine's result.
import { useState } from 'react';
import { PlateCurvesChart, ResponseChart, SpectrumChart, TransferChart, WaveformChart } from '@/components/charts/lazy';
import { curveSeriesFromPlot } from '@/components/charts/series';
import { Button } from '@/components/ui/button';
import type { StageAnalysis } from '@/lib/calc';
import { formatEng } from '@/lib/format/number';
import { CURVE_FILE_NAMES, curvesCsv, type CurveKind } from '@/lib/report/curves-csv';
import { Segmented, tabPanelProps } from './segmented';

export type SecondaryView = 'transfer' | 'waveform' | 'spectrum' | 'response';
const VIEWS: { value: SecondaryView; label: string }[] = [
  { value: 'transfer', label: 'Transfer' },
  { value: 'waveform', label: 'Waveform' },
  { value: 'spectrum', label: 'Spectrum' },
  { value: 'response', label: 'Response' },
];

type Csv = { name: string; text: string };

// The same writer as GET /api/stages/{id}/curves: same columns, same figures.
const csvOf = (a: StageAnalysis, kind: CurveKind): Csv => ({ name: CURVE_FILE_NAMES[kind], text: curvesCsv(a, kind) });
export const plateCsv = (a: StageAnalysis): Csv => csvOf(a, 'plate');
export const secondaryCsv = (a: StageAnalysis, view: SecondaryView): Csv => csvOf(a, view);

function download(csv: Csv, stem: string) {
  const url = URL.createObjectURL(new Blob([csv.text], { type: 'text/csv;charset=utf-8' }));
  const a = document.createElement('a');
  a.href = url;
  a.download = `${stem}-${csv.name}.csv`;
  document.body.appendChild(a);
  a.click();
  a.remove();
  setTimeout(() => URL.revokeObjectURL(url), 1000);
}

export function PlotPanel({ analysis, stale, fileStem }: { analysis: StageAnalysis; stale: boolean; fileStem: string }) {
  const [view, setView] = useState<SecondaryView>('transfer');
  const op = analysis.operatingPoint;
  const ls = analysis.largeSignal;
  return (
    <div className="space-y-4">
      <div>
        <div className="mb-1 flex flex-wrap items-baseline justify-between gap-2">
          <p className="text-xs text-muted" data-testid="op-readout">
            Operating point{' '}
            <span className="num text-ink">
              Va {formatEng(op.plateCathodeVoltage, 'V')} · Ia {formatEng(op.plateCurrent, 'A')} · Vg {formatEng(op.gridCathodeVoltage, 'V')}
            </span>
            {analysis.plot.screenVoltage !== null ? <span className="num"> · curves at Vg2 {formatEng(analysis.plot.screenVoltage, 'V')}</span> : null}
          </p>
          <Button type="button" variant="ghost" size="sm" onClick={() => download(plateCsv(analysis), fileStem)}>
            Download CSV
          </Button>
        </div>
        <PlateCurvesChart
          curves={curveSeriesFromPlot(analysis.plot.curves)}
          paMax={analysis.plot.paMax}
          dcLoadLine={analysis.plot.dcLoadLine}
          acLoadLine={analysis.plot.acLoadLine}
          operatingPoint={analysis.plot.operatingPoint}
          height={440}
          stale={stale}
        />
      </div>
      <div className="border-t border-rule pt-3">
        <div className="mb-2 flex flex-wrap items-center justify-between gap-2">
          <Segmented label="Other views" value={view} options={VIEWS} onChange={setView} idBase="stage-views" />
          <Button type="button" variant="ghost" size="sm" onClick={() => download(secondaryCsv(analysis, view), fileStem)}>
            Download CSV
          </Button>
        </div>
        <div {...tabPanelProps('stage-views', view)} className="focus-visible:outline-2 focus-visible:outline-heater">
        {view === 'transfer' ? (
          <TransferChart points={analysis.plot.transfer} biasPoint={{ vg: op.gridCathodeVoltage, ia: op.plateCurrent }} plateVoltage={op.plateCathodeVoltage} stale={stale} />
        ) : view === 'waveform' ? (
          ls.drive > 0 ? <WaveformChart t={ls.waveform.t} input={ls.waveform.input} output={ls.waveform.output} stale={stale} /> : <NoDrive />
        ) : view === 'spectrum' ? (
          ls.drive > 0 ? <SpectrumChart harmonics={ls.harmonics} stale={stale} /> : <NoDrive />
        ) : (
          <ResponseChart points={analysis.smallSignal.response} lowCutoff={analysis.smallSignal.lowCutoff} highCutoff={analysis.smallSignal.highCutoff} stale={stale} />
        )}
        </div>
      </div>
    </div>
  );
}

function NoDrive() {
  return <p className="flex h-[280px] items-center justify-center rounded-md border border-dashed border-rule text-sm text-muted">Set a drive amplitude above 0 V to see this view.</p>;
}
