// Projects and stages through the real route handlers and database: create, edit, analyse, 409 on a stale save,
// the chain solution, curve CSV and the PDF report.
import { PDFParse } from 'pdf-parse';
import { beforeAll, describe, expect, it } from 'vitest';
import * as analyzeRoute from '@/app/api/analyze/route';
import * as chainRoute from '@/app/api/projects/[id]/chain/route';
import * as reportRoute from '@/app/api/projects/[id]/report/route';
import * as projectRoute from '@/app/api/projects/[id]/route';
import * as stagesRoute from '@/app/api/projects/[id]/stages/route';
import * as projectsRoute from '@/app/api/projects/route';
import * as curvesRoute from '@/app/api/stages/[id]/curves/route';
import * as stageRoute from '@/app/api/stages/[id]/route';
import type { ChainResult } from '@/lib/calc/chain';
import type { ProjectDetail } from '@/lib/projects/service';
import type { StageDTO } from '@/lib/stages/service';
import { renderReportPdf } from '@/lib/report/pdf';
import { AuditEvent, Project, TubeModel, TubeType } from '@/models';
import { call } from '../support/api';

// The tube library seeder provides these; create them when it has not run (Koren's published sets, tube-models.md §3.1).
const KOREN: Record<string, { sections: number; heater: { voltage: number; current: number }; params: Record<string, number>; ratings: Record<string, number> }> = {
  '12AX7': { sections: 2, heater: { voltage: 12.6, current: 0.15 }, params: { mu: 100, ex: 1.4, kg1: 1060, kp: 600, kvb: 300 }, ratings: { plateVoltage: 300, plateDissipation: 1 } },
  '300B': { sections: 1, heater: { voltage: 5, current: 1.2 }, params: { mu: 3.95, ex: 1.4, kg1: 1550, kp: 65, kvb: 300 }, ratings: { plateVoltage: 450, plateDissipation: 36 } },
};
const tubeIds: Record<string, number> = {};

beforeAll(async () => {
  for (const [designation, k] of Object.entries(KOREN)) {
    let t = await TubeType.findOne({ where: { designation } });
    if (!t) {
      t = await TubeType.create({
        designation, family: 'triode', sections: k.sections, heater: k.heater, published: true, createdById: null,
        ratings: Object.fromEntries(Object.entries(k.ratings).map(([key, value]) => [key, { value, source: 'test fixture' }])),
      });
    }
    if (!(await TubeModel.findOne({ where: { tubeTypeId: t.id } }))) {
      await TubeModel.create({ tubeTypeId: t.id, name: 'Koren original', kind: 'koren-triode', parameters: k.params, source: 'K96', isDefault: true, published: true, curveFitId: null, createdById: null });
    }
    tubeIds[designation] = t.id;
  }
});

const preampBody = (over: Record<string, unknown> = {}) => ({
  name: 'V1a input',
  topology: 'common-cathode',
  tubeId: tubeIds['12AX7'],
  supply: 250,
  gridResistor: '1M',
  plateResistor: '100k',
  bias: { kind: 'cathode', cathodeResistor: '1k5', cathodeBypass: '22u' },
  drive: { amplitude: 0.5, frequency: 1000 },
  ...over,
});

async function newProject(name: string, supply?: unknown): Promise<ProjectDetail> {
  const r = await call(projectsRoute.POST, { as: 'designer', method: 'POST', body: { name, description: 'integration test', ...(supply ? { supply } : {}) } });
  expect(r.status, JSON.stringify(r.json)).toBe(201);
  return r.json.project;
}

async function addStage(projectId: number, body: Record<string, unknown>): Promise<StageDTO> {
  const r = await call(stagesRoute.POST, { as: 'designer', method: 'POST', params: { id: String(projectId) }, body });
  expect(r.status, JSON.stringify(r.json)).toBe(201);
  return r.json.stage;
}

