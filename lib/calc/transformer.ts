// Output transformer: the usual lumped equivalent circuit referred to the primary (pure, no I/O).
//
//   source EMF e ── Rs ──┬── Rp ──┬── Ll ── n²·Rsec ──┬── n²·RL   (speaker voltage = V(load) / n)
//                        Cw       Lp                  │
//                        ┴        ┴                   ┴
//
// Rs is the tube side (ra, or 2·ra plate to plate), Cw the primary winding capacitance at the plate terminal,
// Rp the primary DC resistance, Lp the magnetising (primary) inductance, Ll the leakage inductance referred to
// the primary, Rsec the secondary DC resistance. The turns ratio n = √(Zp / RL) comes from the nominal primary
// impedance and the speaker load. This is exactly a pair of coupled inductors L1 = Lp, L2 = (Lp + Ll)/n²,
// k = √(Lp/(Lp + Ll)) (the T equivalent with all leakage on the secondary side), which is how the ngspice
// check builds it. An empty value is a limit that is not modelled: Lp → ∞, Ll → 0, Cw → 0, Rsec → 0.

export type TransformerParams = {
  /** nominal primary impedance (plate to plate for push-pull), Ω */
  primaryImpedance: number;
  /** nominal speaker load the primary impedance is quoted for, Ω */
  speakerLoad: number;
  primaryResistance: number;
  secondaryResistance: number | null;
  primaryInductance: number | null;
  leakageInductance: number | null;
  windingCapacitance: number | null;
};

export type TransformerPoint = { frequency: number; magnitudeDb: number; phaseDeg: number; outputImpedance: number; dampingFactor: number };

export type TransformerLimit = 'low-frequency' | 'high-frequency' | 'resonance' | 'secondary-loss';

export type TransformerAnalysis = {
  turnsRatio: number;
  speakerLoad: number;
  /** source resistance the transformer is driven from (tube side), Ω */
  sourceResistance: number;
  /** load the primary presents to the tube at mid band, Ω (Rp + n²·(Rsec + RL)) */
  reflectedLoad: number;
  /** power into the speaker after the winding losses, W (null when the stage has no drive) */
  speakerPower: number | null;
  /** winding loss, dB: power into the primary over power reaching the speaker */
  insertionLossDb: number;
  /** speaker voltage per volt of source EMF at mid band (winding resistances only) */
  midbandTransfer: number;
  lowCutoff: number | null;
  highCutoff: number | null;
  /** largest rise above mid band, when above 0.1 dB */
  peak: { frequency: number; db: number } | null;
  outputImpedance: number;
  dampingFactor: number;
  /** smallest damping factor over 20 Hz–20 kHz and where it falls */
  minDampingFactor: { frequency: number; value: number };
  response: TransformerPoint[];
  /** limits left out because their value is empty, in plain words */
  notModelled: { limit: TransformerLimit; message: string }[];
};

type C = { re: number; im: number };
const c = (re: number, im = 0): C => ({ re, im });
const add = (a: C, b: C): C => ({ re: a.re + b.re, im: a.im + b.im });
const mul = (a: C, b: C): C => ({ re: a.re * b.re - a.im * b.im, im: a.re * b.im + a.im * b.re });
const div = (a: C, b: C): C => {
  const d = b.re * b.re + b.im * b.im;
  return { re: (a.re * b.re + a.im * b.im) / d, im: (a.im * b.re - a.re * b.im) / d };
};
const par = (a: C, b: C): C => div(mul(a, b), add(a, b));
const abs = (a: C) => Math.hypot(a.re, a.im);

export function turnsRatio(p: Pick<TransformerParams, 'primaryImpedance' | 'speakerLoad'>): number {
  return Math.sqrt(p.primaryImpedance / p.speakerLoad);
}

/** Speaker voltage per volt of source EMF and the output impedance at the speaker, at one frequency. */
export function transformerAt(p: TransformerParams, rs: number, f: number): { h: C; zOut: C } {
  const n = turnsRatio(p);
  const n2 = n * n;
  const w = 2 * Math.PI * f;
  const zLoad = c(n2 * p.speakerLoad);
  const zSer = c(n2 * (p.secondaryResistance ?? 0), w * (p.leakageInductance ?? 0));
  const zS = add(zLoad, zSer);
  const lp = p.primaryInductance;
  const zLp = lp ? c(0, w * lp) : null;
  const zM = zLp ? par(zS, zLp) : zS;
  const zP = add(zM, c(p.primaryResistance));
  const cw = p.windingCapacitance;
  const zCw = cw ? c(0, -1 / (w * cw)) : null;
  const zIn = zCw ? par(zP, zCw) : zP;
  const vP = div(zIn, add(c(rs), zIn));
  const vO = mul(mul(vP, div(zM, zP)), div(zLoad, zS));
  const h = { re: vO.re / n, im: vO.im / n };
  // looking back from the load: the source side through Cw, Rp, Lp, then the series leakage and Rsec
  const back0 = zCw ? par(c(rs), zCw) : c(rs);
  const back1 = add(back0, c(p.primaryResistance));
  const back2 = zLp ? par(back1, zLp) : back1;
  const back = add(back2, zSer);
  return { h, zOut: { re: back.re / n2, im: back.im / n2 } };
}

