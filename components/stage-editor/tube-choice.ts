// Which library type a new stage starts from, per topology: one the trade commonly uses there, with a model to
// compute and ratings to check, so the starting parts give a valid idle point within ratings (tested against the
// seeded library in tests/unit/stage-defaults.test.ts).
import type { Topology } from '@/lib/validation/stage';

type Choice = { id: number; designation: string; family: string; rated?: boolean; models: unknown[] };

/** Common practice: small-signal dual triodes for voltage stages and splitters, power types for output stages. */
export const PREFERRED_TUBES: Record<Topology, string[]> = {
  'common-cathode': ['12AX7', '12AT7', '12AU7'],
  'cathode-follower': ['12AU7', '12AT7', '12AX7'],
  'long-tailed-pair': ['12AT7', '12AX7', '12AU7'],
  'split-load': ['12AU7', '12AT7', '12AX7'],
  'pentode-amplifier': ['EF86', 'EL34', '6L6GC'],
  'single-ended-output': ['EL34', '6L6GC', '300B'],
  'push-pull-output': ['EL34', '6L6GC', 'KT88'],
};

const WANTS_PENTODE: Record<Topology, boolean | null> = {
  'common-cathode': false,
  'cathode-follower': false,
  'long-tailed-pair': false,
  'split-load': false,
  'pentode-amplifier': true,
  'single-ended-output': null,
  'push-pull-output': null,
};

/** True when the type is a sensible start for the topology (one of its usual types). */
export function suitsTopology(topology: Topology, tube: Choice | undefined): boolean {
  return !!tube && PREFERRED_TUBES[topology].some((d) => d.toLowerCase() === tube.designation.toLowerCase());
}

/** The id (as form text) of the type a new stage of this topology starts with, or '' when the library has none. */
export function suitableTube(topology: Topology, tubes: Choice[]): string {
  const usable = tubes.filter((t) => t.models.length > 0);
  const byName = (d: string) => usable.find((t) => t.designation.toLowerCase() === d.toLowerCase());
  const preferred = PREFERRED_TUBES[topology].map(byName).find((t) => t && t.rated !== false);
  if (preferred) return String(preferred.id);
  const pentode = WANTS_PENTODE[topology];
  const family = (t: Choice) => pentode === null || (t.family !== 'triode') === pentode;
  const pick = usable.find((t) => family(t) && t.rated !== false) ?? usable.find(family) ?? usable[0];
  return pick ? String(pick.id) : '';
}
