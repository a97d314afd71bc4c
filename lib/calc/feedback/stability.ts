// Stability of a feedback loop from its sampled loop gain (pure math, no circuit knowledge).
//
// Convention: T(f) is the return ratio of the loop, so the closed-loop gain is A/(1 + T) and a negative feedback
// loop has T real and positive at mid band (phase 0°). The loop oscillates where T = −1, so the phase is read as
// a deviation from 0° unwrapped outwards from mid band, and the margins are taken where that deviation reaches
// ±180° (gain margin) or where |T| falls through 1 (phase margin), separately below and above mid band.

export type Complex = { re: number; im: number };

export type LoopPoint = { frequency: number; magnitudeDb: number; phaseDeg: number };

export type BandEdge = {
  /** frequency where |T| = 1 on this side of mid band (null: the loop gain never reaches 1 here, or stays above it) */
  unityGainFrequency: number | null;
  /** 180° minus the phase deviation at the unity-gain frequency, degrees */
  phaseMargin: number | null;
  /** frequency where the phase deviation reaches ±180° */
  phaseCrossoverFrequency: number | null;
  /** −|T| in dB at the phase crossover (positive = stable) */
  gainMargin: number | null;
};

export type StabilityVerdict = 'stable' | 'may-ring' | 'will-oscillate' | 'positive-feedback' | 'no-loop-gain';

export type Stability = {
  /** loop gain at the reference frequency */
  midband: { frequency: number; magnitudeDb: number; phaseDeg: number };
  low: BandEdge;
  high: BandEdge;
  /** the smaller of the two phase margins (null when neither side crosses unity) */
  phaseMargin: number | null;
  gainMargin: number | null;
  verdict: StabilityVerdict;
  /** the verdict in plain words, with the usual remedies */
  message: string;
  remedies: string[];
};

const deg = (c: Complex) => (Math.atan2(c.im, c.re) * 180) / Math.PI;
const mag = (c: Complex) => Math.hypot(c.re, c.im);
const db = (x: number) => 20 * Math.log10(Math.max(x, 1e-30));

/** Phase in degrees, unwrapped along the samples starting from index `ref` (where it is taken in (−180°, 180°]). */
export function unwrapFrom(values: Complex[], ref: number): number[] {
  const out = new Array<number>(values.length);
  out[ref] = deg(values[ref] as Complex);
  for (let i = ref + 1; i < values.length; i++) {
    let d = deg(values[i] as Complex) - deg(values[i - 1] as Complex);
    while (d > 180) d -= 360;
    while (d < -180) d += 360;
    out[i] = (out[i - 1] as number) + d;
  }
  for (let i = ref - 1; i >= 0; i--) {
    let d = deg(values[i] as Complex) - deg(values[i + 1] as Complex);
    while (d > 180) d -= 360;
    while (d < -180) d += 360;
    out[i] = (out[i + 1] as number) + d;
  }
  return out;
}

/**
 * A crossing of `g` (continuous, evaluated exactly) between two samples, on log frequency: Illinois regula falsi
 * (superlinear, a handful of evaluations), to 1e-6 relative in frequency.
 */
function refine(g: (f: number) => number, f1: number, f2: number): number {
  let a = Math.log(f1);
  let b = Math.log(f2);
  let ga = g(f1);
  let gb = g(f2);
  if (ga === 0) return f1;
  if (gb === 0 || ga * gb > 0) return f2;
  let side = 0;
  let x = b;
  for (let i = 0; i < 40 && b - a > 1e-6; i++) {
    x = (a * gb - b * ga) / (gb - ga);
    const gx = g(Math.exp(x));
    if (gx === 0) return Math.exp(x);
    if (gx * gb > 0) {
      b = x;
      gb = gx;
      if (side === -1) ga /= 2;
      side = -1;
    } else {
      a = x;
      ga = gx;
      if (side === 1) gb /= 2;
      side = 1;
    }
    if (Math.abs(gx) < 1e-9) break;
  }
  return Math.exp(x);
}

/**
 * Margins from the loop gain sampled at `frequencies` (ascending) and an exact evaluator `at(f)` used to refine
 * the crossings. `reference` is the mid-band frequency the phase is unwrapped from (1 kHz by default).
 */
