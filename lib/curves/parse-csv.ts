import Papa from 'papaparse';
import {
  CANONICAL_COLUMN_NAMES,
  COLUMN_QUANTITY,
  REQUIRED_COLUMNS,
  recogniseHeader,
  type HeaderUnit,
} from './columns';
import type {
  CsvDelimiter,
  CurveColumnKey,
  CurveCsvColumns,
  CurveCsvError,
  CurvePoint,
  ParseCurveCsvOptions,
  ParseCurveCsvResult,
} from './types';

export type {
  CurvePoint,
  CurveCsvColumns,
  CurveCsvError,
  ParseCurveCsvResult,
  ParseCurveCsvOptions,
} from './types';

export const MAX_REPORTED_ERRORS = 20;
export const MIN_CURVE_POINTS = 20;

const EXPECTED_COLUMNS_TEXT =
  'Expected grid_voltage, plate_voltage, plate_current and optionally screen_voltage, screen_current';

type RawRow = { fields: string[]; line: number; parseError: string | null };

class ErrorCollector {
  // Keeps a bounded sample so a 5 MB file of garbage cannot build a huge array; the total is still counted.
  private readonly kept: CurveCsvError[] = [];
  total = 0;
  add(line: number | null, column: string | null, message: string): void {
    this.total++;
    if (this.kept.length < 5000) this.kept.push({ line, column, message });
  }
  get any(): boolean {
    return this.total > 0;
  }
  result(): CurveCsvError[] {
    const sorted = [...this.kept].sort((a, b) => (a.line ?? 0) - (b.line ?? 0));
    const shown = sorted.slice(0, MAX_REPORTED_ERRORS);
    const hidden = this.total - shown.length;
    if (hidden > 0) {
      shown.push({ line: null, column: null, message: `… and ${hidden} more error${hidden === 1 ? '' : 's'} not shown.` });
    }
    return shown;
  }
}

function detectDelimiter(firstLine: string): CsvDelimiter {
  const counts: Record<CsvDelimiter, number> = { ',': 0, ';': 0, '\t': 0 };
  let quoted = false;
  for (const ch of firstLine) {
    if (ch === '"') quoted = !quoted;
    else if (!quoted && (ch === ',' || ch === ';' || ch === '\t')) counts[ch]++;
  }
  // Ties go to the comma: a header has no decimal commas, so any semicolon or tab there is deliberate.
  if (counts[';'] > counts[','] && counts[';'] >= counts['\t']) return ';';
  if (counts['\t'] > counts[','] && counts['\t'] > counts[';']) return '\t';
  return ',';
}

/** Splits into rows with Papa Parse while keeping the 1-based line on which each row starts. */
function readRows(body: string, delimiter: CsvDelimiter): RawRow[] {
  const rows: RawRow[] = [];
  let prevCursor = 0;
  let scanned = 0;
  let line = 1;
  Papa.parse<string[]>(body, {
    delimiter,
    header: false,
    skipEmptyLines: false,
    dynamicTyping: false,
    step: (results) => {
      for (; scanned < prevCursor; scanned++) {
        const ch = body.charCodeAt(scanned);
        if (ch === 10 || (ch === 13 && body.charCodeAt(scanned + 1) !== 10)) line++;
      }
      const err = results.errors[0];
      rows.push({
        fields: results.data,
        line,
        parseError: err ? (err.code === 'MissingQuotes' ? 'Unterminated quoted field.' : `${err.message}.`) : null,
      });
      prevCursor = results.meta.cursor;
    },
  });
  return rows;
}

function isBlankRow(fields: readonly string[]): boolean {
  return fields.every((f) => f.trim() === '');
}

const NUMBER = /^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/;
const NON_FINITE = /^[+-]?(nan|inf|infinity|∞)$/i;

type CellParse = { ok: true; value: number } | { ok: false; message: string };

function parseNumberCell(cell: string, decimalComma: boolean): CellParse {
  let text = cell.trim();
  if (NON_FINITE.test(text)) return { ok: false, message: `Not a finite number: "${cell}".` };
  if (decimalComma && /^[+-]?\d*,\d+([eE][+-]?\d+)?$/.test(text)) text = text.replace(',', '.');
  if (!NUMBER.test(text)) return { ok: false, message: `Not a number: "${cell}".` };
  const value = Number(text);
  if (!Number.isFinite(value)) return { ok: false, message: `Not a finite number: "${cell}".` };
  return { ok: true, value };
}

function describeUnit(u: HeaderUnit): string {
  return typeof u === 'string' ? u : u.unsupported;
}

type ColumnBinding = { key: CurveColumnKey; index: number; header: string };

