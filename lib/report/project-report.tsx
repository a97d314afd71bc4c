// The project's design report as a PDF (@react-pdf/renderer). Works from a plain ProjectDetail, without the database,
// so frozen revisions and e-mail attachments render the same way.
import { existsSync } from 'node:fs';
import { Circle, Document, Font, Line, Page, Polyline, StyleSheet, Svg, Text, View, renderToBuffer } from '@react-pdf/renderer';
import type { ChainResult } from '@/lib/calc/chain';
import type { SupplyResult } from '@/lib/calc/supply/types';
import type { StageAnalysis } from '@/lib/calc';
import type { FeedbackResult } from '@/lib/calc/feedback/analysis';
import type { ProjectDetail } from '@/lib/projects/service';
import type { StageDTO } from '@/lib/stages/service';
import type { ToleranceDigest } from '@/lib/explore/digest';
import { formatEng } from '@/lib/format/number';
import { inputRows, LIMIT_WORDS, TOPOLOGY_LABELS } from './labels';
import { axisTicks, clipToFrame, platePlotRange } from './plot-range';
import { SweepPlot } from './sweep-plot';

export type ReportOptions = {
  /** a frozen revision: its stamp, who submitted it and, once decided, the decision (the revision summary) */
  revision?: {
    number: number;
    contentHash: string;
    state: string;
    submittedBy?: string | null;
    submittedAt?: string | null;
    decision?: { decision: 'approve' | 'request-changes'; reviewer: string; comment: string; at: string } | null;
  };
  /** the latest tolerance run of each stage made for the reported stage versions (Explore) */
  tolerance?: ToleranceDigest[];
  /** the chain + supply solution, when the caller has it (the report route does) */
  chain?: ChainResult | null;
  /** the project's global feedback loop, solved (the report route passes it when an output stage carries one) */
  feedback?: ReportFeedback | null;
  generatedAt?: Date;
};

// Helvetica cannot print Ω or µ reliably; use DejaVu when the system has it, else spell the units out.
const FONT_DIR = '/usr/share/fonts/truetype/dejavu';
let fontFamily = 'Helvetica';
let fontsChecked = false;
function pickFonts() {
  if (fontsChecked) return;
  fontsChecked = true;
  const regular = `${FONT_DIR}/DejaVuSans.ttf`;
  const bold = `${FONT_DIR}/DejaVuSans-Bold.ttf`;
  if (existsSync(regular) && existsSync(bold)) {
    Font.register({ family: 'DejaVuSans', fonts: [{ src: regular }, { src: bold, fontWeight: 'bold' }] });
    fontFamily = 'DejaVuSans';
  }
  Font.registerHyphenationCallback((word) => [word]);
}
const t = (s: string) => (fontFamily === 'Helvetica' ? s.replace(/Ω/g, 'ohm').replace(/µ/g, 'u').replace(/[≈→–]/g, (c) => ({ '≈': '~', '→': '->', '–': '-' })[c] ?? c) : s);
const eng = (v: number | null | undefined, unit: string, digits = 3) => (typeof v === 'number' && Number.isFinite(v) ? t(formatEng(v, unit, digits)) : '–');

const INK = '#1f2328';
const MUTED = '#6a6358';
const RULE = '#d9d0bf';
const STATUS_COLOUR: Record<string, string> = { ok: '#2f7d3b', near: '#b7791f', over: '#c2362b', 'not-checked': MUTED };

const s = StyleSheet.create({
  page: { padding: 36, fontSize: 9, color: INK, lineHeight: 1.35 },
  h1: { fontSize: 17, fontWeight: 'bold', lineHeight: 1.25, marginBottom: 4 },
  h2: { fontSize: 12, fontWeight: 'bold', marginTop: 12, marginBottom: 4, paddingBottom: 2, borderBottomWidth: 0.7, borderBottomColor: RULE },
  h3: { fontSize: 10, fontWeight: 'bold', marginTop: 6, marginBottom: 3 },
  muted: { color: MUTED },
  caution: { marginTop: 8, padding: 6, borderWidth: 0.7, borderColor: '#b7791f', backgroundColor: '#fbf1df', fontSize: 8 },
  row: { flexDirection: 'row', borderBottomWidth: 0.4, borderBottomColor: RULE, paddingVertical: 1.5 },
  head: { flexDirection: 'row', borderBottomWidth: 0.8, borderBottomColor: INK, paddingVertical: 1.5, fontWeight: 'bold' },
  cols: { flexDirection: 'row', gap: 14 },
  col: { flex: 1 },
  footer: { position: 'absolute', bottom: 18, left: 36, right: 36, fontSize: 7, color: MUTED, flexDirection: 'row', justifyContent: 'space-between' },
});

