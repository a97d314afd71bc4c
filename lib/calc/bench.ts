// Bench-check arithmetic: what the readings a technician takes imply (plate current, plate-to-cathode voltage,
// plate dissipation) and how they compare with the design's operating point and the tube's ratings.
// Pure: no I/O. Voltages are to ground, SI units throughout.
import type { OperatingPoint, RatingCheck } from './types';

export type BenchVerdict = 'pass' | 'check' | 'fail';
/** Every quantity a bench check compares with the design; project tolerances are keyed by these (lib/validation imports them). */
export const BENCH_QUANTITY_KEYS = [
  'supplyVoltage',
  'plateVoltage',
  'cathodeVoltage',
  'screenVoltage',
  'heaterVoltage',
  'plateCurrent',
  'plateCathodeVoltage',
  'plateDissipation',
  'screenDissipation',
] as const;
export type BenchQuantity = (typeof BENCH_QUANTITY_KEYS)[number];

export const BENCH_QUANTITIES: { key: BenchQuantity; label: string; unit: 'V' | 'A' | 'W' }[] = [
  { key: 'supplyVoltage', label: 'Supply (B+)', unit: 'V' },
  { key: 'plateVoltage', label: 'Plate to ground', unit: 'V' },
  { key: 'cathodeVoltage', label: 'Cathode to ground', unit: 'V' },
  { key: 'screenVoltage', label: 'Screen to ground', unit: 'V' },
  { key: 'heaterVoltage', label: 'Heater voltage', unit: 'V' },
  { key: 'plateCurrent', label: 'Plate current', unit: 'A' },
  { key: 'plateCathodeVoltage', label: 'Plate to cathode', unit: 'V' },
  { key: 'plateDissipation', label: 'Plate dissipation', unit: 'W' },
  { key: 'screenDissipation', label: 'Screen dissipation', unit: 'W' },
];
const META = Object.fromEntries(BENCH_QUANTITIES.map((q) => [q.key, q])) as Record<BenchQuantity, (typeof BENCH_QUANTITIES)[number]>;

/** ±10 % of the design value: common workshop practice for a bench check against a calculated point. */
export const DEFAULT_BENCH_TOLERANCE = 0.1;
/** A reading within 10 % of a rating limit is reported as near the limit. */
export const RATING_NEAR_FRACTION = 0.9;
/** Outside twice the tolerance is a fail even when the ratings are met. */
export const FAR_OUTSIDE_FACTOR = 2;

export type ToleranceSource = 'project' | 'common practice';
export type ResolvedTolerances = Record<BenchQuantity, { value: number; source: ToleranceSource }>;

export function resolveTolerances(projectTolerances: Record<string, number> | null | undefined): ResolvedTolerances {
  const out = {} as ResolvedTolerances;
  for (const { key } of BENCH_QUANTITIES) {
    const v = projectTolerances?.[key];
    out[key] = typeof v === 'number' && Number.isFinite(v) && v > 0 ? { value: v, source: 'project' } : { value: DEFAULT_BENCH_TOLERANCE, source: 'common practice' };
  }
  return out;
}

export type BenchReadings = {
  supplyVoltage: number;
  plateVoltage: number;
  cathodeVoltage: number;
  screenVoltage?: number | null;
  heaterVoltage?: number | null;
  /** plate current read on a meter in the plate lead, A */
  measuredCurrent?: number | null;
};

export type BenchLimits = Partial<Record<'plateVoltage' | 'plateDissipation' | 'cathodeCurrent' | 'screenVoltage' | 'screenDissipation', number>>;

