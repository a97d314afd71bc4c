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
  headroom: {
    maxDrive: number;
    limitedBy: HeadroomLimit;
    outputSwing: number;
    /** phase splitters: the output (or tube) that reaches the limit first, and why, in plain words */
    side?: string;
    explanation?: string;
  };
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

/** Names a chain link can take a signal from. */
export type OutputName = 'plate' | 'cathode' | 'inverting' | 'non-inverting';

/** One output of a stage (phase splitters have two; single-output stages report their one). */
export type StageOutput = {
  /** large-signal fundamental at the drive, V peak (0 without drive) */
  amplitude: number;
  /** phase relative to the grid drive at the drive frequency (linearised network), degrees */
  phaseDeg: number;
  thdPercent: number;
  /** midband gain from the driven grid (sign = phase) */
  gain: number;
  outputImpedance: number;
  /** DC voltage of the output node at idle (before any coupling capacitor), V */
  dcVoltage: number;
  /** response from the source EMF to this output */
  response: ResponsePoint[];
  /** AC part of this output over one cycle (same instants as largeSignal.waveform.t) */
  waveform: number[];
};

/** Amplitude ratio (second output over first, dB) and deviation from antiphase (degrees) at the drive frequency. */
export type Balance = { ratioDb: number; phaseErrorDeg: number; frequency: number };

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
  /** phase splitters: each output by name (first the inverting / plate output) */
  outputs?: Partial<Record<OutputName, StageOutput>>;
  balance?: Balance;
  /** phase splitters: tail current (long-tailed pair) or cathode current, A */
  tailCurrent?: number;
  /** output stages with a transformer entered beyond the ideal one */
  transformer?: TransformerAnalysis;
};