function Table({ head, rows, widths }: { head: string[]; rows: (string | { text: string; colour?: string })[][]; widths: number[] }) {
  return (
    <View>
      <View style={s.head}>
        {head.map((h, i) => (
          <Text key={i} style={{ flex: widths[i] ?? 1 }}>{t(h)}</Text>
        ))}
      </View>
      {rows.map((r, ri) => (
        <View key={ri} style={s.row} wrap={false}>
          {r.map((c, i) => {
            const cell = typeof c === 'string' ? { text: c } : c;
            return (
              <Text key={i} style={{ flex: widths[i] ?? 1, color: cell.colour ?? INK }}>{t(cell.text)}</Text>
            );
          })}
        </View>
      ))}
    </View>
  );
}

function KeyValues({ rows }: { rows: [string, string][] }) {
  return (
    <View>
      {rows.map(([k, v], i) => (
        <View key={i} style={s.row} wrap={false}>
          <Text style={{ flex: 1.3, color: MUTED }}>{t(k)}</Text>
          <Text style={{ flex: 1 }}>{t(v)}</Text>
        </View>
      ))}
    </View>
  );
}

/** Plate curves with the DC and AC load lines, Pa(max) and the operating point. */
function PlatePlot({ a, width = 250, height = 170 }: { a: StageAnalysis; width?: number; height?: number }) {
  const p = a.plot;
  const { vaMax, iaMax } = platePlotRange(p);
  const m = { l: 28, b: 18, t: 6, r: 6 };
  const W = width - m.l - m.r;
  const H = height - m.t - m.b;
  const x = (va: number) => m.l + (Math.max(0, Math.min(va, vaMax)) / vaMax) * W;
  const y = (ia: number) => m.t + H - (Math.max(0, Math.min(ia, iaMax)) / iaMax) * H;
  // the longest run inside the frame (curves and load lines are cut where they leave it, not dropped)
  const line = (ps: { va: number; ia: number }[]) =>
    (clipToFrame(ps, vaMax, iaMax).sort((u, v) => v.length - u.length)[0] ?? []).map((q) => `${x(q.va).toFixed(1)},${y(q.ia).toFixed(1)}`).join(' ');
  return (
    <View>
      <Svg width={width} height={height}>
        <Line x1={m.l} y1={m.t + H} x2={m.l + W} y2={m.t + H} stroke={INK} strokeWidth={0.6} />
        <Line x1={m.l} y1={m.t} x2={m.l} y2={m.t + H} stroke={INK} strokeWidth={0.6} />
        {axisTicks(vaMax, 5).map((v) => (
          <Text key={`x${v}`} x={x(v)} y={m.t + H + 8} style={{ fontSize: 5.5 }} fill={MUTED} textAnchor="middle">{String(v)}</Text>
        ))}
        {axisTicks(iaMax * 1e3, 4).map((v) => (
          <Text key={`y${v}`} x={m.l - 2} y={y(v / 1e3) + 2} style={{ fontSize: 5.5 }} fill={MUTED} textAnchor="end">{String(v)}</Text>
        ))}
        {p.curves.map((c, i) => (
          <Polyline key={i} points={line(c.points)} stroke={c.bias ? '#5b554b' : '#b4ad9f'} strokeWidth={c.bias ? 1.1 : 0.6} fill="none" />
        ))}
        {p.paMax.length ? <Polyline points={line(p.paMax)} stroke="#c2362b" strokeWidth={0.8} strokeDasharray="3,2" fill="none" /> : null}
        <Polyline points={line(p.dcLoadLine)} stroke="#1f6fb2" strokeWidth={1} fill="none" />
        <Polyline points={line(p.acLoadLine)} stroke="#0f8a7e" strokeWidth={1} fill="none" />
        <Circle cx={x(p.operatingPoint.va)} cy={y(p.operatingPoint.ia)} r={2.6} fill="#d9822b" />
      </Svg>
      <Text style={{ fontSize: 7, color: MUTED }}>
        {t(`Plate voltage Va in V across, plate current Ia in mA up. Blue: DC load line; green: AC load line; red dashed: Pa(max); amber: operating point.`)}
      </Text>
    </View>
  );
}

