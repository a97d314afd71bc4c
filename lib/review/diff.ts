// What changed between two revisions' snapshots: project fields, each stage's inputs and its results, side by side.
// Stages are matched by id (a stage keeps its id across edits), so a renamed stage is a change, not a new stage.
import type { RevisionSnapshot, SnapshotStage } from './types';

export type ChangeKind = 'added' | 'removed' | 'changed' | 'same';

export type ValueChange = {
  path: string;
  label: string;
  unit: string;
  before: unknown;
  after: unknown;
  change: ChangeKind;
  /**
   * For two numbers: which way the magnitude moved and by how much (|after| / |before| − 1). A signed percentage
   * misleads for negative values (a gain going from −57.3 to −64.5 is a larger gain, not "−13 %").
   */
  magnitude: MagnitudeChange | null;
};

export type MagnitudeChange = { direction: 'larger' | 'smaller' | 'same' | 'sign-changed'; percent: number | null };

export function magnitudeChange(before: number, after: number): MagnitudeChange {
  if (Math.sign(before) !== Math.sign(after) && before !== 0 && after !== 0) return { direction: 'sign-changed', percent: null };
  const b = Math.abs(before);
  const a = Math.abs(after);
  if (b === 0) return { direction: a === 0 ? 'same' : 'larger', percent: null };
  const percent = (a / b - 1) * 100;
  return { direction: Math.abs(percent) < 0.05 ? 'same' : percent > 0 ? 'larger' : 'smaller', percent };
}

export type StageDiff = {
  stageId: number;
  name: string;
  tubeDesignation: string;
  change: 'added' | 'removed' | 'changed' | 'unchanged';
  /** stage fields and inputs that differ */
  inputs: ValueChange[];
  /** the key results on both sides (flagged where they differ) */
  results: ValueChange[];
};

export type RevisionDiff = {
  base: { number: number } | null;
  project: ValueChange[];
  stages: StageDiff[];
  counts: { added: number; removed: number; changed: number; unchanged: number };
};

const INPUT_LABELS: Record<string, [string, string]> = {
  name: ['Stage name', ''],
  position: ['Position in the signal chain', ''],
  topology: ['Topology', ''],
  tubeDesignation: ['Tube', ''],
  tubeModelId: ['Tube model', ''],
  supplyNode: ['Supply node', ''],
  'inputs.tubeId': ['Tube (library id)', ''],
  'inputs.supply': ['Supply (B+)', 'V'],
  'inputs.plateResistor': ['Plate resistor', 'Ω'],
  'inputs.gridResistor': ['Grid leak', 'Ω'],
  'inputs.sourceResistance': ['Source resistance', 'Ω'],
  'inputs.heaterElevation': ['Heater elevation', 'V'],
  'inputs.derating': ['Rating margin', ''],
  'inputs.bias.kind': ['Bias', ''],
  'inputs.bias.cathodeResistor': ['Cathode resistor', 'Ω'],
  'inputs.bias.cathodeBypass': ['Cathode bypass', 'F'],
  'inputs.bias.fixedBias': ['Fixed bias', 'V'],
  'inputs.bias.gridVoltage': ['Grid voltage', 'V'],
  'inputs.bias.biasResistor': ['Bias resistor', 'Ω'],
  'inputs.cathodeResistor': ['Cathode resistor', 'Ω'],
  'inputs.load.resistance': ['Load resistance', 'Ω'],
  'inputs.load.couplingCapacitor': ['Coupling capacitor', 'F'],
  'inputs.drive.amplitude': ['Drive (peak)', 'V'],
  'inputs.drive.frequency': ['Drive frequency', 'Hz'],
  'inputs.screen.kind': ['Screen feed', ''],
  'inputs.screen.resistor': ['Screen resistor', 'Ω'],
  'inputs.screen.supply': ['Screen supply', 'V'],
  'inputs.screen.bypass': ['Screen bypass', 'F'],
  'inputs.primaryImpedance': ['Primary impedance', 'Ω'],
  'inputs.primaryResistance': ['Primary DC resistance', 'Ω'],
  'inputs.transformer.speakerLoad': ['Speaker load', 'Ω'],
  'inputs.transformer.secondaryResistance': ['Secondary DC resistance', 'Ω'],
  'inputs.transformer.primaryInductance': ['Primary inductance', 'H'],
  'inputs.transformer.leakageInductance': ['Leakage inductance', 'H'],
  'inputs.transformer.windingCapacitance': ['Primary winding capacitance', 'F'],
  'inputs.feedback.resistor': ['Feedback resistor', 'Ω'],
  'inputs.feedback.shuntResistor': ['Feedback shunt resistor', 'Ω'],
  'inputs.feedback.capacitor': ['Step capacitor', 'F'],
  'inputs.feedback.polarity': ['Feedback secondary terminal', ''],
  'inputs.plateToPlateImpedance': ['Plate-to-plate impedance', 'Ω'],
  'inputs.class': ['Class', ''],
};