describe('projects', () => {
  it('creates, lists, filters, renames and archives a project', async () => {
    const p = await newProject(`Bench amp ${Date.now()}`);
    expect(p.status).toBe('draft');
    expect(p.owner?.displayName).toBe('Tomas Ferreira');
    expect(p.stages).toEqual([]);
    expect(p.version).toBe(1);

    const list = await call(projectsRoute.GET, { as: 'technician', path: `/api/projects?search=${encodeURIComponent(p.name)}` });
    expect(list.status).toBe(200);
    expect(list.json.projects).toHaveLength(1);
    expect(list.json.projects[0]).toMatchObject({ id: p.id, stageCount: 0, ratingProblems: 0, status: 'draft' });

    const renamed = await call(projectRoute.PATCH, { as: 'designer', method: 'PATCH', params: { id: String(p.id) }, body: { version: 1, name: `${p.name} (rev)` } });
    expect(renamed.status).toBe(200);
    expect(renamed.json.project.version).toBe(2);

    const stale = await call(projectRoute.PATCH, { as: 'admin', method: 'PATCH', params: { id: String(p.id) }, body: { version: 1, description: 'late' } });
    expect(stale.status).toBe(409);
    expect(stale.json.error.details.current.version).toBe(2);

    const del = await call(projectRoute.DELETE, { as: 'designer', method: 'DELETE', params: { id: String(p.id) } });
    expect(del.status).toBe(204);
    const active = await call(projectsRoute.GET, { as: 'designer', path: `/api/projects?search=${encodeURIComponent(p.name)}` });
    expect(active.json.projects).toHaveLength(0);
    const archived = await call(projectsRoute.GET, { as: 'designer', path: `/api/projects?archived=true&search=${encodeURIComponent(p.name)}` });
    expect(archived.json.projects[0]).toMatchObject({ id: p.id, archived: true });
    const audit = await AuditEvent.findAll({ where: { projectId: p.id }, order: [['id', 'ASC']] });
    expect(audit.map((a) => a.action)).toEqual(['project.create', 'project.update', 'project.archive']);
  });

  it('refuses a bad name and a bad supply with field messages', async () => {
    const r = await call(projectsRoute.POST, { as: 'designer', method: 'POST', body: { name: '  ', supply: { rawVoltage: 'lots', nodes: [] } } });
    expect(r.status).toBe(422);
    expect(r.json.error.fieldErrors.name).toBeTruthy();
    expect(r.json.error.fieldErrors['supply.rawVoltage'][0]).toMatch(/not a number/);
  });
});