/** Frequency response, magnitude in dB against log frequency. */
function ResponsePlot({ a, width = 250, height = 110 }: { a: StageAnalysis; width?: number; height?: number }) {
  const r = a.smallSignal.response;
  if (r.length < 2) return null;
  const m = { l: 28, b: 14, t: 6, r: 6 };
  const W = width - m.l - m.r;
  const H = height - m.t - m.b;
  const f0 = Math.log10(r[0]!.frequency);
  const f1 = Math.log10(r[r.length - 1]!.frequency);
  const top = Math.max(...r.map((q) => q.magnitudeDb));
  const bottom = top - 24;
  const x = (f: number) => m.l + ((Math.log10(f) - f0) / (f1 - f0 || 1)) * W;
  const y = (db: number) => m.t + ((top - Math.max(bottom, Math.min(top, db))) / (top - bottom)) * H;
  return (
    <View>
      <Svg width={width} height={height}>
        <Line x1={m.l} y1={m.t + H} x2={m.l + W} y2={m.t + H} stroke={INK} strokeWidth={0.6} />
        <Line x1={m.l} y1={m.t} x2={m.l} y2={m.t + H} stroke={INK} strokeWidth={0.6} />
        <Line x1={m.l} y1={y(top - 3)} x2={m.l + W} y2={y(top - 3)} stroke={RULE} strokeWidth={0.5} strokeDasharray="2,2" />
        <Polyline points={r.map((q) => `${x(q.frequency).toFixed(1)},${y(q.magnitudeDb).toFixed(1)}`).join(' ')} stroke="#1f6fb2" strokeWidth={1} fill="none" />
      </Svg>
      <Text style={{ fontSize: 7, color: MUTED }}>
        {t(`Response ${formatEng(r[0]!.frequency, 'Hz')}–${formatEng(r[r.length - 1]!.frequency, 'Hz')} (log), ${top.toFixed(1)} dB at top, 24 dB span; dashed line at −3 dB.`)}
      </Text>
    </View>
  );
}

function resultRows(a: StageAnalysis): [string, string][] {
  const op = a.operatingPoint;
  const ss = a.smallSignal;
  const ls = a.largeSignal;
  const rows: [string, string][] = [
    ['Plate voltage (to ground)', eng(op.plateVoltage, 'V')],
    ['Plate–cathode voltage', eng(op.plateCathodeVoltage, 'V')],
    ['Plate current', eng(op.plateCurrent, 'A')],
    ['Grid–cathode voltage (bias)', eng(op.gridCathodeVoltage, 'V')],
    ['Cathode voltage', eng(op.cathodeVoltage, 'V')],
    ['Plate dissipation', eng(op.plateDissipation, 'W')],
  ];
  if (op.screenVoltage !== null) rows.push(['Screen voltage', eng(op.screenVoltage, 'V')], ['Screen current', eng(op.screenCurrent, 'A')]);
  rows.push(
    ['Voltage gain', `${ss.gain.toFixed(2)} (${ss.gainDb.toFixed(1)} dB)`],
    ['Transconductance gm', eng(ss.gm, 'S')],
    ['Plate resistance ra', eng(ss.ra, 'Ω')],
    ['Amplification factor µ', ss.mu.toFixed(1)],
    ['Output impedance', eng(ss.outputImpedance, 'Ω')],
    ['Low / high −3 dB', `${eng(ss.lowCutoff, 'Hz')} / ${eng(ss.highCutoff, 'Hz')}`],
    ['Drive (peak at grid)', eng(ls.drive, 'V')],
    ['Output amplitude (peak)', eng(ls.outputAmplitude, 'V')],
    ['THD at this drive', `${ls.thdPercent.toFixed(2)} %`],
    ['Headroom (peak at grid)', `${eng(ls.headroom.maxDrive, 'V')}, ${LIMIT_WORDS[ls.headroom.limitedBy] ?? ls.headroom.limitedBy}`],
  );
  if (ls.outputPower !== null) rows.push(['Output power', eng(ls.outputPower, 'W')]);
  const x = a.transformer;
  if (x) {
    rows.push(
      ['Power into the speaker', x.speakerPower !== null ? eng(x.speakerPower, 'W') : '–'],
      ['Transformer insertion loss', `${x.insertionLossDb.toFixed(2)} dB`],
      ['Transformer low / high −3 dB', `${x.lowCutoff !== null ? eng(x.lowCutoff, 'Hz') : 'not modelled'} / ${x.highCutoff !== null ? eng(x.highCutoff, 'Hz') : 'not modelled'}`],
      ['Output impedance at the speaker', eng(x.outputImpedance, 'Ω')],
      ['Damping factor (1 kHz)', x.dampingFactor.toFixed(2)],
    );
    if (x.peak) rows.push(['Transformer resonance', `+${x.peak.db.toFixed(1)} dB at ${eng(x.peak.frequency, 'Hz')}`]);
    for (const n of x.notModelled) rows.push(['Not modelled', n.message]);
  }
  return rows;
}