const PROJECT_LABELS: Record<string, [string, string]> = {
  name: ['Project name', ''],
  description: ['Description', ''],
  'supply.rawVoltage': ['Raw B+', 'V'],
  'supply.sourceResistance': ['Supply source resistance', 'Ω'],
};

/** The results a reviewer compares; paths into the stored StageAnalysis. */
export const RESULT_FIELDS: { path: string; label: string; unit: string }[] = [
  { path: 'operatingPoint.plateVoltage', label: 'Plate to ground', unit: 'V' },
  { path: 'operatingPoint.plateCathodeVoltage', label: 'Plate to cathode', unit: 'V' },
  { path: 'operatingPoint.plateCurrent', label: 'Plate current', unit: 'A' },
  { path: 'operatingPoint.gridCathodeVoltage', label: 'Grid to cathode (bias)', unit: 'V' },
  { path: 'operatingPoint.cathodeVoltage', label: 'Cathode to ground', unit: 'V' },
  { path: 'operatingPoint.screenVoltage', label: 'Screen to ground', unit: 'V' },
  { path: 'operatingPoint.screenCurrent', label: 'Screen current', unit: 'A' },
  { path: 'operatingPoint.plateDissipation', label: 'Plate dissipation', unit: 'W' },
  { path: 'smallSignal.gm', label: 'Transconductance (gm)', unit: 'S' },
  { path: 'smallSignal.ra', label: 'Plate resistance (ra)', unit: 'Ω' },
  { path: 'smallSignal.mu', label: 'Amplification factor (µ)', unit: '' },
  { path: 'smallSignal.gain', label: 'Voltage gain', unit: '' },
  { path: 'smallSignal.outputImpedance', label: 'Output impedance', unit: 'Ω' },
  { path: 'smallSignal.lowCutoff', label: 'Low −3 dB', unit: 'Hz' },
  { path: 'smallSignal.highCutoff', label: 'High −3 dB', unit: 'Hz' },
  { path: 'largeSignal.thdPercent', label: 'THD at the drive level', unit: '%' },
  { path: 'largeSignal.outputPower', label: 'Output power', unit: 'W' },
  { path: 'largeSignal.headroom.maxDrive', label: 'Headroom (max drive)', unit: 'V' },
  { path: 'transformer.speakerPower', label: 'Power into the speaker', unit: 'W' },
  { path: 'transformer.insertionLossDb', label: 'Transformer insertion loss (dB)', unit: '' },
  { path: 'transformer.lowCutoff', label: 'Transformer low −3 dB', unit: 'Hz' },
  { path: 'transformer.highCutoff', label: 'Transformer high −3 dB', unit: 'Hz' },
  { path: 'transformer.outputImpedance', label: 'Output impedance at the speaker', unit: 'Ω' },
  { path: 'transformer.dampingFactor', label: 'Damping factor (1 kHz, no global feedback)', unit: '' },
];

function get(obj: unknown, path: string): unknown {
  let cur: unknown = obj;
  for (const part of path.split('.')) {
    if (cur === null || typeof cur !== 'object') return undefined;
    cur = (cur as Record<string, unknown>)[part];
  }
  return cur;
}

/** Leaves of a JSON value by dotted path; arrays of keyed objects use the key instead of the index. */
export function flatten(value: unknown, prefix = '', out: Record<string, unknown> = {}): Record<string, unknown> {
  if (value === null || typeof value !== 'object') {
    if (prefix) out[prefix] = value;
    return out;
  }
  if (Array.isArray(value)) {
    if (value.length === 0 && prefix) out[prefix] = '(none)';
    value.forEach((v, i) => {
      const key = v && typeof v === 'object' && 'key' in v && typeof (v as { key: unknown }).key === 'string' ? (v as { key: string }).key : String(i);
      flatten(v, prefix ? `${prefix}.${key}` : key, out);
    });
    return out;
  }
  const entries = Object.entries(value as Record<string, unknown>);
  if (entries.length === 0 && prefix) out[prefix] = '(none)';
  for (const [k, v] of entries) flatten(v, prefix ? `${prefix}.${k}` : k, out);
  return out;
}

function same(a: unknown, b: unknown) {
  if (typeof a === 'number' && typeof b === 'number') return a === b || Math.abs(a - b) <= 1e-9 * Math.max(Math.abs(a), Math.abs(b));
  return a === b;
}

function valueChange(path: string, label: string, unit: string, before: unknown, after: unknown): ValueChange {
  const b = before === undefined ? null : before;
  const a = after === undefined ? null : after;
  const change: ChangeKind = b === null && a !== null ? 'added' : a === null && b !== null ? 'removed' : same(a, b) ? 'same' : 'changed';
  const magnitude = typeof a === 'number' && typeof b === 'number' ? magnitudeChange(b, a) : null;
  return { path, label, unit, before: b, after: a, change, magnitude };
}

