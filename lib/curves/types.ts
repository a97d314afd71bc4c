/** One measured operating point. Voltages in V, currents in A. */
export type CurvePoint = {
  gridVoltage: number;
  plateVoltage: number;
  plateCurrent: number;
  screenVoltage?: number;
  screenCurrent?: number;
};

export type CurrentUnit = 'mA' | 'A';

export type CurveKind = 'triode' | 'pentode';

export type CurveColumnKey = 'gridVoltage' | 'plateVoltage' | 'plateCurrent' | 'screenVoltage' | 'screenCurrent';

/** Canonical key → the header cell exactly as written in the file. */
export type CurveCsvColumns = {
  gridVoltage: string;
  plateVoltage: string;
  plateCurrent: string;
  screenVoltage?: string;
  screenCurrent?: string;
};

/** `line` is 1-based as shown in a text editor; `column` is the header as written (or the canonical name when missing). */
export type CurveCsvError = { line: number | null; column: string | null; message: string };

export type CsvDelimiter = ',' | ';' | '\t';

export type ParseCurveCsvSuccess = {
  ok: true;
  points: CurvePoint[];
  columns: CurveCsvColumns;
  kind: CurveKind;
  delimiter: CsvDelimiter;
  /** Non-fatal remarks, e.g. an optional column that was empty throughout and ignored. */
  warnings: string[];
};

export type ParseCurveCsvFailure = { ok: false; errors: CurveCsvError[] };

export type ParseCurveCsvResult = ParseCurveCsvSuccess | ParseCurveCsvFailure;

export type ParseCurveCsvOptions = { currentUnit: CurrentUnit };