function StageSection({ stage, index, chain }: { stage: StageDTO; index: number; chain?: ChainResult | null }) {
  const a = stage.analysis;
  const link = chain?.stages.find((c) => c.stageId === stage.id);
  return (
    <View break={index > 0}>
      <Text style={s.h2}>{t(`Stage ${stage.position} · ${stage.name}`)}</Text>
      <Text style={s.muted}>
        {t(`${TOPOLOGY_LABELS[stage.topology] ?? stage.topology} · ${stage.tubeDesignation}${a?.operatingPoint ? '' : ''} · supply node ${stage.supplyNode ?? 'none'} · version ${stage.version}`)}
      </Text>
      {link ? (
        <Text style={s.muted}>{t(`Supply assumed ${eng(link.assumedSupply, 'V')}, solved at its node ${eng(link.solvedSupply, 'V')}.`)}</Text>
      ) : null}
      <View style={s.cols}>
        <View style={s.col}>
          <Text style={s.h3}>Inputs</Text>
          <KeyValues rows={inputRows(stage.inputs as unknown as Record<string, unknown>).map((r) => [r.label, r.value])} />
        </View>
        <View style={s.col}>
          <Text style={s.h3}>Results</Text>
          {a ? <KeyValues rows={resultRows(a)} /> : <Text style={{ color: STATUS_COLOUR.over }}>{t(`Not analysed: ${stage.analysisError?.message ?? 'no analysis stored.'}`)}</Text>}
        </View>
      </View>
      {a ? (
        <>
          <Text style={s.h3}>Ratings</Text>
          <Table
            head={['Rating', 'Value', 'Limit', 'Use', 'Status']}
            widths={[2.2, 1, 1, 0.7, 0.9]}
            rows={a.ratings.map((r) => [
              r.label,
              eng(r.value, r.unit),
              r.limit !== null ? eng(r.limit, r.unit) : '–',
              r.percent !== null ? `${Math.round(r.percent)} %` : '–',
              { text: r.status === 'not-checked' ? 'not checked' : r.status, colour: STATUS_COLOUR[r.status] },
            ])}
          />
          {a.ratings.filter((r) => r.caution).map((r, i) => (
            <Text key={i} style={{ color: STATUS_COLOUR[r.status], marginTop: 2 }}>{t(`${r.label}: ${r.caution}`)}</Text>
          ))}
          {a.warnings.map((w, i) => (
            <Text key={`w${i}`} style={{ color: STATUS_COLOUR.near, marginTop: 2 }}>{t(`Note: ${w}`)}</Text>
          ))}
          <View style={[s.cols, { marginTop: 8 }]} wrap={false}>
            <View style={s.col}>
              <Text style={s.h3}>Plate curves and load lines</Text>
              <PlatePlot a={a} />
            </View>
            <View style={s.col}>
              <Text style={s.h3}>Frequency response</Text>
              <ResponsePlot a={a} />
            </View>
          </View>
        </>
      ) : null}
    </View>
  );
}

// The supply as a circuit: rectifier, nodes at idle and full drive with ripple and turn-on peak, ratings, cautions.
function SupplyCircuitSection({ result }: { result: SupplyResult }) {
  return (
    <View>
      <Text style={s.h2}>Supply</Text>
      <Text>
        {t(
          `${result.rectifier.label}; secondary peak ${formatEng(result.secondaryPeak, 'V')} at ${result.mainsFrequency} Hz behind ${formatEng(result.sourceResistance, 'Ω')}; ` +
            `${result.capacitorInput ? 'capacitor input' : 'choke input'}. Rectifier peak ${formatEng(result.rectifierPeakCurrent, 'A')}, average ${formatEng(result.rectifier.averageCurrent, 'A')}; ` +
            `reservoir ripple current ${formatEng(result.reservoirRippleCurrent, 'A')} rms; secondary ${formatEng(result.secondaryRmsCurrent, 'A')} rms.`,
        )}
      </Text>
      <Table
        head={['Node', 'Name', 'Idle', 'Full drive', 'Ripple p-p (full)', 'Ripple rms', 'Low / high mains', 'Turn-on peak']}
        widths={[0.6, 1.6, 0.8, 0.8, 1, 0.8, 1.3, 0.9]}
        rows={result.nodes.map((n) => [n.key, n.name, eng(n.dc, 'V', 4), eng(n.fullDrive.dc, 'V', 4), eng(n.fullDrive.ripplePeakToPeak, 'V'), eng(n.fullDrive.rippleRms, 'V'), `${eng(n.dcLowMains, 'V')} / ${eng(n.dcHighMains, 'V')}`, eng(n.unloadedPeak, 'V')])}
      />
      <Text style={s.h3}>Supply ratings</Text>
      <Table
        head={['Rating', 'Value', 'Limit', 'Status']}
        widths={[2.6, 1, 1, 0.8]}
        rows={result.ratings.map((r) => [r.label, eng(r.value, r.unit), r.limit === null ? '–' : eng(r.limit, r.unit), { text: r.status === 'not-checked' ? 'not checked' : r.status, colour: STATUS_COLOUR[r.status] }])}
      />
      {result.cautions.map((c, i) => (
        <Text key={i} style={{ marginTop: 2 }}>{t(c)}</Text>
      ))}
      <Text style={{ marginTop: 2 }}>{t('Discharge every capacitor and measure it before service; local electrical codes and licensed practice come first.')}</Text>
    </View>
  );
}

