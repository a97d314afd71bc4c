import 'server-only';
import { Op } from 'sequelize';
import { ApiError } from '@/lib/api/errors';
import { analyzeStage, CalcError, type StageInput } from '@/lib/calc';
import { fitsTopology, getPath, prepareSearch, type SwapCandidate } from '@/lib/calc/explore';
import { resolveTolerances } from '@/lib/calc/bench';
import { sequelize } from '@/lib/db';
import { recordAudit } from '@/lib/db/audit';
import { env } from '@/lib/env';
import { queue } from '@/lib/jobs/queue';
import { chainStagesFor, getProject } from '@/lib/projects/service';
import { contentHash } from '@/lib/review/hash';
import { engineInputFor, getStage } from '@/lib/stages/service';
import { engineTubeFrom } from '@/lib/tubes/service';
import type { CreateExploreRun } from '@/lib/validation/explore';
import { stageBodySchema } from '@/lib/validation/stage';
import { ExploreRun, TubeModel, TubeType } from '@/models';
import type { ExploreRunKind, ExploreRunStatus } from '@/models/explore-run';
import { digestOf, type ToleranceDigest } from './digest';
import type { ExploreSetup } from './execute';
import { EXPLORE_QUEUE, EXPLORE_QUEUES } from './queue-names';

export type { ToleranceDigest } from './digest';

export type ExploreRunDTO = {
  id: number;
  kind: ExploreRunKind;
  scope: 'stage' | 'chain';
  projectId: number;
  stageId: number | null;
  designVersion: number;
  designHash: string;
  /** true when the stage (or project) has not changed since the run was made */
  current: boolean | null;
  params: Record<string, unknown>;
  status: ExploreRunStatus;
  cancelRequested: boolean;
  progress: { done: number; total: number };
  attempt: number;
  worker: string | null;
  createdBy: number;
  createdAt: string;
  startedAt: string | null;
  finishedAt: string | null;
  elapsedMs: number | null;
  result: Record<string, unknown> | null;
  error: { code: string; message: string } | null;
};

function toDTO(r: ExploreRun, currentVersion: number | null, withResult = true): ExploreRunDTO {
  return {
    id: r.id,
    kind: r.kind,
    scope: r.scope,
    projectId: r.projectId,
    stageId: r.stageId,
    designVersion: r.designVersion,
    designHash: r.designHash,
    current: currentVersion === null ? null : currentVersion === r.designVersion,
    params: r.params,
    status: r.status,
    cancelRequested: r.cancelRequested,
    progress: { done: r.progressDone, total: r.progressTotal },
    attempt: r.attempt,
    worker: r.worker,
    createdBy: r.createdBy,
    createdAt: r.createdAt.toISOString(),
    startedAt: r.startedAt?.toISOString() ?? null,
    finishedAt: r.finishedAt?.toISOString() ?? null,
    elapsedMs: r.elapsedMs,
    result: withResult ? r.result : null,
    error: r.error,
  };
}

const HEATER_TOLERANCE = 0.05;
const familyGroup = (f: string) => (f === 'triode' ? 'triode' : 'pentode');

/** Library types that could take the stage's place: same family group, heater voltage and number of sections where known. */
async function swapCandidates(tubeTypeId: number, input: StageInput): Promise<SwapCandidate[]> {
  const own = await TubeType.findByPk(tubeTypeId);
  if (!own) throw new ApiError('not_found', 'The stage’s tube type no longer exists.');
  const types = await TubeType.findAll({ where: { retired: false }, order: [['designation', 'ASC']] });
  const models = await TubeModel.findAll({ where: { tubeTypeId: { [Op.in]: types.map((t) => t.id) } }, order: [['isDefault', 'DESC'], ['id', 'ASC']] });
  const out: SwapCandidate[] = [];
  for (const t of types) {
    if (familyGroup(t.family) !== familyGroup(own.family)) continue;
    const hv = t.heater?.voltage;
    const ov = own.heater?.voltage;
    if (typeof hv === 'number' && typeof ov === 'number' && Math.abs(hv - ov) > HEATER_TOLERANCE * ov) continue;
    if (t.sections && own.sections && t.sections !== own.sections) continue;
    const model = models.find((m) => m.tubeTypeId === t.id);
    if (!model) continue;
    const tube = t.id === tubeTypeId ? input.tube : engineTubeFrom(t, model);
    if (!fitsTopology(input, tube)) continue;
    out.push({ tubeId: t.id, designation: t.designation, tube });
  }
  if (!out.some((c) => c.tubeId === tubeTypeId)) out.unshift({ tubeId: tubeTypeId, designation: own.designation, tube: input.tube });
  return out;
}

