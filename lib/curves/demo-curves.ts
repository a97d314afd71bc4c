import type { KorenTriodeParams } from '@/lib/calc/models/koren';
import { range, synthesizeTriodeCurves } from './synthetic';

/** Koren 1996 published 12AX7 set (factor-2 convention), the source of the invented demo curves. */
export const DEMO_12AX7_PARAMS: KorenTriodeParams = { mu: 100, ex: 1.4, kg1: 1060, kp: 600, kvb: 300 };

export const DEMO_CURVES_SEED = 20240612;
export const DEMO_CURVES_NOISE = 0.015;

/**
 * Invented "measured" curve set for a 12AX7-class triode: Koren model plus 1.5 % seeded Gaussian noise.
 * Demo data, not a measurement of any real tube.
 */
export function makeDemoCurvesCsv(): string {
  const points = synthesizeTriodeCurves({
    params: DEMO_12AX7_PARAMS,
    gridVoltages: range(-4, 0, 0.5).reverse(),
    plateVoltages: range(0, 400, 10),
    noise: { relative: DEMO_CURVES_NOISE, seed: DEMO_CURVES_SEED },
  });
  const lines = ['grid_voltage,plate_voltage,plate_current_ma'];
  for (const p of points) {
    lines.push(`${p.gridVoltage.toFixed(1)},${p.plateVoltage.toFixed(0)},${(p.plateCurrent * 1e3).toFixed(5)}`);
  }
  return `${lines.join('\n')}\n`;
}