/** What the bench arithmetic needs to know about one tube of the designed stage. */
export type BenchDesign = {
  topology: string;
  supply: number;
  pentode: boolean;
  fixedBias: boolean;
  /** plate load resistor to the supply, Ω (null when the plate load is a transformer or absent) */
  plateResistor: number | null;
  /** DC resistance of the transformer winding carrying this tube's plate current, Ω */
  primaryResistance: number | null;
  /** cathode resistance as this tube sees it, Ω (a resistor shared by a push-pull pair counts twice) */
  cathodeResistor: number | null;
  /** screen resistor as this tube sees it, Ω, fed from the stage supply */
  screenResistor: number | null;
  /** the engine's operating point for one tube; null when the stage has no analysis */
  operatingPoint: Pick<OperatingPoint, 'plateVoltage' | 'cathodeVoltage' | 'plateCurrent' | 'cathodeCurrent' | 'plateCathodeVoltage' | 'plateDissipation' | 'screenVoltage' | 'screenCurrent' | 'screenDissipation'> | null;
  limits: BenchLimits;
  heaterNominal: number | null;
};

export type PlateCurrentMethod = 'measured' | 'cathode' | 'plate-resistor' | 'primary-resistance';

export const METHOD_WORDS: Record<PlateCurrentMethod, string> = {
  measured: 'measured in the plate lead',
  cathode: 'cathode voltage ÷ cathode resistor',
  'plate-resistor': '(supply − plate) ÷ plate resistor',
  'primary-resistance': '(supply − plate) ÷ primary DC resistance',
};

export type BenchComparison = {
  key: BenchQuantity;
  label: string;
  unit: 'V' | 'A' | 'W';
  measured: number;
  /** true for quantities Anodyne computed from the readings */
  derived: boolean;
  design: number | null;
  /** (measured − design) / design */
  deviation: number | null;
  tolerance: number;
  toleranceSource: ToleranceSource;
  limit: number | null;
  /** 'under': below the allowed band of a nominal value (a low heater), which is not "over" anything */
  ratingStatus: RatingCheck['status'] | 'under';
  status: BenchVerdict;
  advice: string | null;
};

export type BenchResult = {
  verdict: BenchVerdict;
  plateCurrentMethod: PlateCurrentMethod;
  derived: { plateCurrent: number; cathodeCurrent: number | null; screenCurrent: number | null; plateCathodeVoltage: number; plateDissipation: number; screenDissipation: number | null };
  comparisons: BenchComparison[];
  /** the plain-words advice of every comparison that did not pass, worst first */
  summary: string[];
};

export class BenchInputError extends Error {
  constructor(
    readonly field: keyof BenchReadings,
    message: string,
  ) {
    super(message);
  }
}

const pct = (fraction: number) => `${Math.round(Math.abs(fraction) * 100)} %`;

function nonNegative(v: number | null | undefined): v is number {
  return typeof v === 'number' && Number.isFinite(v) && v > 0;
}

/** Plate current (and screen current for pentodes) from the readings, by the most direct route available. */
export function derivePlateCurrent(design: BenchDesign, r: BenchReadings): { plateCurrent: number; cathodeCurrent: number | null; screenCurrent: number | null; method: PlateCurrentMethod } {
  const screenFromResistor = (): number | null => {
    if (!design.pentode || !nonNegative(design.screenResistor) || typeof r.screenVoltage !== 'number') return null;
    return Math.max(0, (r.supplyVoltage - r.screenVoltage) / design.screenResistor);
  };
  if (typeof r.measuredCurrent === 'number' && r.measuredCurrent > 0) {
    return { plateCurrent: r.measuredCurrent, cathodeCurrent: null, screenCurrent: screenFromResistor(), method: 'measured' };
  }
  if (!design.fixedBias && nonNegative(design.cathodeResistor) && r.cathodeVoltage > 0) {
    const ik = r.cathodeVoltage / design.cathodeResistor;
    if (!design.pentode) return { plateCurrent: ik, cathodeCurrent: ik, screenCurrent: null, method: 'cathode' };
    let ig2 = screenFromResistor();
    if (ig2 === null) {
      // No screen resistor to measure across: split the cathode current as the design does.
      const op = design.operatingPoint;
      const ratio = op && op.cathodeCurrent > 0 && op.screenCurrent !== null ? op.screenCurrent / op.cathodeCurrent : 0;
      ig2 = ik * ratio;
    }
    return { plateCurrent: Math.max(0, ik - ig2), cathodeCurrent: ik, screenCurrent: ig2, method: 'cathode' };
  }
  if (nonNegative(design.plateResistor)) {
    return { plateCurrent: Math.max(0, (r.supplyVoltage - r.plateVoltage) / design.plateResistor), cathodeCurrent: null, screenCurrent: screenFromResistor(), method: 'plate-resistor' };
  }
  if (nonNegative(design.primaryResistance)) {
    return { plateCurrent: Math.max(0, (r.supplyVoltage - r.plateVoltage) / design.primaryResistance), cathodeCurrent: null, screenCurrent: screenFromResistor(), method: 'primary-resistance' };
  }
  throw new BenchInputError(
    'measuredCurrent',
    design.fixedBias
      ? 'This stage is fixed-bias with no plate resistor or primary resistance to measure across: enter the plate current read on a meter.'
      : 'Anodyne cannot work out the plate current from these readings: enter the plate current read on a meter.',
  );
}