function readHeader(
  header: RawRow,
  currentUnit: ParseCurveCsvOptions['currentUnit'],
  errors: ErrorCollector,
): ColumnBinding[] | null {
  const line = header.line;
  const first = header.fields[0]?.trim() ?? '';
  if (first !== '' && parseNumberCell(first, true).ok) {
    errors.add(
      line,
      null,
      `The first line must be a header naming the columns (grid_voltage, plate_voltage, plate_current); found the number "${first}".`,
    );
    return null;
  }
  const bindings: ColumnBinding[] = [];
  // Keys seen in the header, including columns rejected for their unit, so those are not also reported as missing.
  const named = new Set<CurveColumnKey>();
  header.fields.forEach((rawCell, index) => {
    const cell = rawCell.trim();
    if (cell === '') {
      errors.add(line, null, `Header cell ${index + 1} is empty; every column needs a name.`);
      return;
    }
    const rec = recogniseHeader(cell);
    if (!rec.recognised) {
      errors.add(line, cell, `Unknown column "${cell}". ${EXPECTED_COLUMNS_TEXT}.`);
      return;
    }
    named.add(rec.key);
    const clash = bindings.find((b) => b.key === rec.key);
    if (clash) {
      errors.add(line, cell, `Columns "${clash.header}" and "${cell}" both mean ${CANONICAL_COLUMN_NAMES[rec.key]}.`);
      return;
    }
    if (rec.unit !== null) {
      const unit = describeUnit(rec.unit);
      if (COLUMN_QUANTITY[rec.key] === 'voltage') {
        if (rec.unit !== 'V') {
          errors.add(line, cell, `Column "${cell}" uses the unit "${unit}"; voltages must be in V.`);
          return;
        }
      } else if (rec.unit !== 'mA' && rec.unit !== 'A') {
        errors.add(line, cell, `Column "${cell}" uses the unit "${unit}"; currents must be in mA or A.`);
        return;
      } else if (rec.unit !== currentUnit) {
        errors.add(
          line,
          cell,
          `Column "${cell}" is in ${rec.unit}, but the upload says currents are in ${currentUnit}. ` +
            `Choose ${rec.unit} as the current unit, or correct the header.`,
        );
        return;
      }
    }
    bindings.push({ key: rec.key, index, header: cell });
  });
  for (const key of REQUIRED_COLUMNS) {
    if (!named.has(key)) {
      errors.add(line, CANONICAL_COLUMN_NAMES[key], `Missing column ${CANONICAL_COLUMN_NAMES[key]}.`);
    }
  }
  const screenCurrent = bindings.find((b) => b.key === 'screenCurrent');
  if (screenCurrent && !bindings.some((b) => b.key === 'screenVoltage')) {
    errors.add(
      line,
      screenCurrent.header,
      `Column "${screenCurrent.header}" (screen current) needs a screen_voltage column as well.`,
    );
  }
  return errors.any ? null : bindings;
}

type ParsedRow = { line: number; values: Partial<Record<CurveColumnKey, number>> };

function formatVolts(v: number): string {
  return `${Number(v.toPrecision(6))} V`;
}

/**
 * Parses a measured curve set. Currents in the result are always in A.
 * Errors carry the 1-based line (as in a text editor) and the column header as written.
 */
