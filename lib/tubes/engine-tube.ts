// The engine's inline tube from a library type and one of its models. Pure, so the DAL, the seeders and the
// tests share one mapping.
import type { Tube } from '../calc';
import { RATING_KEYS } from '../validation/tube';
import type { TubeCapacitancesRecord, TubeRatingsRecord } from '../../models/types';

type ModelKind = 'koren-triode' | 'koren-pentode';

function engineRatings(r: TubeRatingsRecord): NonNullable<Tube['ratings']> {
  const out: Record<string, number> = {};
  for (const k of RATING_KEYS) {
    const v = r[k]?.value;
    if (typeof v === 'number' && Number.isFinite(v) && v > 0) out[k] = v;
  }
  return out;
}

function engineCapacitances(c: TubeCapacitancesRecord): { cgk: number; cga: number; cak: number } | undefined {
  if ([c.cgk, c.cga, c.cak].every((x) => typeof x === 'number' && Number.isFinite(x) && x >= 0)) return { cgk: c.cgk!, cga: c.cga!, cak: c.cak! };
  return undefined;
}

export function engineTubeFrom(
  tube: { designation: string; ratings: TubeRatingsRecord; capacitances: TubeCapacitancesRecord },
  model: { name: string; kind: ModelKind | string; parameters: Record<string, number> },
): Tube {
  const p = model.parameters;
  const common = {
    name: `${tube.designation} (${model.name})`.slice(0, 80),
    ...(p.rgi !== undefined ? { rgi: p.rgi } : {}),
    ...(engineCapacitances(tube.capacitances) ? { capacitances: engineCapacitances(tube.capacitances) } : {}),
    ratings: engineRatings(tube.ratings),
  };
  const vct = p.vct !== undefined ? { vct: p.vct } : {};
  if (model.kind === 'koren-pentode') {
    return { model: 'koren-pentode', mu: p.mu!, ex: p.ex!, kg1: p.kg1!, kg2: p.kg2!, kp: p.kp!, kvb: p.kvb!, ...vct, ...common };
  }
  return { model: 'koren-triode', mu: p.mu!, ex: p.ex!, kg1: p.kg1!, kp: p.kp!, kvb: p.kvb!, ...vct, ...common };
}