function SupplySection({ project, chain }: { project: ProjectDetail; chain?: ChainResult | null }) {
  const sup = project.supply ?? {};
  const solved = chain?.supply;
  if (solved?.circuit) {
    return (
      <View>
        <SupplyCircuitSection result={solved.circuit} />
        {chain && chain.heaters.length ? (
          <>
            <Text style={s.h3}>Heaters</Text>
            <Table
              head={['Supply', 'Voltage', 'Current', 'Power', 'Loads']}
              widths={[1.6, 0.7, 0.7, 0.7, 2.4]}
              rows={chain.heaters.map((h) => [h.name, eng(h.voltage, 'V'), eng(h.current, 'A'), eng(h.power, 'W'), h.loads.map((l) => `${l.designation} ${formatEng(l.current, 'A')}`).join(', ') || '–'])}
            />
          </>
        ) : null}
      </View>
    );
  }
  return (
    <View>
      <Text style={s.h2}>Supply</Text>
      <Text>{t(`Raw B+ ${eng(sup.rawVoltage, 'V')} behind ${eng(sup.sourceResistance ?? 0, 'Ω')} source resistance${solved ? `; loaded ${eng(solved.loadedVoltage, 'V')}, total ${eng(solved.totalCurrent, 'A')}.` : '.'}`)}</Text>
      {(sup.nodes ?? []).length ? (
        <Table
          head={['Node', 'Name', 'Dropping R', 'Filter C', 'Voltage', 'Current in', 'Drawn here', 'R power']}
          widths={[0.6, 1.8, 0.9, 0.8, 0.9, 0.9, 0.9, 0.8]}
          rows={(sup.nodes ?? []).map((n) => {
            const r = solved?.nodes.find((x) => x.key === n.key);
            return [n.key, n.name, eng(n.droppingResistor, 'Ω'), eng(n.filterCapacitor, 'F'), eng(r?.voltage, 'V', 4), eng(r?.currentIn, 'A'), eng(r?.stageCurrent, 'A'), eng(r?.resistorPower, 'W')];
          })}
        />
      ) : (
        <Text style={s.muted}>No B+ nodes defined.</Text>
      )}
      {chain?.supplyError ? <Text style={{ color: STATUS_COLOUR.over }}>{t(chain.supplyError.message)}</Text> : null}
      {chain && chain.heaters.length ? (
        <>
          <Text style={s.h3}>Heaters</Text>
          <Table
            head={['Supply', 'Voltage', 'Current', 'Power', 'Loads']}
            widths={[1.6, 0.7, 0.7, 0.7, 2.4]}
            rows={chain.heaters.map((h) => [h.name, eng(h.voltage, 'V'), eng(h.current, 'A'), eng(h.power, 'W'), h.loads.map((l) => `${l.designation} ${formatEng(l.current, 'A')}`).join(', ') || '–'])}
          />
        </>
      ) : null}
    </View>
  );
}