/** 1 Hz – 1 MHz, `perDecade` points per decade. */
export function logFrequencies(from = 1, to = 1e6, perDecade = 20): number[] {
  const decades = Math.log10(to / from);
  const count = Math.round(decades * perDecade);
  return Array.from({ length: count + 1 }, (_, i) => from * 10 ** ((i * decades) / count));
}

/** Frequency where |g(f)| crosses `level` between f1 and f2 (log bisection; g continuous there). */
export function crossing(g: (f: number) => number, f1: number, f2: number, level: number): number {
  let a = f1;
  let b = f2;
  const sa = g(a) - level;
  for (let i = 0; i < 60; i++) {
    const m = Math.sqrt(a * b);
    if ((g(m) - level) * sa > 0) a = m;
    else b = m;
    if (b / a < 1 + 1e-9) break;
  }
  return Math.sqrt(a * b);
}

export function analyzeTransformer(
  p: TransformerParams,
  rs: number,
  /** primary signal current amplitude (A peak) at the stage's drive, for the power into the speaker */
  primaryCurrent: number | null,
): TransformerAnalysis {
  const n = turnsRatio(p);
  const n2 = n * n;
  const rsec = p.secondaryResistance ?? 0;
  const reflectedLoad = p.primaryResistance + n2 * (rsec + p.speakerLoad);
  const mid = (n2 * p.speakerLoad) / (rs + reflectedLoad) / n;
  const mag = (f: number) => abs(transformerAt(p, rs, f).h) / mid;
  const freqs = logFrequencies();
  const response: TransformerPoint[] = [];
  let peak: { frequency: number; db: number } | null = null;
  let minDf = { frequency: 20, value: Infinity };
  for (const f of freqs) {
    const { h, zOut } = transformerAt(p, rs, f);
    const ratio = abs(h) / mid;
    const db = 20 * Math.log10(Math.max(ratio, 1e-10));
    const zo = abs(zOut);
    const df = p.speakerLoad / zo;
    response.push({ frequency: f, magnitudeDb: db, phaseDeg: (Math.atan2(h.im, h.re) * 180) / Math.PI, outputImpedance: zo, dampingFactor: df });
    if (db > 0.1 && (!peak || db > peak.db)) peak = { frequency: f, db };
    if (f >= 20 && f <= 20000 && df < minDf.value) minDf = { frequency: f, value: df };
  }
  // refine the peak by golden-section on log f around the grid maximum
  if (peak) {
    let a = Math.log(peak.frequency / 1.2);
    let b = Math.log(peak.frequency * 1.2);
    for (let i = 0; i < 40; i++) {
      const m1 = a + (b - a) * 0.382;
      const m2 = a + (b - a) * 0.618;
      if (mag(Math.exp(m1)) > mag(Math.exp(m2))) b = m2;
      else a = m1;
    }
    const f = Math.exp((a + b) / 2);
    peak = { frequency: f, db: 20 * Math.log10(mag(f)) };
  }
  const level = Math.SQRT1_2;
  const g = (f: number) => mag(f);
  let lowCutoff: number | null = null;
  let highCutoff: number | null = null;
  // walk from 1 kHz outwards to the first −3 dB crossing on each side
  const ref = 1000;
  const low = freqs.filter((f) => f <= ref).reverse();
  for (let i = 1; i < low.length; i++) {
    if (g(low[i] as number) < level) {
      lowCutoff = crossing(g, low[i] as number, low[i - 1] as number, level);
      break;
    }
  }
  const high = freqs.filter((f) => f >= ref);
  for (let i = 1; i < high.length; i++) {
    if (g(high[i] as number) < level) {
      highCutoff = crossing(g, high[i - 1] as number, high[i] as number, level);
      break;
    }
  }
  const at1k = transformerAt(p, rs, 1000);
  const zo1k = abs(at1k.zOut);
  const notModelled: TransformerAnalysis['notModelled'] = [];
  if (!p.primaryInductance) {
    notModelled.push({ limit: 'low-frequency', message: 'Primary inductance is empty: the bass roll-off of the transformer is not modelled.' });
  }
  if (!p.leakageInductance && !p.windingCapacitance) {
    notModelled.push({ limit: 'high-frequency', message: 'Leakage inductance and winding capacitance are empty: the treble roll-off of the transformer is not modelled.' });
  } else if (!p.leakageInductance || !p.windingCapacitance) {
    notModelled.push({
      limit: 'resonance',
      message: `${p.leakageInductance ? 'Winding capacitance' : 'Leakage inductance'} is empty: the high-frequency resonance of the transformer is not modelled.`,
    });
  }
  if (p.secondaryResistance === null) {
    notModelled.push({ limit: 'secondary-loss', message: 'Secondary resistance is empty: its loss and its share of the output impedance are left out.' });
  }
  const speakerPower = primaryCurrent !== null ? (n2 * p.speakerLoad * primaryCurrent * primaryCurrent) / 2 : null;
  return {
    turnsRatio: n,
    speakerLoad: p.speakerLoad,
    sourceResistance: rs,
    reflectedLoad,
    speakerPower,
    insertionLossDb: 10 * Math.log10(reflectedLoad / (n2 * p.speakerLoad)),
    midbandTransfer: mid,
    lowCutoff,
    highCutoff,
    peak,
    outputImpedance: zo1k,
    dampingFactor: p.speakerLoad / zo1k,
    minDampingFactor: Number.isFinite(minDf.value) ? minDf : { frequency: 1000, value: p.speakerLoad / zo1k },
    response,
    notModelled,
  };
}