function calcToApi(err: unknown, field: string): never {
  if (err instanceof CalcError) throw new ApiError('unprocessable_entity', err.message, { fieldErrors: { [field]: [err.message] } });
  throw err;
}

async function send(runId: number): Promise<string | null> {
  const boss = await queue(env.DATABASE_URL, 'app', EXPLORE_QUEUES);
  return boss.send(EXPLORE_QUEUE, { runId });
}

/** Stores the request with the engine input it is made for, and queues it. */
export async function createRun(actorId: number, body: CreateExploreRun): Promise<ExploreRunDTO> {
  let setup: ExploreSetup;
  let projectId: number;
  let stageId: number | null = null;
  let designVersion: number;
  let hashOf: unknown;
  let total = 0;
  if (body.target.stageId !== undefined) {
    const stage = await getStage(body.target.stageId);
    const project = await getProject(stage.projectId);
    const input = await engineInputFor(stageBodySchema.parse(stage.inputs), stage.tubeModelId);
    try {
      analyzeStage(input, { quick: true });
    } catch (err) {
      calcToApi(err, 'target.stageId');
    }
    projectId = stage.projectId;
    stageId = stage.id;
    designVersion = stage.version;
    hashOf = input;
    if (body.kind === 'tolerance') {
      for (const path of Object.keys(body.options.parts ?? {})) {
        if (typeof getPath(input, path) !== 'number') throw new ApiError('unprocessable_entity', `The stage has no part '${path}'.`, { fieldErrors: { [`options.parts.${path}`]: ['no such part in this stage'] } });
      }
      const bench = resolveTolerances(project.benchTolerances);
      const benchTolerances = Object.fromEntries(Object.entries(bench).map(([k, v]) => [k, v.value]));
      setup = { kind: 'tolerance', scope: 'stage', input, options: { ...body.options, seed: body.options.seed ?? Math.floor(Math.random() * 2 ** 31), benchTolerances } };
      total = body.options.trials;
    } else if (body.kind === 'swap') {
      const candidates = await swapCandidates(stage.tubeTypeId, input);
      setup = { kind: 'swap', scope: 'stage', input, candidates, currentTubeId: stage.tubeTypeId };
      total = candidates.length;
    } else {
      const spec = { input, ...body.options, outputLevel: body.options.outputLevel ?? null, seed: body.options.seed ?? 1 };
      try {
        const s = prepareSearch(spec);
        total = Math.min(s.size, spec.maxEvaluations);
      } catch (err) {
        calcToApi(err, 'options.free');
      }
      setup = { kind: 'search', scope: 'stage', spec };
    }
  } else {
    if (body.kind !== 'tolerance') throw new ApiError('unprocessable_entity', 'Tube swaps and part searches are made for one stage.', { fieldErrors: { 'target.projectId': ['choose a stage'] } });
    const project = await getProject(body.target.projectId as number);
    const stages = await chainStagesFor(project);
    if (!stages.some((s) => s.input)) throw new ApiError('unprocessable_entity', 'No stage of this project can be analysed.', { fieldErrors: { 'target.projectId': ['no stage to analyse'] } });
    projectId = project.id;
    designVersion = project.version;
    hashOf = { stages: stages.map((s) => ({ id: s.id, input: s.input })), supply: project.supply };
    setup = { kind: 'tolerance', scope: 'chain', stages, supply: project.supply, options: { ...body.options, seed: body.options.seed ?? Math.floor(Math.random() * 2 ** 31) } };
    total = body.options.trials;
  }
  const params = 'options' in body ? (body.options as Record<string, unknown>) : {};
  const run = await sequelize.transaction(async (transaction) => {
    const r = await ExploreRun.create(
      {
        kind: body.kind,
        scope: stageId === null ? 'chain' : 'stage',
        projectId,
        stageId,
        designVersion,
        designHash: contentHash(hashOf),
        params: { ...params, ...('options' in setup ? { seed: (setup.options as { seed?: number }).seed } : {}) },
        setup: setup as unknown as Record<string, unknown>,
        progressTotal: total,
        jobId: null,
        worker: null,
        heartbeatAt: null,
        startedAt: null,
        finishedAt: null,
        elapsedMs: null,
        result: null,
        error: null,
        createdBy: actorId,
      },
      { transaction },
    );
    await recordAudit(transaction, { actorId, action: 'explore.run.create', targetType: 'explore_run', targetId: r.id, projectId, details: { kind: body.kind, stageId } });
    return r;
  });
  const jobId = await send(run.id);
  if (jobId) await run.update({ jobId });
  return toDTO(run, designVersion);
}

