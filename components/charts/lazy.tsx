'use client';

// The charts loaded on demand: the charting library travels in its own chunk, fetched when a chart is first
// shown, so pages stay light. A box of the chart's height holds the place meanwhile.
import dynamic from 'next/dynamic';

function ChartPlaceholder() {
  return <div aria-hidden className="h-[280px] w-full animate-pulse rounded border border-rule/50" />;
}

// next/dynamic wants its options written out as an object literal at every call.
export const PlateCurvesChart = dynamic(() => import('./plate-curves-chart').then((m) => m.PlateCurvesChart), { ssr: false, loading: ChartPlaceholder });
export const TransferChart = dynamic(() => import('./transfer-chart').then((m) => m.TransferChart), { ssr: false, loading: ChartPlaceholder });
export const ResponseChart = dynamic(() => import('./response-chart').then((m) => m.ResponseChart), { ssr: false, loading: ChartPlaceholder });
export const SpectrumChart = dynamic(() => import('./spectrum-chart').then((m) => m.SpectrumChart), { ssr: false, loading: ChartPlaceholder });
export const WaveformChart = dynamic(() => import('./waveform-chart').then((m) => m.WaveformChart), { ssr: false, loading: ChartPlaceholder });
export const LevelSweepChart = dynamic(() => import('./level-sweep-chart').then((m) => m.LevelSweepChart), { ssr: false, loading: ChartPlaceholder });
export const CompareChart = dynamic(() => import('./compare-chart').then((m) => m.CompareChart), { ssr: false, loading: ChartPlaceholder });