export function parseCurveCsv(text: string, opts: ParseCurveCsvOptions): ParseCurveCsvResult {
  const errors = new ErrorCollector();
  const fail = (): ParseCurveCsvResult => ({ ok: false, errors: errors.result() });

  if (text.includes('\u0000')) {
    errors.add(null, null, 'The file contains NUL bytes, so it is binary, not a CSV text file.');
    return fail();
  }
  if (text.startsWith('%PDF')) {
    errors.add(null, null, 'The file is a PDF, not a CSV text file.');
    return fail();
  }
  const body = text.replace(/^\uFEFF/, '');
  if (body.trim() === '') {
    errors.add(null, null, 'The file is empty.');
    return fail();
  }

  const firstLine = body.split(/\r\n|\n|\r/).find((l) => l.trim() !== '') ?? '';
  const delimiter = detectDelimiter(firstLine);
  const rows = readRows(body, delimiter).filter((r) => !isBlankRow(r.fields) || r.parseError);
  const header = rows[0];
  if (!header) {
    errors.add(null, null, 'The file is empty.');
    return fail();
  }
  if (header.parseError) {
    errors.add(header.line, null, header.parseError);
    return fail();
  }
  const bindings = readHeader(header, opts.currentUnit, errors);
  if (!bindings) return fail();

  const dataRows = rows.slice(1);
  if (dataRows.length === 0) {
    errors.add(null, null, 'The file has a header but no data rows.');
    return fail();
  }

  const currentScale = opts.currentUnit === 'mA' ? 1e-3 : 1;
  const decimalComma = delimiter !== ',';
  const headerWidth = header.fields.length;
  const parsed: ParsedRow[] = [];
  const optionalBindings = bindings.filter((b) => !REQUIRED_COLUMNS.includes(b.key));
  const emptyOptional = new Map<CurveColumnKey, number[]>(optionalBindings.map((b) => [b.key, []]));

  for (const row of dataRows) {
    if (row.parseError) {
      errors.add(row.line, null, row.parseError);
      continue;
    }
    if (row.fields.length !== headerWidth) {
      errors.add(
        row.line,
        null,
        `Row has ${row.fields.length} value${row.fields.length === 1 ? '' : 's'} but the header has ${headerWidth} columns.`,
      );
      continue;
    }
    const values: Partial<Record<CurveColumnKey, number>> = {};
    let rowOk = true;
    for (const b of bindings) {
      const cell = row.fields[b.index] ?? '';
      const name = CANONICAL_COLUMN_NAMES[b.key];
      if (cell.trim() === '') {
        if (REQUIRED_COLUMNS.includes(b.key)) {
          errors.add(row.line, b.header, `Empty cell; ${name} is required on every row.`);
          rowOk = false;
        } else {
          emptyOptional.get(b.key)?.push(row.line);
        }
        continue;
      }
      const num = parseNumberCell(cell, decimalComma);
      if (!num.ok) {
        errors.add(row.line, b.header, num.message);
        rowOk = false;
        continue;
      }
      if (num.value < 0 && b.key !== 'gridVoltage') {
        const what = name.replace('_', ' ');
        const rule = COLUMN_QUANTITY[b.key] === 'current' ? 'currents must be zero or positive' : 'it must be zero or positive';
        errors.add(row.line, b.header, `Negative ${what} "${cell.trim()}"; ${rule}.`);
        rowOk = false;
        continue;
      }
      values[b.key] = COLUMN_QUANTITY[b.key] === 'current' ? num.value * currentScale : num.value;
    }
    if (rowOk) parsed.push({ line: row.line, values });
  }

  const warnings: string[] = [];
  const ignored = new Set<CurveColumnKey>();
  for (const b of optionalBindings) {
    const empties = emptyOptional.get(b.key) ?? [];
    const filled = dataRows.length - empties.length;
    if (empties.length === 0) continue;
    if (filled <= 0) {
      ignored.add(b.key);
      warnings.push(`Column "${b.header}" is empty on every row and was ignored.`);
      continue;
    }
    for (const line of empties) {
      errors.add(
        line,
        b.header,
        `Empty ${CANONICAL_COLUMN_NAMES[b.key]} cell, but ${filled} other row${filled === 1 ? ' has' : 's have'} one; ` +
          'fill it on every row or leave the column out.',
      );
    }
  }
  if (ignored.has('screenVoltage') && !ignored.has('screenCurrent') && bindings.some((b) => b.key === 'screenCurrent')) {
    const sc = bindings.find((b) => b.key === 'screenCurrent');
    errors.add(header.line, sc?.header ?? null, 'Screen currents are given but the screen_voltage column is empty.');
  }

  const seen = new Map<string, number>();
  for (const r of parsed) {
    const vg = r.values.gridVoltage;
    const va = r.values.plateVoltage;
    const vg2 = ignored.has('screenVoltage') ? undefined : r.values.screenVoltage;
    const key = `${vg}|${va}|${vg2 ?? ''}`;
    const earlier = seen.get(key);
    if (earlier === undefined) {
      seen.set(key, r.line);
      continue;
    }
    const where =
      `Vg = ${formatVolts(vg ?? 0)}, Va = ${formatVolts(va ?? 0)}` + (vg2 === undefined ? '' : `, Vg2 = ${formatVolts(vg2)}`);
    errors.add(r.line, null, `Duplicate point: line ${r.line} repeats line ${earlier} (${where}).`);
  }

  if (dataRows.length < MIN_CURVE_POINTS) {
    errors.add(
      null,
      null,
      `Only ${dataRows.length} data row${dataRows.length === 1 ? '' : 's'}; at least ${MIN_CURVE_POINTS} points are needed to fit a model.`,
    );
  }
  if (!errors.any && parsed.every((r) => (r.values.plateCurrent ?? 0) === 0)) {
    errors.add(null, null, 'Every plate current is zero; there is nothing to fit.');
  }
  if (errors.any) return fail();

  const columns: CurveCsvColumns = { gridVoltage: '', plateVoltage: '', plateCurrent: '' };
  for (const b of bindings) if (!ignored.has(b.key)) columns[b.key] = b.header;
  const hasScreen = columns.screenVoltage !== undefined;

  const points: CurvePoint[] = parsed.map(({ values }) => {
    const p: CurvePoint = {
      gridVoltage: values.gridVoltage ?? 0,
      plateVoltage: values.plateVoltage ?? 0,
      plateCurrent: values.plateCurrent ?? 0,
    };
    if (hasScreen && values.screenVoltage !== undefined) p.screenVoltage = values.screenVoltage;
    if (columns.screenCurrent !== undefined && values.screenCurrent !== undefined) p.screenCurrent = values.screenCurrent;
    return p;
  });

  const maxIa = points.reduce((m, p) => Math.max(m, p.plateCurrent), 0);
  if (opts.currentUnit === 'A' && maxIa > 2) {
    warnings.push(`Plate currents reach ${Number(maxIa.toPrecision(3))} A; check that the file is not in mA.`);
  } else if (opts.currentUnit === 'mA' && maxIa < 1e-4) {
    warnings.push(`Plate currents only reach ${Number((maxIa * 1e3).toPrecision(3))} mA; check that the file is not in A.`);
  }

  return { ok: true, points, columns, kind: hasScreen ? 'pentode' : 'triode', delimiter, warnings };
}