function ChainSection({ chain }: { chain: ChainResult }) {
  return (
    <View>
      <Text style={s.h2}>{t(`Signal chain at ${formatEng(chain.inputRms, 'V')} rms input`)}</Text>
      <Table
        head={['#', 'Stage', 'Gain', 'In (rms)', 'Out (rms)', 'Clips from (chain in)', 'Supply assumed → solved']}
        widths={[0.3, 1.8, 0.7, 0.9, 0.9, 1.3, 1.6]}
        rows={chain.stages.map((c) => [
          String(c.position),
          c.name,
          c.gain !== null ? c.gain.toFixed(2) : '–',
          eng(c.inputRms, 'V'),
          { text: `${eng(c.outputRms, 'V')}${c.clipping ? ' clipped' : ''}`, colour: c.clipping ? STATUS_COLOUR.over : INK },
          { text: c.clipsAtChainInputRms !== null ? `${eng(c.clipsAtChainInputRms, 'V')} rms` : '–', colour: c.clipping ? STATUS_COLOUR.over : INK },
          `${eng(c.assumedSupply, 'V')} → ${eng(c.solvedSupply, 'V')}`,
        ])}
      />
      <Text style={{ marginTop: 3 }}>
        {t(
          `Whole chain: gain ${chain.totalGain !== null ? `${chain.totalGain.toFixed(1)} (${chain.totalGainDb?.toFixed(1) ?? '–'} dB)` : '–'}. ` +
            (chain.firstClip ? `First to clip: ${chain.firstClip.name}, from ${formatEng(chain.firstClip.chainInputRms, 'V')} rms at the chain input (${LIMIT_WORDS[chain.firstClip.limitedBy] ?? chain.firstClip.limitedBy}).` : 'No stage reports a clipping limit.'),
        )}
      </Text>
      {chain.endToEnd ? (
        <Text style={{ marginTop: 3 }}>
          {t(
            `Output ${formatEng(chain.endToEnd.output.amplitude / Math.SQRT2, 'V')} rms, THD ${chain.endToEnd.output.thdPercent.toFixed(2)} %` +
              (chain.endToEnd.output.power !== null ? `, ${formatEng(chain.endToEnd.output.power, 'W')} into the load` : '') +
              ' (every stage driven by the waveform of the one before it).',
          )}
        </Text>
      ) : null}
      {chain.endToEnd?.sweep && chain.endToEnd.sweep.points.length ? (
        <>
          <SweepPlot sweep={chain.endToEnd.sweep} />
          <Text style={{ marginTop: 4 }}>{t('Level sweep (input and output in dBV; every fourth level and the clip point):')}</Text>
          <Table
            head={['In (dBV)', 'Out (dBV)', 'THD', 'State']}
            widths={[1, 1, 1, 1.5]}
            rows={[
              ...chain.endToEnd.sweep.points
                .filter((_, i, all) => i % 4 === 0 || i === all.length - 1)
                .map((p) => [p.inputDbv.toFixed(1), p.outputDbv.toFixed(1), `${p.thdPercent.toFixed(2)} %`, { text: p.clipped ? 'past the clip point' : 'clean', colour: p.clipped ? STATUS_COLOUR.over : INK }]),
              ...(chain.endToEnd.sweep.clip
                ? [[chain.endToEnd.sweep.clip.inputDbv.toFixed(1), '–', '–', { text: `clip point (${chain.endToEnd.sweep.clip.stage})`, colour: STATUS_COLOUR.over }]]
                : []),
            ]}
          />
        </>
      ) : null}
      {chain.warnings.map((w, i) => (
        <Text key={i} style={{ color: STATUS_COLOUR.near }}>{t(w)}</Text>
      ))}
    </View>
  );
}

function Footer({ name }: { name: string }) {
  return (
    <View style={s.footer} fixed>
      <Text>{t(`Anodyne · ${name}`)}</Text>
      <Text render={({ pageNumber, totalPages }) => `${pageNumber} / ${totalPages}`} />
    </View>
  );
}

const stamp = (iso: string) => iso.slice(0, 16).replace('T', ' ');

export function ProjectReport({ project, opts = {} }: { project: ProjectDetail; opts?: ReportOptions }) {
  const when = (opts.generatedAt ?? new Date()).toISOString().slice(0, 16).replace('T', ' ');
  const rev = opts.revision;
  return (
    <Document title={`${project.name} – design report`} author="Anodyne" subject="Tube amplifier design report" creator="Anodyne">
      <Page size="A4" style={[s.page, { fontFamily }]} wrap>
        <Text style={s.h1}>{t(project.name)}</Text>
        <Text style={s.muted}>
          {t(`Design report · status ${project.status.replace('-', ' ')}${project.archived ? ' (archived)' : ''} · owner ${project.owner?.displayName ?? '–'} · project version ${project.version} · generated ${when} UTC`)}
        </Text>
        {rev ? <Text style={s.muted}>{t(`Revision ${rev.number} (${rev.state}) · content hash (SHA-256)`)}</Text> : null}
        {rev ? <Text style={[s.muted, { fontSize: 7 }]}>{rev.contentHash}</Text> : null}
        {rev?.submittedAt ? <Text style={s.muted}>{t(`Submitted by ${rev.submittedBy ?? 'unknown'} on ${stamp(rev.submittedAt)} UTC`)}</Text> : null}
        {rev?.decision ? (
          <Text style={{ marginTop: 4, fontWeight: 'bold', color: rev.decision.decision === 'approve' ? STATUS_COLOUR.ok : STATUS_COLOUR.near }}>
            {t(`${rev.decision.decision === 'approve' ? 'Approved' : 'Changes requested'} by ${rev.decision.reviewer} on ${stamp(rev.decision.at)} UTC`)}
          </Text>
        ) : null}
        {rev?.decision?.comment ? <Text>{t(`Reviewer’s comment: ${rev.decision.comment}`)}</Text> : null}
        {project.description ? <Text style={{ marginTop: 6 }}>{t(project.description)}</Text> : null}
        <View style={s.caution}>
          <Text>
            {t('Lethal voltages. B+ and plate supplies in tube amplifiers can kill, and filter capacitors hold their charge after switch-off. ' +
              'The figures in this report are estimates from tube models, to be confirmed by measurement with suitable instruments. Local electrical codes and licensed practice come first.')}
          </Text>
        </View>
        <Text style={s.h2}>Stages</Text>
        <Table
          head={['#', 'Stage', 'Topology', 'Tube', 'Ia', 'Va–k', 'Gain', 'Worst rating']}
          widths={[0.3, 1.7, 1.7, 0.8, 0.8, 0.8, 0.7, 1]}
          rows={project.stages.map((st) => {
            const a = st.analysis;
            const worst = a ? (['over', 'near', 'ok', 'not-checked'] as const).find((k) => a.ratings.some((r) => r.status === k)) ?? 'not-checked' : null;
            return [
              String(st.position),
              st.name,
              TOPOLOGY_LABELS[st.topology] ?? st.topology,
              st.tubeDesignation,
              eng(a?.operatingPoint.plateCurrent, 'A'),
              eng(a?.operatingPoint.plateCathodeVoltage, 'V'),
              a ? a.smallSignal.gain.toFixed(2) : '–',
              worst ? { text: worst === 'not-checked' ? 'not checked' : worst, colour: STATUS_COLOUR[worst] } : { text: 'not analysed', colour: STATUS_COLOUR.over },
            ];
          })}
        />
        {chain(opts) ? <ChainSection chain={opts.chain!} /> : null}
        {opts.feedback ? <FeedbackSection loop={opts.feedback} /> : null}
        <SupplySection project={project} chain={opts.chain} />
        {opts.tolerance?.length ? <ToleranceSection project={project} digests={opts.tolerance} /> : null}
        <Footer name={project.name} />
      </Page>
      {/* One page (or more, wrapping) per stage: laying out many stages inside a single page grows the layout work
          with the square of the stage count and, past a dozen stages, misplaces content off the page. */}
      {project.stages.map((st) => (
        <Page key={st.id} size="A4" style={[s.page, { fontFamily }]} wrap>
          <StageSection stage={st} index={0} chain={opts.chain} />
          <Footer name={project.name} />
        </Page>
      ))}
    </Document>
  );
}

