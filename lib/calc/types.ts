import type { ResponsePoint } from './response';
import type { TransformerAnalysis } from './transformer';

export type { ResponsePoint };
export type { TransformerAnalysis };

export type OperatingPoint = {
  /** plate to ground, V */
  plateVoltage: number;
  plateCathodeVoltage: number;
  plateCurrent: number;
  gridCathodeVoltage: number;
  /** grid to ground, V */
  gridVoltage: number;
  cathodeVoltage: number;
  cathodeCurrent: number;
  /** screen to ground, V (pentodes) */
  screenVoltage: number | null;
  screenCurrent: number | null;
  plateDissipation: number;
  screenDissipation: number | null;
};

export type SmallSignal = {
  gm: number;
  ra: number;
  mu: number;
  gain: number;
  gainDb: number;
  outputImpedance: number;
  inputCapacitance: number;
  lowCutoff: number | null;
  highCutoff: number | null;
  response: ResponsePoint[];
};

export type Harmonic = { order: number; amplitude: number; db: number };

export type HeadroomLimit = 'grid-conduction' | 'cutoff' | 'plate-saturation' | 'none';

export type LargeSignal = {
  /** grid drive used, V peak */
  drive: number;
  outputAmplitude: number;
  harmonics: Harmonic[];
  thdPercent: number;
  thd3PointPercent: number;
  thd5PointPercent: number;
  /** change of the average plate current under drive (A; both tubes for push-pull) */
  dcShift: number;
  outputPower: number | null;
  headroom: { maxDrive: number; limitedBy: HeadroomLimit; outputSwing: number };
  waveform: { t: number[]; input: number[]; output: number[] };
};

export type RatingKey =
  | 'plate-voltage'
  | 'plate-dissipation'
  | 'plate-dissipation-full-drive'
  | 'screen-voltage'
  | 'screen-dissipation'
  | 'cathode-current'
  | 'heater-cathode-voltage'
  | 'grid-resistance';

export type RatingCheck = {
  key: RatingKey;
  label: string;
  value: number;
  limit: number | null;
  unit: string;
  percent: number | null;
  status: 'ok' | 'near' | 'over' | 'not-checked';
  caution: string | null;
};

export type CurvePoint = { va: number; ia: number };
export type PlateCurve = { gridVoltage: number; bias: boolean; points: CurvePoint[] };
export type TransferPoint = { vg: number; ia: number };

export type StagePlot = {
  dcLoadLine: CurvePoint[];
  acLoadLine: CurvePoint[];
  operatingPoint: CurvePoint;
  paMax: CurvePoint[];
  curves: PlateCurve[];
  transfer: TransferPoint[];
  /** screen-to-cathode voltage the pentode curves are drawn at */
  screenVoltage: number | null;
};

export type StageAnalysis = {
  topology: string;
  operatingPoint: OperatingPoint;
  /** push-pull: both tubes (identical at idle) */
  perTube: OperatingPoint[];
  smallSignal: SmallSignal;
  largeSignal: LargeSignal;
  ratings: RatingCheck[];
  plot: StagePlot;
  warnings: string[];
  /** output stages with a transformer entered beyond the ideal one */
  transformer?: TransformerAnalysis;
};