const ADVICE: Partial<Record<BenchQuantity, { high: string; low: string }>> = {
  supplyVoltage: {
    high: 'check the mains voltage and whether the supply is lightly loaded (a tube elsewhere not drawing current)',
    low: 'check the rectifier, the dropping resistors and the filter capacitors; a heavier load than designed also pulls B+ down',
  },
  plateVoltage: {
    high: 'less current flows through the plate load than designed: see the plate current',
    low: 'more current flows through the plate load than designed, or the plate resistor is above its value',
  },
  cathodeVoltage: {
    high: 'the bias is hotter or the cathode resistor is above its value; measure the resistor out of circuit',
    low: 'the tube is drawing less current than designed, or the cathode resistor is below its value',
  },
  screenVoltage: {
    high: 'the screen draws less current than designed: check the screen resistor value and the tube',
    low: 'the screen draws more current than designed: check the screen resistor, its bypass capacitor and the plate load',
  },
  plateCurrent: {
    high: "check the cathode resistor value and the tube's bias (a leaky coupling capacitor pulls the grid positive); a worn or mismatched tube also does this",
    low: 'a weak or worn tube, a cathode resistor above its value or a low heater voltage does this; try a known-good tube',
  },
  plateCathodeVoltage: {
    high: 'the tube draws less current than designed: see the plate current',
    low: 'the tube draws more current than designed, or the supply is low',
  },
  plateDissipation: {
    high: 'the tube runs hotter than designed: correct the bias before it shortens the tube’s life',
    low: 'the tube runs cooler than designed: see the plate current',
  },
  screenDissipation: {
    high: 'the screen runs hotter than designed: check the screen resistor and the plate load',
    low: 'the screen draws less than designed',
  },
  heaterVoltage: {
    high: 'check the heater winding under full load and the mains voltage; ±10 % of nominal is the usual limit',
    low: 'check the heater wiring for voltage drop and the winding under load; ±10 % of nominal is the usual limit',
  },
};

// With fixed bias the grid voltage comes from a bias supply, not a cathode resistor: the advice points there.
const FIXED_BIAS_ADVICE: Partial<Record<BenchQuantity, { high: string; low: string }>> = {
  plateCurrent: {
    high: 'the grid bias is less negative than designed: measure the bias voltage at the grid and set the bias adjustment; a leaky coupling capacitor or a worn or mismatched tube also does this',
    low: 'the grid bias is more negative than designed (measure it at the grid and check the bias adjustment), or the tube is weak or worn, or the heater voltage is low',
  },
  plateVoltage: {
    high: 'less current flows through the plate load than designed: see the plate current and the grid bias',
    low: 'more current flows through the plate load than designed: see the plate current and the grid bias',
  },
  plateDissipation: {
    high: 'the tube runs hotter than designed: make the grid bias more negative before it shortens the tube’s life',
    low: 'the tube runs cooler than designed: see the plate current and the grid bias',
  },
};