describe('stages', () => {
  it('saves a stage with its analysis, edits it with the version, and answers 409 on a stale save', async () => {
    const p = await newProject(`Stage test ${Date.now()}`);
    const stage = await addStage(p.id, preampBody());
    expect(stage.version).toBe(1);
    expect(stage.position).toBe(1);
    expect(stage.tubeDesignation).toBe('12AX7');
    expect(stage.inputs).toMatchObject({ topology: 'common-cathode', tubeId: tubeIds['12AX7'], plateResistor: 100000 });
    // 12AX7, 100 kΩ plate load, 1.5 kΩ cathode at 250 V: about 0.8–1 mA and a bypassed gain near 60 (common practice)
    expect(stage.analysis!.operatingPoint.plateCurrent).toBeGreaterThan(0.6e-3);
    expect(stage.analysis!.operatingPoint.plateCurrent).toBeLessThan(1.2e-3);
    expect(Math.abs(stage.analysis!.smallSignal.gain)).toBeGreaterThan(45);
    expect(stage.analysisError).toBeNull();

    const edited = await call(stageRoute.PATCH, { as: 'designer', method: 'PATCH', params: { id: String(stage.id) }, body: { version: 1, inputs: { plateResistor: '220k' } } });
    expect(edited.status, JSON.stringify(edited.json)).toBe(200);
    expect(edited.json.stage.version).toBe(2);
    expect(edited.json.stage.inputs.plateResistor).toBe(220000);
    expect(edited.json.stage.inputs.bias.cathodeResistor).toBe(1500); // shallow merge keeps the rest
    // a larger plate resistor lowers the idle current
    expect(edited.json.stage.analysis.operatingPoint.plateCurrent).toBeLessThan(stage.analysis!.operatingPoint.plateCurrent);

    const stale = await call(stageRoute.PATCH, { as: 'admin', method: 'PATCH', params: { id: String(stage.id) }, body: { version: 1, inputs: { plateResistor: '47k' } } });
    expect(stale.status).toBe(409);
    expect(stale.json.error.code).toBe('conflict');
    expect(stale.json.error.details.current.version).toBe(2);
    expect(stale.json.error.details.current.inputs.plateResistor).toBe(220000);
    const unchanged = await call(stageRoute.GET, { as: 'reviewer', params: { id: String(stage.id) } });
    expect(unchanged.json.stage.inputs.plateResistor).toBe(220000);

    const staleDelete = await call(stageRoute.DELETE, { as: 'designer', method: 'DELETE', path: `/api/stages/${stage.id}?version=1`, params: { id: String(stage.id) } });
    expect(staleDelete.status).toBe(409);
    const deleted = await call(stageRoute.DELETE, { as: 'designer', method: 'DELETE', path: `/api/stages/${stage.id}?version=2`, params: { id: String(stage.id) } });
    expect(deleted.status).toBe(204);
    const gone = await call(stageRoute.GET, { as: 'designer', params: { id: String(stage.id) } });
    expect(gone.status).toBe(404);
  });

  it('answers bad stage input with field messages keyed by path, never a 500', async () => {
    const p = await newProject(`Bad input ${Date.now()}`);
    const r = await call(stagesRoute.POST, { as: 'designer', method: 'POST', params: { id: String(p.id) }, body: preampBody({ bias: { kind: 'cathode', cathodeResistor: '4k7x' } }) });
    expect(r.status).toBe(422);
    expect(r.json.error.fieldErrors['bias.cathodeResistor'][0]).toMatch(/not a number/);
    const noTube = await call(stagesRoute.POST, { as: 'designer', method: 'POST', params: { id: String(p.id) }, body: preampBody({ tubeId: 99999999 }) });
    expect(noTube.status).toBe(422);
    expect(noTube.json.error.fieldErrors.tubeId).toBeTruthy();
    const patch = await call(stageRoute.PATCH, { as: 'designer', method: 'PATCH', params: { id: '999999' }, body: { version: 'one' } });
    expect(patch.status).toBe(422);
  });

  it('stores an engine error instead of refusing the save, and shows it', async () => {
    const p = await newProject(`Cut off ${Date.now()}`);
    const stage = await addStage(p.id, preampBody({ name: 'Cut off', bias: { kind: 'fixed', fixedBias: -20 } }));
    expect(stage.analysis).toBeNull();
    expect(stage.analysisError?.code).toBe('cutoff');
    const list = await call(projectsRoute.GET, { as: 'designer', path: `/api/projects?search=${encodeURIComponent(p.name)}` });
    expect(list.json.projects[0].ratingProblems).toBe(1);
  });

  it('keeps positions 1..n when inserting and moving, and a later edit reopens an approved project', async () => {
    const p = await newProject(`Order ${Date.now()}`);
    const a = await addStage(p.id, preampBody({ name: 'A' }));
    const b = await addStage(p.id, preampBody({ name: 'B' }));
    const c = await addStage(p.id, preampBody({ name: 'C', position: 1 }));
    let detail = (await call(projectRoute.GET, { as: 'designer', params: { id: String(p.id) } })).json.project as ProjectDetail;
    expect(detail.stages.map((s) => `${s.position}${s.name}`)).toEqual(['1C', '2A', '3B']);

    await Project.update({ status: 'approved' }, { where: { id: p.id } });
    const moved = await call(stageRoute.PATCH, { as: 'designer', method: 'PATCH', params: { id: String(c.id) }, body: { version: c.version, position: 3 } });
    expect(moved.status).toBe(200);
    detail = (await call(projectRoute.GET, { as: 'designer', params: { id: String(p.id) } })).json.project;
    expect(detail.stages.map((s) => `${s.position}${s.name}`)).toEqual(['1A', '2B', '3C']);
    expect(detail.status).toBe('draft');
    const audit = await AuditEvent.findOne({ where: { projectId: p.id, action: 'stage.update' }, order: [['id', 'DESC']] });
    expect(audit?.details).toMatchObject({ reopenedFrom: 'approved', fields: ['position'] });
    expect([a.id, b.id]).toEqual(detail.stages.slice(0, 2).map((s) => s.id));
  });
});

