// Preferred number series for resistors and capacitors (IEC 60063): E12, E24 and E96 mantissas, 1 ≤ m < 10.

export type SeriesName = 'E12' | 'E24' | 'E96';

const E12 = [1.0, 1.2, 1.5, 1.8, 2.2, 2.7, 3.3, 3.9, 4.7, 5.6, 6.8, 8.2];
const E24 = [1.0, 1.1, 1.2, 1.3, 1.5, 1.6, 1.8, 2.0, 2.2, 2.4, 2.7, 3.0, 3.3, 3.6, 3.9, 4.3, 4.7, 5.1, 5.6, 6.2, 6.8, 7.5, 8.2, 9.1];
const E96 = [
  100, 102, 105, 107, 110, 113, 115, 118, 121, 124, 127, 130, 133, 137, 140, 143, 147, 150, 154, 158, 162, 165, 169, 174,
  178, 182, 187, 191, 196, 200, 205, 210, 215, 221, 226, 232, 237, 243, 249, 255, 261, 267, 274, 280, 287, 294, 301, 309,
  316, 324, 332, 340, 348, 357, 365, 374, 383, 392, 402, 412, 422, 432, 442, 453, 464, 475, 487, 499, 511, 523, 536, 549,
  562, 576, 590, 604, 619, 634, 649, 665, 681, 698, 715, 732, 750, 768, 787, 806, 825, 845, 866, 887, 909, 931, 953, 976,
].map((v) => v / 100);

export const SERIES: Record<SeriesName, readonly number[]> = { E12, E24, E96 };

/** Series values within [min, max] (inclusive, to 1e-9 relative), ascending. */
export function seriesValues(series: SeriesName, min: number, max: number): number[] {
  if (!(min > 0) || !(max >= min)) return [];
  const out: number[] = [];
  const m = SERIES[series];
  for (let decade = Math.floor(Math.log10(min)) - 1; decade <= Math.ceil(Math.log10(max)); decade++) {
    const scale = 10 ** decade;
    for (const v of m) {
      const x = Number((v * scale).toPrecision(3));
      if (x >= min * (1 - 1e-9) && x <= max * (1 + 1e-9)) out.push(x);
    }
  }
  return out;
}

/** Nearest series value to x (by ratio). */
export function nearestSeriesValue(series: SeriesName, x: number): number {
  const list = seriesValues(series, x / 1.5, x * 1.5);
  let best = x;
  let err = Infinity;
  for (const v of list) {
    const e = Math.abs(Math.log(v / x));
    if (e < err) {
      err = e;
      best = v;
    }
  }
  return best;
}