function compare(opts: {
  key: BenchQuantity;
  measured: number;
  derived: boolean;
  design: number | null;
  tolerance: { value: number; source: ToleranceSource };
  limit?: number | null;
  /** the design value itself is the rating (heater): outside the tolerance band is over (or under) the rating */
  designIsRating?: boolean;
  /** the stage is fixed-bias (advice about the bias supply instead of a cathode resistor) */
  fixedBias?: boolean;
}): BenchComparison {
  const meta = META[opts.key];
  const tol = opts.tolerance.value;
  const design = opts.design !== null && Number.isFinite(opts.design) && opts.design !== 0 ? opts.design : null;
  const deviation = design !== null ? (opts.measured - design) / design : null;
  const limit = opts.limit && opts.limit > 0 ? opts.limit : null;

  let ratingStatus: BenchComparison['ratingStatus'] = 'not-checked';
  if (opts.designIsRating && deviation !== null) ratingStatus = Math.abs(deviation) > tol ? (deviation > 0 ? 'over' : 'under') : 'ok';
  else if (limit !== null) ratingStatus = opts.measured > limit ? 'over' : opts.measured >= RATING_NEAR_FRACTION * limit ? 'near' : 'ok';

  let status: BenchVerdict = 'pass';
  if (ratingStatus === 'over' || ratingStatus === 'under') status = 'fail';
  else if (deviation !== null && Math.abs(deviation) > FAR_OUTSIDE_FACTOR * tol) status = 'fail';
  else if ((deviation !== null && Math.abs(deviation) > tol) || ratingStatus === 'near') status = 'check';

  let advice: string | null = null;
  if (status !== 'pass') {
    const words = (opts.fixedBias ? FIXED_BIAS_ADVICE[opts.key] : undefined) ?? ADVICE[opts.key];
    const name = meta.label.charAt(0).toUpperCase() + meta.label.slice(1);
    const parts: string[] = [];
    if (ratingStatus === 'over' && !opts.designIsRating && limit !== null) {
      parts.push(`${name} is over the tube's rating (${pct((opts.measured - limit) / limit)} above it): switch off and find the cause before the tube or the parts around it are damaged`);
    } else if (deviation !== null && Math.abs(deviation) > tol) {
      const dir = deviation > 0 ? 'above' : 'below';
      const ref = opts.designIsRating ? 'nominal' : 'design';
      parts.push(`${name} ${pct(deviation)} ${dir} ${ref}: ${words ? (deviation > 0 ? words.high : words.low) : 'check the circuit against the design'}`);
    }
    if (ratingStatus === 'near' && limit !== null) {
      parts.push(`${name} is within ${Math.round((1 - RATING_NEAR_FRACTION) * 100)} % of the tube's rating (${Math.round((opts.measured / limit) * 100)} % of the limit): little margin is left for mains variation`);
    }
    advice = parts.join('. ') || null;
  }
  return {
    key: opts.key,
    label: meta.label,
    unit: meta.unit,
    measured: opts.measured,
    derived: opts.derived,
    design,
    deviation,
    tolerance: tol,
    toleranceSource: opts.tolerance.source,
    limit: opts.designIsRating ? null : limit,
    ratingStatus,
    status,
    advice,
  };
}

const RANK: Record<BenchVerdict, number> = { pass: 0, check: 1, fail: 2 };
// Causes before symptoms: the current and the dissipation say most about what is wrong.
const SUMMARY_ORDER: BenchQuantity[] = ['plateCurrent', 'plateDissipation', 'screenDissipation', 'heaterVoltage', 'supplyVoltage', 'screenVoltage', 'plateCathodeVoltage', 'plateVoltage', 'cathodeVoltage'];

export function worstVerdict(verdicts: BenchVerdict[]): BenchVerdict {
  return verdicts.reduce<BenchVerdict>((w, v) => (RANK[v] > RANK[w] ? v : w), 'pass');
}