describe('POST /api/analyze', () => {
  it('analyses a library tube or an inline tube, and reports bad fields by dotted path', async () => {
    const { name: _n, ...body } = preampBody();
    const lib = await call(analyzeRoute.POST, { as: 'technician', method: 'POST', body });
    expect(lib.status, JSON.stringify(lib.json)).toBe(200);
    expect(lib.json.analysis.operatingPoint.plateCurrent).toBeGreaterThan(0.6e-3);
    const bad = await call(analyzeRoute.POST, { as: 'designer', method: 'POST', body: { ...body, bias: { kind: 'cathode', cathodeResistor: -5 } } });
    expect(bad.status).toBe(422);
    expect(Object.keys(bad.json.error.fieldErrors)).toContain('bias.cathodeResistor');
    const cut = await call(analyzeRoute.POST, { as: 'designer', method: 'POST', body: { ...body, bias: { kind: 'fixed', fixedBias: -20 } } });
    expect(cut.status).toBe(422);
    expect(cut.json.error.code).toBe('calc_cutoff');
  });
});

describe('chain, curves and report', () => {
  const supply = {
    rawVoltage: 440,
    sourceResistance: 60,
    nodes: [
      { key: 'B+1', name: 'Output', droppingResistor: 90, filterCapacitor: '100u' },
      { key: 'B+2', name: 'Driver', droppingResistor: '10k', filterCapacitor: '47u' },
    ],
    heaters: [
      { key: 'H1', name: '6.3 V', voltage: 6.3 },
      { key: 'H2', name: '5 V filament', voltage: 5 },
    ],
  };
  let project: ProjectDetail;
  let driver: StageDTO;
  let output: StageDTO;

  beforeAll(async () => {
    project = await newProject(`SE chain ${Date.now()}`, supply);
    driver = await addStage(project.id, preampBody({ name: 'Driver', supply: 330, supplyNode: 'B+2' }));
    output = await addStage(project.id, {
      name: 'Output 300B', topology: 'single-ended-output', tubeId: tubeIds['300B'], supplyNode: 'B+1', supply: 420, gridResistor: '220k',
      primaryImpedance: '3k5', primaryResistance: 120, bias: { kind: 'cathode', cathodeResistor: '1k', cathodeBypass: '100u' }, drive: { amplitude: 40, frequency: 1000 },
    });
  });

  it('solves the supply with the stages’ currents until they agree, and Kirchhoff holds at each node', async () => {
    const r = await call(chainRoute.GET, { as: 'reviewer', path: `/api/projects/${project.id}/chain?input=50m`, params: { id: String(project.id) } });
    expect(r.status, JSON.stringify(r.json)).toBe(200);
    const chain = r.json.chain as ChainResult;
    expect(chain.inputRms).toBeCloseTo(0.05, 12);
    expect(chain.supply?.converged).toBe(true);
    const [b1, b2] = chain.supply!.nodes;
    const [d, o] = chain.stages;
    // KCL: B+1 carries the 300B plus everything passed on to B+2; B+2 carries the driver only.
    expect(b2!.currentIn).toBeCloseTo(d!.supplyCurrent!, 9);
    expect(b1!.currentIn).toBeCloseTo(o!.supplyCurrent! + d!.supplyCurrent!, 9);
    // KVL across source and resistors, to the solver's 0.01 V
    expect(Math.abs(440 - (60 + 90) * b1!.currentIn - b1!.voltage)).toBeLessThan(0.01);
    expect(Math.abs(b1!.voltage - 10000 * b2!.currentIn - b2!.voltage)).toBeLessThan(0.01);
    expect(o!.solvedSupply).toBeCloseTo(b1!.voltage, 9);
    expect(o!.assumedSupply).toBe(420);
    // the 300B draws tens of mA (typical 60 mA class, tube-models.md §4.1 [M])
    expect(o!.supplyCurrent!).toBeGreaterThan(0.03);
    // heater totals: a 12AX7 section is half of a 0.3 A envelope at 6.3 V; the 300B filament 1.2 A at 5 V
    expect(chain.heaters.find((h) => h.key === 'H1')!.current).toBeCloseTo(0.15, 9);
    expect(chain.heaters.find((h) => h.key === 'H2')!.current).toBeCloseTo(1.2, 9);
    // the 300B's grid sees the driver's solved output (end to end, through the coupling capacitor at 1 kHz), and
    // the driver, loaded by the 300B's 220 kΩ grid resistor, gives less than its unloaded gain would project
    expect(Math.abs(chain.stages[1]!.inputRms! / d!.outputRms! - 1)).toBeLessThan(0.005);
    expect(chain.stages[1]!.inputRms!).toBeLessThan(0.05 * Math.abs(d!.gain!));
    expect(chain.firstClip).not.toBeNull();

    const bad = await call(chainRoute.GET, { as: 'reviewer', path: `/api/projects/${project.id}/chain?input=loud`, params: { id: String(project.id) } });
    expect(bad.status).toBe(422);
    expect(bad.json.error.fieldErrors.input).toBeTruthy();
  });

  it('refuses to remove a supply node a stage still draws from', async () => {
    const r = await call(projectRoute.PATCH, { as: 'designer', method: 'PATCH', params: { id: String(project.id) }, body: { version: project.version, supply: { ...supply, nodes: supply.nodes.slice(0, 1) } } });
    expect(r.status).toBe(422);
    expect(r.json.error.message).toMatch(/Driver \(B\+2\)/);
  });

  it('gives CSV of the plotted curves, with the same columns and figures as the stage editor downloads', async () => {
    const editor = await import('@/components/stage-editor/plot-panel');
    for (const kind of ['plate', 'transfer', 'response', 'waveform', 'spectrum'] as const) {
      const r = await call(curvesRoute.GET, { as: 'technician', path: `/api/stages/${driver.id}/curves?kind=${kind}`, params: { id: String(driver.id) } });
      expect(r.status).toBe(200);
      expect(r.res.headers.get('content-type')).toMatch(/text\/csv/);
      const lines = (await r.res.text()).trim().split('\n');
      expect(lines.length).toBeGreaterThan(kind === 'spectrum' ? 3 : 10);
      const cols = lines[0]!.split(',').length;
      expect(lines.every((l) => l.split(',').length === cols)).toBe(true);
      if (kind === 'response') expect(lines[0]).toBe('frequency_Hz,magnitude_dB,phase_deg');
      if (kind === 'plate') expect(lines.some((l) => l.startsWith('operating point,'))).toBe(true);
      if (kind === 'plate') expect(lines[0]).toBe('series,grid_voltage_V,plate_voltage_V,plate_current_A');
      const fromEditor = kind === 'plate' ? editor.plateCsv(driver.analysis!) : editor.secondaryCsv(driver.analysis!, kind);
      expect(fromEditor.text.trim().split('\n')).toEqual(lines);
    }
    const bad = await call(curvesRoute.GET, { as: 'technician', path: `/api/stages/${driver.id}/curves?kind=smith`, params: { id: String(driver.id) } });
    expect(bad.status).toBe(422);
  });

  it('renders a PDF report that holds the project name and the stage results', async () => {
    const r = await call(reportRoute.GET, { as: 'reviewer', params: { id: String(project.id) } });
    expect(r.status).toBe(200);
    expect(r.res.headers.get('content-type')).toBe('application/pdf');
    const buf = Buffer.from(await r.res.arrayBuffer());
    expect(buf.subarray(0, 5).toString()).toBe('%PDF-');
    const text = (await new PDFParse({ data: new Uint8Array(buf) }).getText()).text;
    expect(text).toContain(project.name);
    expect(text).toContain('Output 300B');
    expect(text).toContain('Driver');
    expect(text).toContain(output.analysis!.smallSignal.gain.toFixed(2));
    expect(text).toContain('Lethal voltages');
    expect(text).toMatch(/Signal chain at 100 mV rms input/);
  });

  it('renders from a plain ProjectDetail with a revision stamp, without the database', async () => {
    const detail = (await call(projectRoute.GET, { as: 'designer', params: { id: String(project.id) } })).json.project as ProjectDetail;
    const plain = JSON.parse(JSON.stringify(detail)) as ProjectDetail;
    const buf = await renderReportPdf(plain, { revision: { number: 3, contentHash: 'abc123def456', state: 'submitted' } });
    const text = (await new PDFParse({ data: new Uint8Array(buf) }).getText()).text;
    expect(text).toContain('Revision 3 (submitted)');
    expect(text).toContain('abc123def456');
    expect(text).toContain('Plate dissipation');
  });
});