function labelFor(map: Record<string, [string, string]>, path: string): [string, string] {
  if (map[path]) return map[path];
  const tail = path.split('.').slice(-1)[0] ?? path;
  const unit = /voltage|supply/i.test(tail) ? 'V' : /resist|impedance/i.test(tail) ? 'Ω' : /capacit|bypass/i.test(tail) ? 'F' : '';
  return [path.replace(/^inputs\./, ''), unit];
}

function changedLeaves(before: Record<string, unknown>, after: Record<string, unknown>, labels: Record<string, [string, string]>): ValueChange[] {
  const fb = flatten(before);
  const fa = flatten(after);
  const keys = [...new Set([...Object.keys(fb), ...Object.keys(fa)])].sort();
  return keys
    .map((k) => {
      const [label, unit] = labelFor(labels, k);
      return valueChange(k, label, unit, fb[k], fa[k]);
    })
    .filter((c) => c.change !== 'same');
}

function stageFields(s: SnapshotStage | undefined) {
  if (!s) return {};
  return { name: s.name, position: s.position, topology: s.topology, tubeDesignation: s.tubeDesignation, tubeModelId: s.tubeModelId, supplyNode: s.supplyNode, inputs: s.inputs };
}

/** A stage's inputs as labelled rows (for the frozen view of a revision). */
export function stageInputRows(s: SnapshotStage) {
  const flat = flatten({ inputs: s.inputs });
  return Object.entries(flat)
    .filter(([k]) => k !== 'inputs.topology' && k !== 'inputs.tubeId')
    .map(([path, value]) => {
      const [label, unit] = labelFor(INPUT_LABELS, path);
      return { path, label, unit, value };
    });
}

export function stageResults(s: SnapshotStage | undefined | null) {
  return RESULT_FIELDS.map((f) => ({ ...f, value: s?.analysis ? (get(s.analysis, f.path) as number | null | undefined) ?? null : null }));
}

function resultChanges(before: SnapshotStage | undefined, after: SnapshotStage | undefined): ValueChange[] {
  const out = RESULT_FIELDS.map((f) => valueChange(`analysis.${f.path}`, f.label, f.unit, before?.analysis ? get(before.analysis, f.path) : null, after?.analysis ? get(after.analysis, f.path) : null)).filter(
    (c) => c.before !== null || c.after !== null,
  );
  const ratingKeys = new Set([...(before?.analysis?.ratings ?? []), ...(after?.analysis?.ratings ?? [])].map((r) => r.key));
  for (const key of ratingKeys) {
    const rb = before?.analysis?.ratings.find((r) => r.key === key);
    const ra = after?.analysis?.ratings.find((r) => r.key === key);
    out.push(valueChange(`analysis.ratings.${key}`, `Rating: ${(ra ?? rb)!.label}`, '', rb ? rb.status : null, ra ? ra.status : null));
  }
  const eb = before?.analysisError?.message ?? null;
  const ea = after?.analysisError?.message ?? null;
  if (eb !== null || ea !== null) out.push(valueChange('analysisError', 'Calculation error', '', eb, ea));
  return out;
}

export function diffSnapshots(base: RevisionSnapshot | null, next: RevisionSnapshot, baseNumber: number | null = null): RevisionDiff {
  const project = base
    ? changedLeaves(
        { name: base.name, description: base.description, supply: base.supply, supplyCircuit: base.supplyCircuit ?? null, benchTolerances: base.benchTolerances },
        { name: next.name, description: next.description, supply: next.supply, supplyCircuit: next.supplyCircuit ?? null, benchTolerances: next.benchTolerances },
        PROJECT_LABELS,
      )
    : [];
  const beforeById = new Map((base?.stages ?? []).map((s) => [s.id, s]));
  const afterById = new Map(next.stages.map((s) => [s.id, s]));
  const stages: StageDiff[] = [];
  for (const s of [...next.stages].sort((a, b) => a.position - b.position)) {
    const b = base ? beforeById.get(s.id) : undefined;
    const inputs = b ? changedLeaves(stageFields(b), stageFields(s), INPUT_LABELS) : changedLeaves({}, stageFields(s), INPUT_LABELS);
    const results = resultChanges(b, s);
    const change = !base || !b ? 'added' : inputs.length > 0 || results.some((r) => r.change !== 'same') ? 'changed' : 'unchanged';
    stages.push({ stageId: s.id, name: s.name, tubeDesignation: s.tubeDesignation, change, inputs, results });
  }
  for (const b of base?.stages ?? []) {
    if (afterById.has(b.id)) continue;
    stages.push({ stageId: b.id, name: b.name, tubeDesignation: b.tubeDesignation, change: 'removed', inputs: changedLeaves(stageFields(b), {}, INPUT_LABELS), results: resultChanges(b, undefined) });
  }
  const counts = { added: 0, removed: 0, changed: 0, unchanged: 0 };
  for (const s of stages) counts[s.change]++;
  return { base: base && baseNumber !== null ? { number: baseNumber } : null, project, stages, counts };
}