const chain = (opts: ReportOptions) => Boolean(opts.chain && opts.chain.stages.length);

export type ReportFeedback = {
  from: { name: string };
  to: { name: string };
  used: { resistor: number; shuntResistor: number; capacitor: number | null };
  feedback: FeedbackResult;
};

// Global feedback: margins in words, the figures with and without the loop, and the loop gain over 1 Hz–1 MHz.
function FeedbackSection({ loop }: { loop: ReportFeedback }) {
  const fb = loop.feedback;
  const deg = (v: number | null) => (v === null ? 'none' : `${v.toFixed(1)}°`);
  const dbs = (v: number | null) => (v === null ? 'none' : `${v.toFixed(1)} dB`);
  const r = fb.loopResponse;
  const width = 480;
  const height = 120;
  const m = { l: 28, b: 14, t: 6, r: 6 };
  const W = width - m.l - m.r;
  const H = height - m.t - m.b;
  const f0 = Math.log10(r[0]?.frequency ?? 1);
  const f1 = Math.log10(r[r.length - 1]?.frequency ?? 1e6);
  const x = (f: number) => m.l + ((Math.log10(f) - f0) / (f1 - f0 || 1)) * W;
  const y = (db: number) => m.t + ((40 - Math.max(-40, Math.min(40, db))) / 80) * H;
  return (
    <View wrap={false}>
      <Text style={s.h2}>{t(`Global feedback: ${loop.from.name} speaker terminal to ${loop.to.name} cathode`)}</Text>
      <Text>
        {t(
          `Feedback resistor ${formatEng(loop.used.resistor, 'Ω')} into ${formatEng(loop.used.shuntResistor, 'Ω')}` +
            (loop.used.capacitor ? `, step capacitor ${formatEng(loop.used.capacitor, 'F')}` : ', no step capacitor') +
            `; loop gain at 1 kHz ${fb.loopGainDb.toFixed(1)} dB; phase margin ${deg(fb.phaseMargin)}, gain margin ${dbs(fb.gainMargin)}.`,
        )}
      </Text>
      <Text style={{ color: fb.stability.verdict === 'stable' || fb.stability.verdict === 'no-loop-gain' ? INK : fb.stability.verdict === 'may-ring' ? STATUS_COLOUR.near : STATUS_COLOUR.over, marginTop: 2 }}>
        {t(fb.stability.message)}
      </Text>
      {fb.stability.remedies.map((rem, i) => (
        <Text key={i} style={{ marginTop: 1 }}>{t(`· ${rem}`)}</Text>
      ))}
      <Table
        head={['', 'Without the loop', 'With the loop']}
        widths={[2, 1.2, 1.2]}
        rows={[
          ['Gain, speaker per input volt', fb.openLoopGain.toFixed(2), fb.closedLoopGain.toFixed(2)],
          ['Output impedance at the speaker', eng(fb.outputImpedance.open, 'Ω'), eng(fb.outputImpedance.closed, 'Ω')],
          ['Damping factor (1 kHz)', fb.dampingFactor.open.toFixed(2), fb.dampingFactor.closed.toFixed(2)],
          [`THD at ${eng(fb.distortion.outputPower, 'W')}`, `${fb.distortion.open.thdPercent.toFixed(3)} %`, fb.distortion.closed ? `${fb.distortion.closed.thdPercent.toFixed(3)} %` : '–'],
          ['Bandwidth (−3 dB)', `${eng(fb.bandwidth.open.low, 'Hz')} – ${eng(fb.bandwidth.open.high, 'Hz')}`, `${eng(fb.bandwidth.closed.low, 'Hz')} – ${eng(fb.bandwidth.closed.high, 'Hz')}`],
        ]}
      />
      <Text style={{ marginTop: 2 }}>
        {t(
          `Low end: unity gain ${eng(fb.stability.low.unityGainFrequency, 'Hz')}, phase margin ${deg(fb.stability.low.phaseMargin)}. High end: unity gain ${eng(fb.stability.high.unityGainFrequency, 'Hz')}, phase margin ${deg(fb.stability.high.phaseMargin)}. ` +
            `Square wave overshoot: ${fb.squareWaves.map((w) => `${formatEng(w.frequency, 'Hz')} ${w.overshootPercent.toFixed(1)} %`).join(', ') || '–'}.`,
        )}
      </Text>
      {r.length > 1 ? (
        <View style={{ marginTop: 4 }}>
          <Svg width={width} height={height}>
            <Line x1={m.l} y1={m.t + H} x2={m.l + W} y2={m.t + H} stroke={INK} strokeWidth={0.6} />
            <Line x1={m.l} y1={m.t} x2={m.l} y2={m.t + H} stroke={INK} strokeWidth={0.6} />
            <Line x1={m.l} y1={y(0)} x2={m.l + W} y2={y(0)} stroke={RULE} strokeWidth={0.5} strokeDasharray="2,2" />
            <Polyline points={r.map((q) => `${x(q.frequency).toFixed(1)},${y(q.magnitudeDb).toFixed(1)}`).join(' ')} stroke="#1f6fb2" strokeWidth={1} fill="none" />
          </Svg>
          <Text style={{ fontSize: 7, color: MUTED }}>{t('Loop gain 1 Hz–1 MHz (log), +40 dB at top, −40 dB at the bottom; dashed line at 0 dB (unity).')}</Text>
        </View>
      ) : null}
    </View>
  );
}