/** Derives the plate current, Vpk and Pa from bench readings and compares each quantity with the design and the ratings. */
export function evaluateBenchCheck(design: BenchDesign, readings: BenchReadings, tolerances: ResolvedTolerances = resolveTolerances(null)): BenchResult {
  const r = readings;
  if (r.plateVoltage > r.supplyVoltage * 1.02 + 1) throw new BenchInputError('plateVoltage', 'The plate reads above the supply: check the meter range and the probe points.');
  if (r.cathodeVoltage >= r.plateVoltage && design.topology !== 'cathode-follower') {
    throw new BenchInputError('cathodeVoltage', 'The cathode reads at or above the plate: check the probe points.');
  }
  const ia = derivePlateCurrent(design, r);
  const op = design.operatingPoint;
  const vpk = r.plateVoltage - r.cathodeVoltage;
  const pa = vpk * ia.plateCurrent;
  const screenDissipation = design.pentode && ia.screenCurrent !== null && typeof r.screenVoltage === 'number' ? (r.screenVoltage - r.cathodeVoltage) * ia.screenCurrent : null;

  const rows: BenchComparison[] = [];
  rows.push(compare({ key: 'supplyVoltage', measured: r.supplyVoltage, derived: false, design: design.supply, tolerance: tolerances.supplyVoltage }));
  rows.push(compare({ key: 'plateVoltage', measured: r.plateVoltage, derived: false, design: op?.plateVoltage ?? null, tolerance: tolerances.plateVoltage, fixedBias: design.fixedBias }));
  if (!design.fixedBias || r.cathodeVoltage > 0) {
    rows.push(compare({ key: 'cathodeVoltage', measured: r.cathodeVoltage, derived: false, design: op?.cathodeVoltage ?? null, tolerance: tolerances.cathodeVoltage }));
  }
  if (design.pentode && typeof r.screenVoltage === 'number') {
    rows.push(compare({ key: 'screenVoltage', measured: r.screenVoltage, derived: false, design: op?.screenVoltage ?? null, tolerance: tolerances.screenVoltage, limit: design.limits.screenVoltage !== undefined ? design.limits.screenVoltage + r.cathodeVoltage : null }));
  }
  if (typeof r.heaterVoltage === 'number' && r.heaterVoltage > 0) {
    rows.push(compare({ key: 'heaterVoltage', measured: r.heaterVoltage, derived: false, design: design.heaterNominal, tolerance: tolerances.heaterVoltage, designIsRating: true }));
  }
  rows.push(compare({ key: 'plateCurrent', measured: ia.plateCurrent, derived: ia.method !== 'measured', design: op?.plateCurrent ?? null, tolerance: tolerances.plateCurrent, limit: design.pentode ? null : design.limits.cathodeCurrent, fixedBias: design.fixedBias }));
  rows.push(compare({ key: 'plateCathodeVoltage', measured: vpk, derived: true, design: op?.plateCathodeVoltage ?? null, tolerance: tolerances.plateCathodeVoltage, limit: design.limits.plateVoltage }));
  rows.push(compare({ key: 'plateDissipation', measured: pa, derived: true, design: op?.plateDissipation ?? null, tolerance: tolerances.plateDissipation, limit: design.limits.plateDissipation, fixedBias: design.fixedBias }));
  if (screenDissipation !== null) {
    rows.push(compare({ key: 'screenDissipation', measured: screenDissipation, derived: true, design: op?.screenDissipation ?? null, tolerance: tolerances.screenDissipation, limit: design.limits.screenDissipation }));
  }
  // For a pentode the cathode current (plate + screen) is what the rating limits; report it on the plate-current row.
  if (design.pentode && ia.cathodeCurrent !== null && design.limits.cathodeCurrent && ia.cathodeCurrent > design.limits.cathodeCurrent) {
    const row = rows.find((x) => x.key === 'plateCurrent')!;
    row.ratingStatus = 'over';
    row.status = 'fail';
    row.limit = design.limits.cathodeCurrent;
    row.advice = `Cathode current is over the tube's rating (${pct((ia.cathodeCurrent - design.limits.cathodeCurrent) / design.limits.cathodeCurrent)} above it): switch off and correct the bias`;
  }

  const verdict = worstVerdict(rows.map((x) => x.status));
  const summary = rows
    .filter((x) => x.status !== 'pass' && x.advice)
    .sort((a, b) => RANK[b.status] - RANK[a.status] || SUMMARY_ORDER.indexOf(a.key) - SUMMARY_ORDER.indexOf(b.key))
    .map((x) => x.advice!);
  return {
    verdict,
    plateCurrentMethod: ia.method,
    derived: { plateCurrent: ia.plateCurrent, cathodeCurrent: ia.cathodeCurrent, screenCurrent: ia.screenCurrent, plateCathodeVoltage: vpk, plateDissipation: pa, screenDissipation },
    comparisons: rows,
    summary,
  };
}