export function loopStability(frequencies: number[], loop: Complex[], at: (f: number) => Complex, reference = 1000): Stability {
  let ref = 0;
  for (let i = 0; i < frequencies.length; i++) if (Math.abs(Math.log((frequencies[i] as number) / reference)) < Math.abs(Math.log((frequencies[ref] as number) / reference))) ref = i;
  const phase = unwrapFrom(loop, ref);
  const t0 = loop[ref] as Complex;
  const midband = { frequency: frequencies[ref] as number, magnitudeDb: db(mag(t0)), phaseDeg: deg(t0) };
  // phase of T relative to its value at mid band, continued from a nearby sample (for the exact refinement)
  const phaseNear = (f: number, i: number) => {
    const base = phase[i] as number;
    let d = deg(at(f)) - base;
    while (d > 180) d -= 360;
    while (d < -180) d += 360;
    return base + d;
  };
  const side = (dir: 1 | -1): BandEdge => {
    const edge: BandEdge = { unityGainFrequency: null, phaseMargin: null, phaseCrossoverFrequency: null, gainMargin: null };
    // mid band above unity: the first fall through |T| = 1 moving away from mid band
    if (mag(t0) > 1) {
      for (let i = ref + dir; i >= 0 && i < loop.length; i += dir) {
        if (mag(loop[i] as Complex) < 1) {
          const lo = Math.min(frequencies[i] as number, frequencies[i - dir] as number);
          const hi = Math.max(frequencies[i] as number, frequencies[i - dir] as number);
          const fc = refine((f) => Math.log(mag(at(f))), lo, hi);
          const p = phaseNear(fc, i);
          edge.unityGainFrequency = fc;
          edge.phaseMargin = 180 - Math.abs(p);
          break;
        }
      }
    }
    // first place the phase deviation reaches ±180° (beyond that the loop gain must be below 1)
    for (let i = ref + dir; i >= 0 && i < loop.length; i += dir) {
      const p = phase[i] as number;
      if (Math.abs(p) >= 180) {
        const target = p > 0 ? 180 : -180;
        const lo = Math.min(frequencies[i] as number, frequencies[i - dir] as number);
        const hi = Math.max(frequencies[i] as number, frequencies[i - dir] as number);
        const fx = refine((f) => phaseNear(f, i) - target, lo, hi);
        edge.phaseCrossoverFrequency = fx;
        edge.gainMargin = -db(mag(at(fx)));
        break;
      }
    }
    return edge;
  };
  const low = side(-1);
  const high = side(1);
  const margins = [low.phaseMargin, high.phaseMargin].filter((x): x is number => x !== null);
  const gains = [low.gainMargin, high.gainMargin].filter((x): x is number => x !== null);
  const phaseMargin = margins.length ? Math.min(...margins) : null;
  const gainMargin = gains.length ? Math.min(...gains) : null;
  const remedies: string[] = [];
  let verdict: StabilityVerdict;
  let message: string;
  if (t0.re < 0 && Math.abs(midband.phaseDeg) > 90) {
    verdict = 'positive-feedback';
    message =
      'The feedback arrives in phase with the input: this is positive feedback. The gain rises instead of falling and, with a loop gain near or above 1, the amplifier will howl. Swap the two speaker leads of the transformer secondary (or take the feedback from the other secondary terminal).';
    remedies.push('Reverse the secondary connection that the feedback resistor is taken from.');
  } else if (mag(t0) < 1 && phaseMargin === null) {
    verdict = 'no-loop-gain';
    message = 'The loop gain is below 1 (0 dB) at mid band: the feedback is too weak to change much, and the loop cannot oscillate.';
  } else if ((phaseMargin !== null && phaseMargin < 0) || (gainMargin !== null && gainMargin < 0)) {
    verdict = 'will-oscillate';
    const where = (low.phaseMargin ?? Infinity) < (high.phaseMargin ?? Infinity) ? 'below the audio band (motorboating)' : 'above the audio band (often inaudible, but it overheats tubes and can destroy a tweeter)';
    message = `The loop gain is still above 1 where its phase has turned by 180°, so the amplifier will oscillate ${where}.`;
  } else if (phaseMargin !== null && phaseMargin < 45) {
    verdict = 'may-ring';
    message = `The phase margin is only ${phaseMargin.toFixed(0)}°: the amplifier is stable into this load but may ring on square waves and peak near the unity-gain frequency; a different speaker or a capacitive cable can tip it into oscillation.`;
  } else {
    verdict = 'stable';
    message = phaseMargin !== null ? `Stable, with ${phaseMargin.toFixed(0)}° of phase margin.` : 'Stable.';
  }
  if (verdict === 'will-oscillate' || verdict === 'may-ring') {
    const highSide = (high.phaseMargin ?? Infinity) <= (low.phaseMargin ?? Infinity);
    if (highSide) {
      remedies.push('Add a step network: a small capacitor across the feedback resistor (phase lead near the unity-gain frequency).');
      remedies.push('Add a dominant pole: a small capacitor across the plate load of an early stage, so the loop gain falls at 6 dB per octave well before the transformer’s resonance.');
    } else {
      remedies.push('Make one coupling (or cathode bypass) time constant much longer than the others, so only one pole dominates at the low end.');
    }
    remedies.push('Use less feedback: a larger feedback resistor (or a smaller shunt resistor) lowers the loop gain and raises both margins.');
  }
  return { midband, low, high, phaseMargin, gainMargin, verdict, message, remedies };
}

