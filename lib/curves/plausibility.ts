// A sanity check on the size of uploaded plate currents against the type's ratings: a file of milliamperes sent
// with the unit "A" reads 1000 times too large (30 A for a small triode), and the reverse 1000 times too small.
// Pure: used by the upload service before anything is stored.
import { formatEng } from '@/lib/format/number';

export type MagnitudeRatings = { cathodeCurrent?: number | null; plateDissipation?: number | null };

/**
 * The current a type can plausibly carry: its cathode current rating, or else the current that would dissipate its
 * rated plate dissipation at 50 V (curve sets run from low plate voltages, where the current is largest).
 */
export function plausibleCurrent(r: MagnitudeRatings): number | null {
  if (r.cathodeCurrent && r.cathodeCurrent > 0) return r.cathodeCurrent;
  if (r.plateDissipation && r.plateDissipation > 0) return r.plateDissipation / 50;
  return null;
}

/** A plain-words warning when the largest current is over 10× or under 1/10,000 of the plausible current. */
export function currentMagnitudeWarning(currents: number[], unit: 'mA' | 'A', designation: string, r: MagnitudeRatings): string | null {
  const limit = plausibleCurrent(r);
  if (limit === null || currents.length === 0) return null;
  let max = 0;
  for (const c of currents) if (c > max) max = c;
  const basis = r.cathodeCurrent ? `its cathode current rating of ${formatEng(limit, 'A')}` : `its plate dissipation rating (about ${formatEng(limit, 'A')} at 50 V)`;
  if (max > 10 * limit) {
    return `The largest plate current in the file reads ${formatEng(max, 'A')} with currents in ${unit}, implausible for a ${designation} given ${basis}.${unit === 'A' ? ' Were the values in milliamperes?' : ''} Check the unit, or confirm to store the values as they are.`;
  }
  if (max < limit / 1e4) {
    return `The largest plate current in the file reads only ${formatEng(max, 'A')} with currents in ${unit}, implausibly small for a ${designation} given ${basis}.${unit === 'mA' ? ' Were the values in amperes?' : ''} Check the unit, or confirm to store the values as they are.`;
  }
  return null;
}
