import { describe, expect, it } from 'vitest';
import { niceTicks } from '@/components/charts/chart-parts';
import { curveSeriesFromPlot, gridLabel, plateAxisRange } from '@/components/charts/plate-curves-chart';
import { unwrapPhase } from '@/components/charts/response-chart';
import { spectrumFloor } from '@/components/charts/spectrum-chart';
import { plateCsv } from '@/components/stage-editor/plot-panel';
import { analyzeStage } from '@/lib/calc';
import { stageInputSchema } from '@/lib/validation/stage';

// Drawing helpers of the stage editor's charts: axes, labels, phase display and the CSV of what is plotted.
describe('chart drawing helpers', () => {
  it('puts ticks on round numbers that cover the data', () => {
    expect(niceTicks(0, 460, 6)).toEqual([0, 100, 200, 300, 400, 500]);
    expect(niceTicks(0, 3.4, 5)).toEqual([0, 0.5, 1, 1.5, 2, 2.5, 3, 3.5]);
    expect(niceTicks(-4.057, 0, 6)).toEqual([-4.5, -4, -3.5, -3, -2.5, -2, -1.5, -1, -0.5, 0]);
  });

  it('labels grid voltages the way they are written on a curve sheet', () => {
    expect(gridLabel(-1.5)).toBe('−1.5 V');
    expect(gridLabel(-0.5)).toBe('−0.5 V');
    expect(gridLabel(0)).toBe('0 V');
  });

  it('removes 360° jumps from the phase but keeps its shape', () => {
    expect(unwrapPhase([-170, -178, 178, 170])).toEqual([-170, -178, -182, -190]);
    expect(unwrapPhase([10, 20, 30])).toEqual([10, 20, 30]);
  });

  it('sets the spectrum floor below the smallest harmonic, in 20 dB steps', () => {
    expect(spectrumFloor([{ db: -24 }, { db: -43 }, { db: -73 }])).toBe(-100);
    expect(spectrumFloor([{ db: -300 }])).toBe(-140);
    expect(spectrumFloor([{ db: -20 }])).toBe(-60);
  });

  it('draws a real stage: bias curve flagged, axes cover the load line, CSV carries every series', () => {
    // Koren 12AX7 parameters as commonly published (reference/tube-models.md §2.1); 100k/1k5 at 300 V is common practice
    const input = stageInputSchema.parse({
      topology: 'common-cathode',
      tube: { model: 'koren-triode', mu: 100, ex: 1.4, kg1: 1060, kp: 600, kvb: 300, ratings: { plateDissipation: 1.2 } },
      supply: 300,
      gridResistor: '1M',
      plateResistor: '100k',
      bias: { kind: 'cathode', cathodeResistor: '1k5', cathodeBypass: '22u' },
      load: { resistance: '470k', couplingCapacitor: '22n' },
      drive: { amplitude: 1 },
    });
    const a = analyzeStage(input);
    const series = curveSeriesFromPlot(a.plot.curves);
    expect(series.filter((s) => s.emphasis)).toHaveLength(1);
    const range = plateAxisRange({ curves: series, dcLoadLine: a.plot.dcLoadLine, acLoadLine: a.plot.acLoadLine, operatingPoint: a.plot.operatingPoint });
    // the DC load line runs from B+ (300 V) to B+/(Ra+Rk) ≈ 2.96 mA: both ends must be on the plot
    expect(range.vaMax).toBeGreaterThanOrEqual(300);
    expect(range.iaMax).toBeGreaterThanOrEqual(300 / 101_500);
    const csv = plateCsv(a).text.split('\n');
    expect(csv[0]).toBe('series,grid_voltage_V,plate_voltage_V,plate_current_A');
    for (const name of ['bias curve', 'DC load line', 'AC load line', 'Pa(max)', 'operating point']) {
      expect(csv.some((line) => line.startsWith(`${name},`)), name).toBe(true);
    }
  });
});

// Push-pull output stages: the DC load line through the transformer primary's few hundred ohms would reach
// amperes and squash the plate curves; the current axis must follow the working region instead.
describe('push-pull plate curve axes', () => {
  it('scale to the working region, not to the near-vertical DC load line', async () => {
    const { readFileSync } = await import('node:fs');
    for (const f of ['pp-6l6-ab-fixed', 'pp-2a3-fixed', 'pp-el34-a-cathode']) {
      const raw = JSON.parse(readFileSync(`tests/fixtures/stages/${f}.json`, 'utf8'));
      const a = analyzeStage(stageInputSchema.parse(raw.input ?? raw));
      const series = curveSeriesFromPlot(a.plot.curves);
      const range = plateAxisRange({ curves: series, dcLoadLine: a.plot.dcLoadLine, acLoadLine: a.plot.acLoadLine, operatingPoint: a.plot.operatingPoint });
      const acPeak = Math.max(...(a.plot.acLoadLine ?? []).map((p) => p.ia));
      // 6L6GC, 2A3 and EL34 peak plate currents stay well under 1 A in push-pull service (datasheet operating
      // conditions list peak currents of a few hundred mA per tube; common practice)
      expect(range.iaMax, f).toBeLessThan(1);
      expect(range.iaMax, f).toBeGreaterThanOrEqual(acPeak);
      expect(range.iaMax, f).toBeGreaterThanOrEqual(2 * (a.plot.operatingPoint?.ia ?? 0));
    }
  });
});

describe('report plate plot axes', () => {
  it('push-pull: the current span follows the working region, the AC load line stays inside', async () => {
    const { readFileSync } = await import('node:fs');
    const { platePlotRange } = await import('@/lib/report/plot-range');
    for (const f of ['pp-6l6-ab-fixed', 'pp-2a3-fixed', 'pp-el34-a-cathode']) {
      const raw = JSON.parse(readFileSync(`tests/fixtures/stages/${f}.json`, 'utf8'));
      const a = analyzeStage(stageInputSchema.parse(raw.input ?? raw));
      const r = platePlotRange(a.plot);
      // peak plate currents of a few hundred mA per tube in push-pull service (datasheet operating conditions; common practice)
      expect(r.iaMax, f).toBeLessThan(1);
      expect(r.iaMax, f).toBeGreaterThanOrEqual(Math.max(...a.plot.acLoadLine.map((p) => p.ia)));
    }
  });
});

describe('report plate plot clipping', () => {
  it('cuts a steep DC load line at the top of the frame instead of dropping it', async () => {
    const { clipToFrame } = await import('@/lib/report/plot-range');
    // 450 V across a 200 Ω winding resistance: 2.25 A at 0 V, far above a 0.5 A frame (Ohm's law)
    const runs = clipToFrame([{ va: 450, ia: 0 }, { va: 0, ia: 2.25 }], 500, 0.5);
    expect(runs).toHaveLength(1);
    const [start, end] = runs[0] ?? [];
    expect(start).toEqual({ va: 450, ia: 0 });
    expect(end?.ia).toBeCloseTo(0.5, 9);
    expect(end?.va).toBeCloseTo(450 - 0.5 * 200, 9);
    // a line wholly outside leaves nothing to draw
    expect(clipToFrame([{ va: 10, ia: 1 }, { va: 20, ia: 2 }], 500, 0.5)).toEqual([]);
  });
});

describe('report axis ticks', () => {
  it('are round numbers from zero that stay inside the axis', async () => {
    const { axisTicks } = await import('@/lib/report/plot-range');
    expect(axisTicks(1050, 5)).toEqual([0, 500, 1000]);
    expect(axisTicks(468, 4)).toEqual([0, 200, 400]);
    expect(axisTicks(3.4, 5)).toEqual([0, 1, 2, 3]);
  });
});
