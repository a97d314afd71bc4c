// Sub-unit prefixes are stored as divisors so that 470n is exactly 470/1e9 (no 4.7000000000000005e-7).
const PREFIX: Record<string, number> = {
  p: -1e12,
  n: -1e9,
  'µ': -1e6,
  m: -1e3,
  R: 1,
  r: 1,
  k: 1e3,
  K: 1e3,
  meg: 1e6,
  M: 1e6,
  G: 1e9,
  T: 1e12,
};

function scale(x: number, mult: number): number {
  return mult < 0 ? x / -mult : x * mult;
}

const UNIT_SUFFIX = /(ohms?|Ω|Ω|hz|v|a|f|w|s|h)$/i;
const PREFIX_RE = '(meg|[pnµmRrkKMGT])';
const INFIX = new RegExp(`^([+-]?)(\\d+)${PREFIX_RE}(\\d+)$`);
const PLAIN = new RegExp(`^([+-]?(?:\\d+\\.?\\d*|\\.\\d+)(?:[eE][+-]?\\d+)?)${PREFIX_RE}?$`);

/**
 * Parses engineering notation: '4k7', '1.5k', '22u', '470n', '2M2', '-1.5', '1e3', '10 kΩ', '22µF', '4R7'.
 * 'm' is milli and 'M' (or 'meg') is mega. Returns null when the text is not a finite number.
 */
export function parseEng(text: string): number | null {
  if (typeof text !== 'string') return null;
  let s = text.trim().replace(/μ/g, 'µ').replace(/u/g, 'µ');
  if (s === '') return null;
  // 'meg' must not lose its trailing letters to the unit stripper; it never ends in a unit letter.
  const unit = UNIT_SUFFIX.exec(s);
  if (unit && !/^\d*\.?\d*(e[+-]?\d+)?$/i.test(s)) s = s.slice(0, unit.index).trimEnd();
  s = s.replace(/\s+/g, '');
  if (s === '' || s === '+' || s === '-') return null;
  const infix = INFIX.exec(s);
  let value: number | null = null;
  if (infix) {
    const [, sign, whole, prefix, frac] = infix;
    const mult = PREFIX[prefix ?? ''];
    if (mult !== undefined) value = scale(Number(`${sign}${whole}.${frac}`), mult);
  } else {
    const plain = PLAIN.exec(s);
    if (plain) {
      const mult = plain[2] ? PREFIX[plain[2]] : 1;
      if (mult !== undefined) value = scale(Number(plain[1]), mult);
    }
  }
  return value !== null && Number.isFinite(value) ? value : null;
}

const FORMAT_PREFIXES: Array<[number, string]> = [
  [1e12, 'T'],
  [1e9, 'G'],
  [1e6, 'M'],
  [1e3, 'k'],
  [1, ''],
  [1e-3, 'm'],
  [1e-6, 'µ'],
  [1e-9, 'n'],
  [1e-12, 'p'],
];

function trimZeros(s: string): string {
  return s.includes('.') ? s.replace(/\.?0+$/, '') : s;
}

/** Formats a value in engineering notation with `digits` significant figures: 4700 → '4.7 kΩ'. */
export function formatEng(value: number, unit = '', digits = 3): string {
  if (!Number.isFinite(value)) return `– ${unit}`.trim();
  const abs = Math.abs(value);
  // below a thousandth of a pico-unit nothing a stage produces is real: it is rounding noise (e.g. zero drive)
  if (value === 0 || abs < 1e-15) return `0 ${unit}`.trim();
  let index = FORMAT_PREFIXES.findIndex(([scale]) => abs >= scale * 0.9999999);
  if (index < 0) index = FORMAT_PREFIXES.length - 1;
  let [scale, prefix] = FORMAT_PREFIXES[index] ?? [1, ''];
  let mantissa = Number((value / scale).toPrecision(digits));
  if (Math.abs(mantissa) >= 1000 && index > 0) {
    [scale, prefix] = FORMAT_PREFIXES[index - 1] ?? [scale, prefix];
    mantissa = Number((value / scale).toPrecision(digits));
  }
  const text = trimZeros(mantissa.toPrecision(digits).includes('e') ? String(mantissa) : mantissa.toPrecision(digits));
  return `${text} ${prefix}${unit}`.trim();
}

/**
 * A value for the screen: engineering notation with a true minus sign, or an en dash when there is none
 * (null, undefined, NaN and ±Infinity never reach the screen).
 */
export function formatMaybe(value: number | null | undefined, unit = '', digits = 3): string {
  return typeof value === 'number' && Number.isFinite(value) ? formatEng(value, unit, digits).replace(/^-/, '−') : '–';
}

/**
 * A dimensionless ratio (gain, µ, a multiplier) with `digits` significant figures and a true minus sign: plain
 * figures between 0.001 and 1000 (0.985, −57.3, 100), an SI prefix beyond (39.5 k); never scientific notation.
 */
export function formatRatio(value: number | null | undefined, digits = 3): string {
  if (typeof value !== 'number' || !Number.isFinite(value)) return '–';
  const abs = Math.abs(value);
  if (abs === 0 || abs < 1e-15) return '0';
  const text = abs >= 1e-3 && abs < 1000 ? trimZeros(value.toPrecision(digits)) : formatEng(value, '', digits);
  return text.replace(/^-/, '−');
}

/** Any stored result value (numbers, flags, words): percentages to 2 decimals, plain ratios to 4 figures. */
export function formatValue(v: unknown, unit: string): string {
  if (v === null || v === undefined) return '–';
  if (typeof v === 'number') {
    if (!Number.isFinite(v)) return '–';
    if (unit === '%') return `${v.toFixed(2)} %`;
    if (unit === '') return Math.abs(v) >= 1000 || (Math.abs(v) < 0.01 && v !== 0) ? formatMaybe(v, '') : String(Number(v.toPrecision(4))).replace(/^-/, '−');
    return formatMaybe(v, unit, 4);
  }
  if (typeof v === 'boolean') return v ? 'yes' : 'no';
  return String(v);
}

/** A relative deviation (0.052 → '+5.2 %'), one decimal below 10 %. */
export function formatDeviation(d: number | null): string {
  if (d === null || !Number.isFinite(d)) return '–';
  const p = d * 100;
  return `${p > 0 ? '+' : p < 0 ? '−' : ''}${Math.abs(p).toFixed(Math.abs(p) < 10 ? 1 : 0)} %`;
}

/** A tolerance band (0.1 → '±10 %'). */
export const formatTolerance = (tolerance: number) => `±${Math.round(tolerance * 1000) / 10} %`;

/** Significant figures for numbers written to files (CSV): enough for any plot, no binary noise (0.30000000000000004). */
export const FILE_DIGITS = 6;

/** A number for a file: FILE_DIGITS significant figures in plain decimal or exponent form, '' when not finite. */
export function fileNumber(value: number): string {
  return Number.isFinite(value) ? String(Number(value.toPrecision(FILE_DIGITS))) : '';
}
