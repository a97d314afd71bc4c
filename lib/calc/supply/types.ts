// Input and result shapes of the supply solver (mains winding → rectifier → reservoir → sections → nodes).
// All quantities in SI units: V, A, Ω, F, H, Hz; `variation` and `derating` are fractions.

export type RectifierKind = 'silicon-bridge' | 'silicon-centre-tap' | 'vacuum';

export type SupplyCapacitor = {
  capacitance: number;
  /** rated DC working voltage; checked against the turn-on peak */
  voltageRating?: number;
  /** node key used by stages (defaults to n0, n1, …) */
  key?: string;
  name?: string;
};

export type SupplySection =
  | { kind: 'resistor'; resistance: number; powerRating?: number }
  | { kind: 'choke'; inductance: number; resistance: number; currentRating?: number }
  | ({ kind: 'capacitor' } & SupplyCapacitor);

export type SupplyLoad = {
  /** node index: 0 is the reservoir (or, with a choke input, the first capacitor) */
  node: number;
  /** current drawn at idle, A */
  current?: number;
  /** current drawn at full drive, A (defaults to the idle current) */
  fullDriveCurrent?: number;
  /** a resistive load, e.g. a bleeder, Ω (draws current also before the tubes conduct) */
  resistance?: number;
  label?: string;
};

export type SupplyCircuit = {
  mains: {
    /** nominal mains voltage, V rms (only used to refer the primary resistance) */
    voltage: number;
    frequency: 50 | 60;
    /** ± fraction of the nominal mains, 0.1 by default (common practice) */
    variation?: number;
  };
  secondary: {
    /** V rms at nominal mains: the whole winding for a bridge, each half for a centre-tapped winding */
    voltage: number;
    /** DC resistance of the winding the rectifier current flows through (each half for a centre tap), Ω */
    resistance: number;
    /** primary winding resistance, Ω on the primary side (referred with the turns ratio squared) */
    primaryResistance?: number;
    /** rated rms current of the winding (each half for a centre tap), A */
    currentRating?: number;
  };
  rectifier: {
    kind: RectifierKind;
    /** library type: a silicon diode (1N4007, …) or a vacuum rectifier (5Y3GT, 5AR4, …) */
    type?: string;
  };
  /** the capacitor right after the rectifier; null or absent: choke input (the first section must be a choke) */
  reservoir?: SupplyCapacitor | null;
  sections: SupplySection[];
  loads: SupplyLoad[];
};

export type SupplyOptions = {
  /** time steps per half mains cycle (the rectified period) */
  stepsPerHalfCycle?: number;
  /** fraction of a rating above which the status is 'near' (0.8 by default) */
  derating?: number;
  /** mains cycles in the waveform returned for plotting */
  waveformCycles?: number;
  /** skip the turn-on transient and the mains-range solutions (chain iterations) */
  steadyStateOnly?: boolean;
  /** solve only the idle case (chain iterations) */
  idleOnly?: boolean;
};

export type SupplyRatingStatus = 'ok' | 'near' | 'over' | 'not-checked';

export type SupplyRatingCheck = {
  key: string;
  label: string;
  value: number;
  limit: number | null;
  unit: string;
  percent: number | null;
  status: SupplyRatingStatus;
  caution: string | null;
};

export type SupplyOperatingResult = {
  dc: number;
  ripplePeakToPeak: number;
  rippleRms: number;
  /** rms of the component at twice the mains frequency */
  ripple2fRms: number;
  min: number;
  max: number;
};

export type SupplyNodeResult = {
  index: number;
  key: string;
  name: string;
  capacitance: number;
  voltageRating: number | null;
  /** current drawn at this node (loads + bleeders), idle and full drive, A */
  loadCurrent: number;
  fullDriveLoadCurrent: number;
  /** at idle */
  dc: number;
  ripplePeakToPeak: number;
  rippleRms: number;
  ripple2fRms: number;
  fullDrive: SupplyOperatingResult;
  /** sag: idle DC minus full-drive DC */
  sag: number;
  /** DC at idle at low and high mains (nominal ∓ variation) */
  dcLowMains: number | null;
  dcHighMains: number | null;
  /** highest voltage this capacitor sees at switch-on before the tubes conduct (high mains) */
  unloadedPeak: number | null;
};

export type SupplyChokeResult = {
  section: number;
  inductance: number;
  resistance: number;
  /** DC current through it at full drive */
  current: number;
  /** resonance with the capacitor after it */
  resonance: number;
  /** choke input only: the smallest inductance that keeps the current continuous at idle (common practice R/(3ω)) */
  criticalInductance: number | null;
};

export type SupplyWaveform = { t: number[]; reservoir: number[]; last: number[]; rectifierCurrent: number[] };

export type RectifierSummary = {
  kind: RectifierKind;
  type: string;
  label: string;
  /** total rectifier output current at full drive: peak and average, A */
  peakCurrent: number;
  averageCurrent: number;
  /** peak rectifier current at idle and at full drive */
  idlePeakCurrent: number;
  fullDrivePeakCurrent: number;
  /** per diode (silicon) or per plate (vacuum): each conducts every other half cycle */
  perDevicePeakCurrent: number;
  perDeviceAverageCurrent: number;
  /** reverse voltage each diode or plate sees, at high mains */
  peakInverseVoltage: number;
  /** worst rectifier current at switch-on (discharged capacitors, switched at the mains peak, high mains) */
  turnOnPeakCurrent: number | null;
  heater: { voltage: number; current: number } | null;
  /** drop law used: silicon diode (IS, N, RS at 27 °C) or vacuum I = k·V^p */
  law: { kind: 'diode'; is: number; n: number; rs: number; series: number } | { kind: 'vacuum'; k: number; p: number };
  sources: string[];
};

export type SupplyResult = {
  mainsFrequency: number;
  rippleFrequency: number;
  /** peak of the secondary (or of each half) at nominal mains */
  secondaryPeak: number;
  /** source resistance per conducting path: winding + referred primary, Ω */
  sourceResistance: number;
  capacitorInput: boolean;
  nodes: SupplyNodeResult[];
  chokes: SupplyChokeResult[];
  rectifier: RectifierSummary;
  /** convenience copies for the standalone API */
  rectifierPeakCurrent: number;
  unloadedPeak: number | null;
  /** rms current in the first capacitor at full drive */
  reservoirRippleCurrent: number;
  /** rms current of the secondary (each half for a centre tap) at full drive */
  secondaryRmsCurrent: number;
  totalCurrent: number;
  fullDriveTotalCurrent: number;
  ratings: SupplyRatingCheck[];
  /** reservoir and last node over a few mains cycles at full drive (and idle) */
  waveform: { idle: SupplyWaveform; fullDrive: SupplyWaveform };
  cautions: string[];
  warnings: string[];
  /** Newton iterations on the cycle, idle and full drive */
  iterations: { idle: number; fullDrive: number };
};