/** Closed-loop peak: the largest rise of |H(f)| above its value at the reference frequency, with its frequency. */
export function responsePeak(frequencies: number[], h: Complex[], reference = 1000): { frequency: number; db: number } {
  let ref = 0;
  for (let i = 0; i < frequencies.length; i++) if (Math.abs(Math.log((frequencies[i] as number) / reference)) < Math.abs(Math.log((frequencies[ref] as number) / reference))) ref = i;
  const h0 = mag(h[ref] as Complex);
  let best = { frequency: frequencies[ref] as number, db: 0 };
  for (let i = 0; i < h.length; i++) {
    const d = db(mag(h[i] as Complex) / h0);
    if (d > best.db) best = { frequency: frequencies[i] as number, db: d };
  }
  return best;
}

/** −3 dB points of |H| relative to the reference frequency, walking outwards (null: not inside the sampled band). */
export function bandwidth(frequencies: number[], h: Complex[], at: (f: number) => Complex, reference = 1000): { low: number | null; high: number | null } {
  let ref = 0;
  for (let i = 0; i < frequencies.length; i++) if (Math.abs(Math.log((frequencies[i] as number) / reference)) < Math.abs(Math.log((frequencies[ref] as number) / reference))) ref = i;
  const level = mag(h[ref] as Complex) * Math.SQRT1_2;
  const g = (f: number) => Math.log(mag(at(f)) / level);
  const find = (dir: 1 | -1) => {
    for (let i = ref + dir; i >= 0 && i < h.length; i += dir) {
      if (mag(h[i] as Complex) < level) {
        const lo = Math.min(frequencies[i] as number, frequencies[i - dir] as number);
        const hi = Math.max(frequencies[i] as number, frequencies[i - dir] as number);
        return refine(g, lo, hi);
      }
    }
    return null;
  };
  return { low: find(-1), high: find(1) };
}

export type SquareWave = {
  frequency: number;
  t: number[];
  /** normalised output (the settled top of an ideal response is 1) */
  output: number[];
  /** overshoot above the settled top, percent of the step height */
  overshootPercent: number;
  /** droop (tilt) of the top from a quarter to the end of the half period, percent (null: the top is still rising
   * at a quarter of the half period, so there is no flat top to measure) */
  tiltPercent: number | null;
};

/**
 * Response to a square wave of unit amplitude, by summing its odd harmonics through H (normalised to its value at
 * the reference frequency). The harmonics are weighted with Lanczos σ-factors so the truncation itself adds no
 * Gibbs overshoot: what rings is the amplifier. The output is scaled by |H| at the reference (and its sign), so a
 * mid-band phase lag or lead shows as the tilt it causes. Harmonics are taken up to `maxFrequency` (at most 2000 of them).
 */
export function squareWaveResponse(h: (f: number) => Complex, frequency: number, options: { maxFrequency?: number; samples?: number; reference?: number } = {}): SquareWave {
  const maxF = options.maxFrequency ?? 1e6;
  const samples = options.samples ?? 256;
  const href = h(options.reference ?? 1000);
  const n = Math.max(1, Math.min(2000, Math.floor(maxF / frequency)));
  const scale = (href.re < 0 ? -1 : 1) / Math.max(Math.hypot(href.re, href.im), 1e-300);
  const t: number[] = [];
  const out = new Float64Array(samples);
  for (let k = 1; k <= n; k += 2) {
    const hk = h(k * frequency);
    // normalised by the mid-band magnitude (and sign), keeping the phase the amplifier gives
    const re = hk.re * scale;
    const im = hk.im * scale;
    const x = (Math.PI * k) / (n + 1);
    const sigma = k === 0 ? 1 : Math.sin(x) / x;
    const a = ((4 / Math.PI) * sigma) / k;
    // a·|H|·sin(kωt + φ) = a·(re·sin + im·cos)
    const step = (2 * Math.PI * k) / samples;
    const s1 = Math.sin(step);
    const c1 = Math.cos(step);
    let s = 0;
    let c = 1;
    for (let i = 0; i < samples; i++) {
      out[i] = (out[i] as number) + a * (re * s + im * c);
      const sn = s * c1 + c * s1;
      c = c * c1 - s * s1;
      s = sn;
    }
  }
  for (let i = 0; i < samples; i++) t.push(i / samples / frequency);
  // top half-period: overshoot against the value just before the fall, tilt from start to end of the top
  const half = samples / 2;
  let peak = -Infinity;
  for (let i = 0; i < half; i++) peak = Math.max(peak, out[i] as number);
  const settled = out[Math.floor(half * 0.95)] as number;
  const start = out[Math.floor(half * 0.25)] as number;
  return {
    frequency,
    t,
    output: Array.from(out),
    // of the step height (the wave steps from −settled to +settled)
    overshootPercent: Math.max(0, (100 * (peak - settled)) / (2 * settled)),
    tiltPercent: start >= 0.9 * settled ? 100 * (start / settled - 1) : null,
  };
}
