// The plotted views a stage's CSV can be downloaded for (kept apart from the writer so that schemas and forms can
// import the list without the CSV library).
export const CURVE_KINDS = ['plate', 'transfer', 'waveform', 'spectrum', 'response'] as const;
export type CurveKind = (typeof CURVE_KINDS)[number];