const RATING_LIMIT_KEYS: Partial<Record<RatingCheck['key'], keyof BenchLimits>> = {
  'plate-voltage': 'plateVoltage',
  'plate-dissipation': 'plateDissipation',
  'cathode-current': 'cathodeCurrent',
  'screen-voltage': 'screenVoltage',
  'screen-dissipation': 'screenDissipation',
};

/** Rating limits from the engine's rating checks (the stored analysis), falling back to the tube type's ratings. */
export function benchLimits(ratings: RatingCheck[] | null | undefined, fallback: BenchLimits = {}): BenchLimits {
  const out: BenchLimits = { ...fallback };
  for (const r of ratings ?? []) {
    const key = RATING_LIMIT_KEYS[r.key];
    if (key && typeof r.limit === 'number' && r.limit > 0) out[key] = r.limit;
  }
  return out;
}

type StageInputsLike = Record<string, unknown> & { topology?: string; supply?: number };

/** Maps a stored stage (inputs as validated by the stage schema, its analysis) to the bench arithmetic's view of one tube. */
export function benchDesignFromStage(opts: {
  inputs: StageInputsLike;
  operatingPoint: BenchDesign['operatingPoint'];
  ratings: RatingCheck[] | null | undefined;
  fallbackLimits?: BenchLimits;
  pentode: boolean;
  heaterNominal: number | null;
}): BenchDesign {
  const s = opts.inputs as Record<string, any>;
  const topology = String(s.topology ?? '');
  const pushPull = topology === 'push-pull-output';
  const share = pushPull ? 2 : 1;
  const bias = s.bias as { kind?: string; cathodeResistor?: number } | undefined;
  const fixedBias = bias?.kind === 'fixed';
  let cathodeResistor: number | null = null;
  if (topology === 'cathode-follower') cathodeResistor = num(s.cathodeResistor);
  else if (bias?.kind === 'cathode') cathodeResistor = num(bias.cathodeResistor) !== null ? num(bias.cathodeResistor)! * share : null;
  const screen = s.screen as { kind?: string; resistor?: number } | undefined;
  const screenResistor = screen?.kind === 'resistor' && num(screen.resistor) !== null ? num(screen.resistor)! * share : null;
  const primary = num(s.primaryResistance);
  return {
    topology,
    supply: Number(s.supply),
    pentode: opts.pentode,
    fixedBias,
    plateResistor: topology === 'single-ended-output' || pushPull ? null : num(s.plateResistor),
    primaryResistance: primary !== null ? primary / share : null,
    cathodeResistor,
    screenResistor,
    operatingPoint: opts.operatingPoint,
    limits: benchLimits(opts.ratings, opts.fallbackLimits),
    heaterNominal: opts.heaterNominal,
  };
}

function num(v: unknown): number | null {
  return typeof v === 'number' && Number.isFinite(v) && v > 0 ? v : null;
}
