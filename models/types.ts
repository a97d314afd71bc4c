// Shapes of the JSONB columns. SI units throughout (V, A, W, Ω, F).

export type Sourced<T> = { value: T; source: string };

export type TubeHeater = { voltage?: number; current?: number; directlyHeated?: boolean; source?: string };

export type TubeRatingsRecord = Partial<
  Record<
    | 'plateVoltage'
    | 'plateDissipation'
    | 'screenVoltage'
    | 'screenDissipation'
    | 'cathodeCurrent'
    | 'heaterCathodeVoltage'
    | 'gridResistanceFixedBias'
    | 'gridResistanceCathodeBias',
    Sourced<number>
  >
>;

export type TubeCapacitancesRecord = { cgk?: number; cga?: number; cak?: number; source?: string };

export type TypicalPoint = {
  label: string;
  plateVoltage: number;
  gridVoltage: number;
  plateCurrent: number;
  screenVoltage?: number;
  screenCurrent?: number;
  mu?: number;
  ra?: number;
  gm?: number;
  source: string;
};

export type SupplyNodeRecord = { key: string; name: string; droppingResistor: number; filterCapacitor: number };
export type ProjectSupplyRecord = {
  rawVoltage?: number;
  sourceResistance?: number;
  nodes?: SupplyNodeRecord[];
  heaters?: { key: string; name: string; voltage: number }[];
};

/** projects.supply_circuit: the supply as a circuit, in SI units (shape: lib/validation/supply.ts) */
export type ProjectSupplyCircuitRecord = import('../lib/validation/supply').SupplyCircuitBody;

export type MailAttachmentRecord = { filename: string; contentType: string; contentBase64: string };