const pctOf = (share: number) => `${(100 * share).toFixed(1)} %`;
const spreadOf = (d: ToleranceDigest, key: string) => {
  const m = d.metrics.find((x) => x.key === key);
  if (!m) return '–';
  return m.unit === '%' ? `${m.p1.toFixed(1)}–${m.p99.toFixed(1)} %` : m.unit === '' ? `${m.p1.toPrecision(3)}–${m.p99.toPrecision(3)}` : `${eng(m.p1, m.unit)} – ${eng(m.p99, m.unit)}`;
};

/** Tolerance runs (Explore): per stage, the spread of builds (1st–99th percentile) and the shares out of bounds. */
function ToleranceSection({ project, digests }: { project: ProjectDetail; digests: ToleranceDigest[] }) {
  const name = (id: number | null) => project.stages.find((st) => st.id === id)?.name ?? `stage ${id}`;
  return (
    <View wrap={false}>
      <Text style={s.h2}>Tolerance runs</Text>
      <Text style={s.muted}>{t('Builds with every part, the mains and the tube within their tolerances (Monte Carlo); ranges are the 1st to 99th percentile.')}</Text>
      <Table
        head={['Stage', 'Builds', 'Ia', 'Pa, % of rating', 'Gain', 'Over a rating', 'Outside bench tol.', 'Main factors (Ia)']}
        widths={[1.3, 0.6, 1.3, 1, 0.9, 0.8, 0.8, 1.8]}
        rows={digests.map((d) => [
          name(d.stageId),
          String(d.trials),
          spreadOf(d, 'plateCurrent'),
          spreadOf(d, 'plateDissipationShare'),
          spreadOf(d, 'gain'),
          { text: pctOf(d.overRatingShare), colour: d.overRatingShare > 0.01 ? STATUS_COLOUR.over : d.overRatingShare > 0 ? STATUS_COLOUR.near : STATUS_COLOUR.ok },
          pctOf(d.outsideBenchShare),
          d.topFactors.map((f) => f.label).join(', '),
        ])}
      />
    </View>
  );
}

export async function renderProjectReportPdf(project: ProjectDetail, opts: ReportOptions = {}): Promise<Buffer> {
  pickFonts();
  return renderToBuffer(<ProjectReport project={project} opts={opts} />);
}
