import type { TubeRatings } from './models/registry';
import type { RatingCheck, RatingKey } from './types';

type CheckSpec = {
  key: RatingKey;
  label: string;
  value: number;
  limit: number | undefined;
  unit: string;
  caution?: string;
};

/** Status against a limit; 'near' above the derating fraction (0.7 by default, common practice). */
export function ratingCheck(spec: CheckSpec, derating: number): RatingCheck {
  const value = Number.isFinite(spec.value) ? spec.value : 0;
  if (spec.limit === undefined || !(spec.limit > 0)) {
    return {
      key: spec.key,
      label: spec.label,
      value,
      limit: null,
      unit: spec.unit,
      percent: null,
      status: 'not-checked',
      caution: 'No rating on file for this tube; not checked.',
    };
  }
  const percent = (100 * Math.abs(value)) / spec.limit;
  const status = percent > 100 ? 'over' : percent > 100 * derating ? 'near' : 'ok';
  const caution =
    status === 'over'
      ? `Exceeds the rated ${spec.label.toLowerCase()}.${spec.caution ? ` ${spec.caution}` : ''}`
      : status === 'near'
        ? `Above ${Math.round(derating * 100)} % of the rating.${spec.caution ? ` ${spec.caution}` : ''}`
        : (spec.caution ?? null);
  return { key: spec.key, label: spec.label, value, limit: spec.limit, unit: spec.unit, percent, status, caution };
}

export type RatingInputs = {
  ratings: TubeRatings;
  derating: number;
  plateCathodeVoltage: number;
  plateDissipation: number;
  fullDrivePlateDissipation?: number;
  screenCathodeVoltage: number | null;
  screenDissipation: number | null;
  cathodeCurrent: number;
  heaterCathodeVoltage: number;
  gridResistance: number;
  biasKind: 'fixed' | 'cathode';
};

export function checkRatings(x: RatingInputs): RatingCheck[] {
  const r = x.ratings;
  const out: RatingCheck[] = [
    ratingCheck({ key: 'plate-voltage', label: 'Plate voltage', value: x.plateCathodeVoltage, limit: r.plateVoltage, unit: 'V' }, x.derating),
    ratingCheck({ key: 'plate-dissipation', label: 'Plate dissipation', value: x.plateDissipation, limit: r.plateDissipation, unit: 'W' }, x.derating),
  ];
  if (x.fullDrivePlateDissipation !== undefined) {
    out.push(
      ratingCheck(
        {
          key: 'plate-dissipation-full-drive',
          label: 'Plate dissipation at full drive',
          value: x.fullDrivePlateDissipation,
          limit: r.plateDissipation,
          unit: 'W',
          caution: 'Per tube, at the headroom limit of the drive.',
        },
        x.derating,
      ),
    );
  }
  if (x.screenCathodeVoltage !== null) {
    out.push(ratingCheck({ key: 'screen-voltage', label: 'Screen voltage', value: x.screenCathodeVoltage, limit: r.screenVoltage, unit: 'V' }, x.derating));
  }
  if (x.screenDissipation !== null) {
    out.push(
      ratingCheck(
        { key: 'screen-dissipation', label: 'Screen dissipation', value: x.screenDissipation, limit: r.screenDissipation, unit: 'W', caution: 'Screen dissipation rises on signal peaks.' },
        x.derating,
      ),
    );
  }
  out.push(ratingCheck({ key: 'cathode-current', label: 'Cathode current', value: x.cathodeCurrent, limit: r.cathodeCurrent, unit: 'A' }, x.derating));
  out.push(ratingCheck({ key: 'heater-cathode-voltage', label: 'Heater–cathode voltage', value: x.heaterCathodeVoltage, limit: r.heaterCathodeVoltage, unit: 'V' }, x.derating));
  const gridLimit = x.biasKind === 'fixed' ? r.gridResistanceFixedBias : r.gridResistanceCathodeBias;
  out.push(
    ratingCheck(
      {
        key: 'grid-resistance',
        label: `Grid-circuit resistance (${x.biasKind === 'fixed' ? 'fixed' : 'cathode'} bias)`,
        value: x.gridResistance,
        limit: gridLimit,
        unit: 'Ω',
        caution: x.biasKind === 'fixed' ? 'Too large a grid resistor with fixed bias risks thermal runaway from reverse grid current.' : undefined,
      },
      x.derating,
    ),
  );
  return out;
}
