import type { Tube } from './input';
import { tubeModel, type TubeModel } from './models/registry';
import type { CurvePoint, PlateCurve, TransferPoint } from './types';

function linspace(a: number, b: number, n: number): number[] {
  const out: number[] = [];
  for (let k = 0; k < n; k++) out.push(a + ((b - a) * k) / (n - 1));
  return out;
}

function niceStep(span: number, count: number): number {
  const raw = span / count;
  const p = 10 ** Math.floor(Math.log10(raw));
  const m = raw / p;
  return (m < 1.5 ? 1 : m < 3.5 ? 2 : m < 7.5 ? 5 : 10) * p;
}

export type CurveFamilyOptions = {
  vaMax: number;
  gridVoltages?: number[];
  /** drawn as the flagged curve and included in the automatic range */
  biasGridVoltage?: number;
  /** screen-to-cathode voltage for pentodes */
  screenVoltage?: number;
  points?: number;
};

function modelOf(tube: Tube | TubeModel): TubeModel {
  return 'plateCurrent' in tube ? tube : tubeModel(tube);
}

function autoGridVoltages(model: TubeModel, vaMax: number, vg2: number, bias?: number): number[] {
  let vgCut = -1;
  // most negative grid voltage still giving 1 % of the zero-bias current at vaMax
  const i0 = model.plateCurrent(vaMax, 0, vg2);
  while (vgCut > -1000 && model.plateCurrent(vaMax, vgCut, vg2) > 0.01 * i0) vgCut *= 1.25;
  const low = Math.min(vgCut, bias !== undefined ? 2 * bias : 0);
  const step = niceStep(-low, 8);
  const out: number[] = [];
  for (let v = 0; v >= low - 1e-9; v -= step) out.push(Number(v.toPrecision(6)));
  return out;
}

/** Plate-current family Ia(Va) for a set of grid voltages (automatic when not given). */
export function plateCurveFamily(tube: Tube | TubeModel, opts: CurveFamilyOptions): PlateCurve[] {
  const model = modelOf(tube);
  const vg2 = opts.screenVoltage ?? 0;
  const n = opts.points ?? 41;
  const grids = [...(opts.gridVoltages ?? autoGridVoltages(model, opts.vaMax, vg2, opts.biasGridVoltage))];
  const curves: PlateCurve[] = grids.map((vg) => ({
    gridVoltage: vg,
    bias: false,
    points: linspace(0, opts.vaMax, n).map((va) => ({ va, ia: model.plateCurrent(va, vg, vg2) })),
  }));
  if (opts.biasGridVoltage !== undefined) {
    const vg = opts.biasGridVoltage;
    curves.push({ gridVoltage: vg, bias: true, points: linspace(0, opts.vaMax, n).map((va) => ({ va, ia: model.plateCurrent(va, vg, vg2) })) });
    curves.sort((a, b) => b.gridVoltage - a.gridVoltage);
  }
  return curves;
}

export type TransferOptions = { plateVoltage: number; screenVoltage?: number; vgMin: number; vgMax?: number; points?: number };

/** Transfer characteristic Ia(Vg) at a fixed plate (and screen) voltage. */
export function transferCurve(tube: Tube | TubeModel, opts: TransferOptions): TransferPoint[] {
  const model = modelOf(tube);
  return linspace(opts.vgMin, opts.vgMax ?? 0, opts.points ?? 41).map((vg) => ({
    vg,
    ia: model.plateCurrent(opts.plateVoltage, vg, opts.screenVoltage ?? 0),
  }));
}

/** The maximum-dissipation hyperbola Ia = Pa/Va from Va = vaMax/20 to vaMax. */
export function paMaxCurve(pa: number, vaMax: number, points = 41): CurvePoint[] {
  if (!(pa > 0) || !(vaMax > 0)) return [];
  return linspace(vaMax / 20, vaMax, points).map((va) => ({ va, ia: pa / va }));
}

/** Straight load line through (va0, ia0) with slope −1/r, clipped to the first quadrant. */
export function loadLine(va0: number, ia0: number, r: number, points = 21): CurvePoint[] {
  if (!(r > 0)) return [{ va: va0, ia: 0 }, { va: va0, ia: 2 * ia0 }];
  const vaEnd = va0 + ia0 * r;
  const iaEnd = ia0 + va0 / r;
  return linspace(0, 1, points).map((t) => ({ va: vaEnd * (1 - t), ia: iaEnd * t }));
}