async function currentVersionOf(r: ExploreRun): Promise<number | null> {
  if (r.stageId !== null) {
    const s = await getStage(r.stageId).catch(() => null);
    return s?.version ?? null;
  }
  const p = await getProject(r.projectId).catch(() => null);
  return p?.version ?? null;
}

export async function getRun(id: number): Promise<ExploreRunDTO> {
  const r = await ExploreRun.findByPk(id);
  if (!r) throw new ApiError('not_found', 'No such exploration run.');
  return toDTO(r, await currentVersionOf(r));
}

/** Runs of a stage or a project (newest first, without results). */
export async function listRuns(q: { stageId?: number; projectId?: number; kind?: ExploreRunKind }): Promise<ExploreRunDTO[]> {
  const where: Record<string, unknown> = {};
  if (q.stageId !== undefined) where.stageId = q.stageId;
  if (q.projectId !== undefined) where.projectId = q.projectId;
  if (q.stageId === undefined && q.projectId !== undefined) where.scope = 'chain';
  if (q.kind) where.kind = q.kind;
  const rows = await ExploreRun.findAll({ where, order: [['createdAt', 'DESC']], limit: 50, attributes: { exclude: ['setup', 'result'] } });
  return rows.map((r) => toDTO(r, null, false));
}

export async function cancelRun(actorId: number, id: number): Promise<ExploreRunDTO> {
  const r = await sequelize.transaction(async (transaction) => {
    const run = await ExploreRun.findByPk(id, { transaction, lock: transaction.LOCK.UPDATE });
    if (!run) throw new ApiError('not_found', 'No such exploration run.');
    if (run.status === 'completed' || run.status === 'failed' || run.status === 'cancelled') {
      throw new ApiError('conflict', `The run has already ${run.status === 'cancelled' ? 'been cancelled' : run.status === 'failed' ? 'failed' : 'completed'}.`);
    }
    // a queued run is cancelled at once; a running one when its worker next beats (within about a second)
    await run.update(run.status === 'queued' ? { cancelRequested: true, status: 'cancelled', finishedAt: new Date() } : { cancelRequested: true }, { transaction });
    await recordAudit(transaction, { actorId, action: 'explore.run.cancel', targetType: 'explore_run', targetId: run.id, projectId: run.projectId });
    return run;
  });
  if (r.status === 'cancelled' && r.jobId) {
    const boss = await queue(env.DATABASE_URL, 'app', EXPLORE_QUEUES);
    await boss.cancel(EXPLORE_QUEUE, r.jobId).catch(() => undefined);
  }
  return toDTO(r, null);
}

/** The latest completed tolerance run of each stage for the given stage versions (a revision's or the current ones). */
export async function toleranceDigests(stages: { id: number; version: number }[]): Promise<ToleranceDigest[]> {
  if (stages.length === 0) return [];
  const rows = await ExploreRun.findAll({
    where: { kind: 'tolerance', scope: 'stage', status: 'completed', stageId: { [Op.in]: stages.map((s) => s.id) } },
    order: [['finishedAt', 'DESC']],
  });
  const out: ToleranceDigest[] = [];
  for (const s of stages) {
    const r = rows.find((x) => x.stageId === s.id && x.designVersion === s.version);
    const summary = (r?.result as { summary?: import('@/lib/calc/explore').ToleranceSummary } | null)?.summary;
    if (!r || !summary) continue;
    out.push(digestOf(r.id, r.stageId, r.finishedAt?.toISOString() ?? null, summary));
  }
  return out;
}
