// CSV files: one writer (papaparse's unparse) and one rule for column names, so that the same quantity is the same
// column in every file Anodyne writes, whichever screen or route writes it.
import Papa from 'papaparse';
import { fileNumber } from './number';

/**
 * The quantities that appear as CSV columns, with the name each column gets: the quantity in snake_case words,
 * then its SI unit after an underscore (`plate_voltage_V`). Quantities without a unit have no suffix.
 */
export const CSV_QUANTITIES = {
  series: { words: 'series', unit: '' },
  gridVoltage: { words: 'grid_voltage', unit: 'V' },
  plateVoltage: { words: 'plate_voltage', unit: 'V' },
  plateCurrent: { words: 'plate_current', unit: 'A' },
  time: { words: 'time', unit: 's' },
  inputVoltage: { words: 'input', unit: 'V' },
  outputVoltage: { words: 'output', unit: 'V' },
  harmonicOrder: { words: 'harmonic_order', unit: '' },
  amplitude: { words: 'amplitude', unit: 'V' },
  levelReFundamental: { words: 'level_re_fundamental', unit: 'dB' },
  frequency: { words: 'frequency', unit: 'Hz' },
  magnitude: { words: 'magnitude', unit: 'dB' },
  phase: { words: 'phase', unit: 'deg' },
} as const;
export type CsvQuantity = keyof typeof CSV_QUANTITIES;

/** The column name of a quantity under the one naming rule. */
export function csvColumn(q: CsvQuantity): string {
  const { words, unit } = CSV_QUANTITIES[q];
  return unit ? `${words}_${unit}` : words;
}

export type CsvCell = string | number | null | undefined;

/**
 * Writes a CSV text: a header of column names, numbers at FILE_DIGITS significant figures with '.' as decimal
 * separator, empty cells for missing or non-finite values, CRLF-free ('\n') lines and a final newline.
 */
export function writeCsv(columns: CsvQuantity[], rows: CsvCell[][]): string {
  const data = rows.map((r) => r.map((c) => (typeof c === 'number' ? fileNumber(c) : (c ?? ''))));
  return `${Papa.unparse({ fields: columns.map(csvColumn), data }, { newline: '\n' })}\n`;
}
