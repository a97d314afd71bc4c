// Axis ranges of the report's plate plot (pure; shared rule with the on-screen plate chart).
type VaIa = { va: number; ia: number };
type PlotData = { curves: { points: VaIa[] }[]; dcLoadLine: VaIa[]; acLoadLine: VaIa[]; operatingPoint: VaIa };

const maxIa = (ps: VaIa[]) => ps.reduce((m, q) => (q.ia > m ? q.ia : m), 0);

/**
 * Plate voltage and current spans of the plate plot. The current span follows where the tube works (AC load line
 * swing, twice the quiescent current); a DC load line through a transformer's small winding resistance reaches
 * amperes within a few volts and is clipped at the frame unless it stays near that range.
 */
export function platePlotRange(p: PlotData): { vaMax: number; iaMax: number } {
  const pts = [...p.curves.flatMap((c) => c.points), ...p.dcLoadLine, ...p.acLoadLine, p.operatingPoint];
  const vaMax = Math.max(1, ...pts.map((q) => q.va)) * 1.02;
  const working = Math.max(maxIa(p.acLoadLine), 2 * p.operatingPoint.ia);
  const dc = maxIa(p.dcLoadLine);
  const cap = working > 0 ? Math.max(working * 1.25, dc <= working * 1.5 ? dc : 0) : dc * 1.05;
  const iaMax = Math.max(1e-6, Math.min(cap, Math.max(...pts.map((q) => q.ia))));
  return { vaMax, iaMax };
}

/**
 * The part of a polyline inside 0 ≤ va ≤ vaMax, 0 ≤ ia ≤ iaMax: segments leaving the frame end where they cross
 * its edge (a steep line is cut at the top instead of disappearing). Runs outside the frame are dropped.
 */
export function clipToFrame(ps: VaIa[], vaMax: number, iaMax: number): VaIa[][] {
  const inside = (q: VaIa) => q.va >= 0 && q.va <= vaMax && q.ia >= 0 && q.ia <= iaMax;
  const runs: VaIa[][] = [];
  let run: VaIa[] = [];
  const cut = (a: VaIa, b: VaIa): VaIa => {
    // Liang–Barsky style: the fraction of a→b still inside, measured from the inside point a
    let t = 1;
    const dva = b.va - a.va;
    const dia = b.ia - a.ia;
    if (dva > 0 && b.va > vaMax) t = Math.min(t, (vaMax - a.va) / dva);
    if (dva < 0 && b.va < 0) t = Math.min(t, -a.va / dva);
    if (dia > 0 && b.ia > iaMax) t = Math.min(t, (iaMax - a.ia) / dia);
    if (dia < 0 && b.ia < 0) t = Math.min(t, -a.ia / dia);
    return { va: a.va + t * dva, ia: a.ia + t * dia };
  };
  let prev: VaIa | null = null;
  for (const q of ps) {
    if (inside(q)) {
      if (!run.length && prev && !inside(prev)) run.push(cut(q, prev));
      run.push(q);
    } else if (run.length && prev) {
      run.push(cut(prev, q));
      runs.push(run);
      run = [];
    }
    prev = q;
  }
  if (run.length) runs.push(run);
  return runs.filter((r) => r.length > 1);
}

/** Round tick values 0 … ≤ max (1, 2 or 5 times a power of ten apart), about `count` of them. */
export function axisTicks(max: number, count = 5): number[] {
  if (!(max > 0)) return [0];
  const raw = max / count;
  const p = 10 ** Math.floor(Math.log10(raw));
  const step = [1, 2, 5, 10].map((k) => k * p).find((s) => s >= raw) ?? 10 * p;
  const out: number[] = [];
  for (let v = 0; v <= max * 1.0001; v += step) out.push(Number(v.toPrecision(12)));
  return out;
}
