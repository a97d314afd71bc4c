import 'server-only';
import { QueryTypes, type Transaction } from 'sequelize';
import { ApiError } from '@/lib/api/errors';
import { analyzeStage, CalcError, type StageAnalysis, type StageInput } from '@/lib/calc';
import { stageBodySchema, stageInputSchema, type StageBody } from '@/lib/validation/stage';
import type { CreateStageInput, UpdateStageInput } from '@/lib/validation/project';
import { createStageSchema, updateStageSchema } from '@/lib/validation/project';
import { Project, Stage, TubeType } from '@/models';
import { recordAudit } from '@/lib/db/audit';
import { sequelize } from '@/lib/db';
import { getEngineTube } from '@/lib/tubes/service';
import { flatten } from '@/lib/review/diff';
import { MAX_STAGES_PER_PROJECT } from './limits';

export type StageDTO = {
  id: number;
  projectId: number;
  position: number;
  name: string;
  topology: StageBody['topology'];
  tubeTypeId: number;
  tubeModelId: number | null;
  tubeDesignation: string;
  supplyNode: string | null;
  /** the stage body: engine inputs with tubeId in place of the tube (stageBodySchema output) */
  inputs: StageBody;
  version: number;
  analysis: StageAnalysis | null;
  analysisError: { code: string; message: string } | null;
  updatedAt: string;
};

export function toStageDTO(s: Stage, designation: string): StageDTO {
  return {
    id: s.id,
    projectId: s.projectId,
    position: s.position,
    name: s.name,
    topology: s.topology as StageBody['topology'],
    tubeTypeId: s.tubeTypeId,
    tubeModelId: s.tubeModelId,
    tubeDesignation: designation,
    supplyNode: s.supplyNode,
    inputs: s.inputs as unknown as StageBody,
    version: s.version,
    analysis: (s.analysis as unknown as StageAnalysis | null) ?? null,
    analysisError: (s.analysisError as { code: string; message: string } | null) ?? null,
    updatedAt: s.updatedAt.toISOString(),
  };
}

async function designations(ids: number[], transaction?: Transaction): Promise<Map<number, string>> {
  if (ids.length === 0) return new Map();
  const rows = await TubeType.findAll({ where: { id: [...new Set(ids)] }, attributes: ['id', 'designation'], transaction });
  return new Map(rows.map((t) => [t.id, t.designation]));
}

/** Inside a transaction, pass it: a request never waits for a second pooled connection while holding one. */
export async function stageDTOs(stages: Stage[], transaction?: Transaction): Promise<StageDTO[]> {
  const names = await designations(stages.map((s) => s.tubeTypeId), transaction);
  return stages.map((s) => toStageDTO(s, names.get(s.tubeTypeId) ?? '?'));
}

const TOPOLOGY_WORDS: Record<string, string> = {
  'common-cathode': 'common-cathode stage',
  'cathode-follower': 'cathode follower',
  'pentode-amplifier': 'pentode amplifier',
  'single-ended-output': 'single-ended output stage',
  'push-pull-output': 'push-pull output stage',
  'long-tailed-pair': 'long-tailed pair',
  'split-load': 'split-load splitter',
};

/**
 * The engine input of a stage body: the library tube (default model unless one is chosen) in place of tubeId.
 * A tube that is unknown, has no model, or does not suit the topology is a 422 on `tubeId`.
 */
export async function engineInputFor(body: StageBody, tubeModelId?: number | null, transaction?: Transaction): Promise<StageInput> {
  let tube;
  try {
    tube = await getEngineTube(body.tubeId, tubeModelId ?? undefined, transaction);
  } catch (err) {
    if (err instanceof ApiError && (err.code === 'not_found' || err.code === 'unprocessable_entity')) {
      const field = err.message.includes('Model') && tubeModelId ? 'tubeModelId' : 'tubeId';
      throw new ApiError('unprocessable_entity', err.message, { fieldErrors: { [field]: [err.message] } });
    }
    throw err;
  }
  const { tubeId: _omit, ...rest } = body;
  const parsed = stageInputSchema.safeParse({ ...rest, tube });
  if (!parsed.success) {
    const tubeIssue = parsed.error.issues.find((i) => i.path[0] === 'tube');
    if (tubeIssue) {
      const message = `A ${TOPOLOGY_WORDS[body.topology] ?? body.topology} needs a ${body.topology === 'pentode-amplifier' ? 'pentode or beam tetrode' : 'suitable'} model; ${tube.name ?? 'this tube'} is a ${tube.model === 'koren-pentode' ? 'pentode' : 'triode'} model.`;
      throw new ApiError('unprocessable_entity', message, { fieldErrors: { tubeId: [message] } });
    }
    throw parsed.error;
  }
  return parsed.data;
}

/** Analyses for storage: a CalcError does not block saving; it is kept as analysisError and shown. */
export function analyseForStorage(input: StageInput): { analysis: StageAnalysis | null; analysisError: { code: string; message: string } | null } {
  try {
    return { analysis: analyzeStage(input), analysisError: null };
  } catch (err) {
    if (err instanceof CalcError) return { analysis: null, analysisError: { code: err.code, message: err.message } };
    console.error('[stages] engine failed', err);
    return { analysis: null, analysisError: { code: 'no-solution', message: 'The engine could not analyse this stage.' } };
  }
}

/** "A later edit starts a new draft": any edit to a project or its stages reopens it, in the same transaction. */
export async function reopenProject(transaction: Transaction, projectId: number): Promise<{ from: string } | null> {
  const [rows] = (await sequelize.query(
    `UPDATE projects p SET status = 'draft', updated_at = now()
       FROM (SELECT id, status FROM projects WHERE id = :projectId FOR UPDATE) old
      WHERE p.id = old.id RETURNING old.status AS from`,
    { replacements: { projectId }, transaction },
  )) as [{ from: string }[], unknown];
  const from = rows[0]?.from;
  return from && from !== 'draft' ? { from } : null;
}

/** Positions are 1..n in chain order; moves a stage (or makes room) and renumbers. */
async function renumber(transaction: Transaction, projectId: number, moved?: { id: number; to: number }) {
  const rows = await sequelize.query<{ id: number; position: number }>(
    'SELECT id, position FROM stages WHERE project_id = :projectId ORDER BY position, id',
    { type: QueryTypes.SELECT, replacements: { projectId }, transaction },
  );
  const order = rows.filter((r) => r.id !== moved?.id);
  if (moved) order.splice(Math.max(0, Math.min(order.length, moved.to - 1)), 0, { id: moved.id, position: 0 });
  for (const [i, r] of order.entries()) {
    const want = i + 1;
    const was = rows.find((x) => x.id === r.id)?.position;
    if (was !== want) await sequelize.query('UPDATE stages SET position = :want WHERE id = :id', { replacements: { want, id: r.id }, transaction });
  }
}

async function lockProject(transaction: Transaction, projectId: number) {
  const project = await Project.findByPk(projectId, { transaction, lock: transaction.LOCK.UPDATE });
  if (!project) throw new ApiError('not_found', 'No such project.');
  if (project.archived) throw new ApiError('conflict', 'This project is archived; restore it before changing its stages.');
  return project;
}

export async function getStage(id: number): Promise<StageDTO> {
  const stage = await Stage.findByPk(id);
  if (!stage) throw new ApiError('not_found', 'No such stage.');
  return (await stageDTOs([stage]))[0]!;
}

export async function createStage(actorId: number, projectId: number, raw: CreateStageInput): Promise<StageDTO> {
  const data = createStageSchema.parse(raw);
  const { name, supplyNode, position, tubeModelId, ...bodyFields } = data;
  const body = stageBodySchema.parse(bodyFields);
  const input = await engineInputFor(body, tubeModelId);
  const result = analyseForStorage(input);
  const stage = await sequelize.transaction(async (transaction) => {
    await lockProject(transaction, projectId);
    const count = await Stage.count({ where: { projectId }, transaction });
    if (count >= MAX_STAGES_PER_PROJECT) {
      throw new ApiError('unprocessable_entity', `A project holds at most ${MAX_STAGES_PER_PROJECT} stages; this one is full. Start a new project for further stages.`);
    }
    const at = position && position <= count ? position : count + 1;
    const created = await Stage.create(
      {
        projectId,
        position: count + 1,
        name,
        topology: body.topology,
        tubeTypeId: body.tubeId,
        tubeModelId: tubeModelId ?? null,
        supplyNode: supplyNode ?? null,
        inputs: body as unknown as Record<string, unknown>,
        analysis: result.analysis as unknown as Record<string, unknown> | null,
        analysisError: result.analysisError,
      },
      { transaction },
    );
    if (at !== count + 1) await renumber(transaction, projectId, { id: created.id, to: at });
    const reopened = await reopenProject(transaction, projectId);
    await recordAudit(transaction, {
      actorId,
      action: 'stage.create',
      targetType: 'stage',
      targetId: created.id,
      projectId,
      details: { name, topology: body.topology, tubeTypeId: body.tubeId, ...(reopened ? { reopenedFrom: reopened.from } : {}) },
    });
    await created.reload({ transaction });
    return created;
  });
  return (await stageDTOs([stage]))[0]!;
}

/** Dotted paths of the input values that differ (`bias.cathodeResistor`), compared leaf by leaf. */
function changedInputPaths(before: unknown, after: unknown): string[] {
  const b = flatten(before);
  const a = flatten(after);
  return [...new Set([...Object.keys(b), ...Object.keys(a)])].filter((k) => JSON.stringify(b[k]) !== JSON.stringify(a[k])).sort();
}

function staleStage(current: StageDTO): ApiError {
  return new ApiError('conflict', `Someone else saved this stage since you opened it (now version ${current.version}). Reload to see their changes; what you typed is kept.`, {
    details: { current },
  });
}

export async function updateStage(actorId: number, id: number, raw: UpdateStageInput): Promise<StageDTO> {
  const patch = updateStageSchema.parse(raw);
  const updated = await sequelize.transaction(async (transaction) => {
    const stage = await Stage.findByPk(id, { transaction, lock: transaction.LOCK.UPDATE });
    if (!stage) throw new ApiError('not_found', 'No such stage.');
    if (stage.version !== patch.version) throw staleStage((await stageDTOs([stage], transaction))[0]!);
    await lockProject(transaction, stage.projectId);

    // Only real changes are saved and audited: a save with nothing different keeps the version and writes no row,
    // and the audit row names the input fields (dotted paths) whose values differ.
    const changes: Partial<Stage> & Record<string, unknown> = {};
    const changed: string[] = [];
    let body = stage.inputs as unknown as StageBody;
    let tubeModelId = stage.tubeModelId;
    if (patch.inputs) {
      const next = stageBodySchema.parse({ ...(stage.inputs as Record<string, unknown>), ...patch.inputs });
      const paths = changedInputPaths(stage.inputs, next);
      if (paths.length) {
        body = next;
        if (body.tubeId !== stage.tubeTypeId && patch.tubeModelId === undefined) tubeModelId = null;
        changes.inputs = body as unknown as Record<string, unknown>;
        changes.topology = body.topology;
        changes.tubeTypeId = body.tubeId;
        changed.push(...paths);
      }
    }
    if (patch.tubeModelId !== undefined && patch.tubeModelId !== stage.tubeModelId) {
      tubeModelId = patch.tubeModelId;
      changed.push('tubeModelId');
    }
    if (changes.inputs || tubeModelId !== stage.tubeModelId) {
      changes.tubeModelId = tubeModelId;
      const result = analyseForStorage(await engineInputFor(body, tubeModelId, transaction));
      changes.analysis = result.analysis as unknown as Record<string, unknown> | null;
      changes.analysisError = result.analysisError;
    }
    if (patch.name !== undefined && patch.name !== stage.name) {
      changes.name = patch.name;
      changed.push('name');
    }
    if (patch.supplyNode !== undefined && patch.supplyNode !== stage.supplyNode) {
      changes.supplyNode = patch.supplyNode;
      changed.push('supplyNode');
    }
    const moves = patch.position !== undefined && patch.position !== stage.position;
    if (changed.length === 0 && !moves) return stage;
    await stage.update({ ...changes, version: stage.version + 1 }, { transaction });
    if (moves) {
      await renumber(transaction, stage.projectId, { id: stage.id, to: patch.position! });
      changed.push('position');
    }
    const reopened = await reopenProject(transaction, stage.projectId);
    await recordAudit(transaction, {
      actorId,
      action: 'stage.update',
      targetType: 'stage',
      targetId: stage.id,
      projectId: stage.projectId,
      details: { fields: [...new Set(changed)], version: stage.version, ...(reopened ? { reopenedFrom: reopened.from } : {}) },
    });
    await stage.reload({ transaction });
    return stage;
  });
  return (await stageDTOs([updated]))[0]!;
}

export async function deleteStage(actorId: number, id: number, version: number): Promise<void> {
  await sequelize.transaction(async (transaction) => {
    const stage = await Stage.findByPk(id, { transaction, lock: transaction.LOCK.UPDATE });
    if (!stage) throw new ApiError('not_found', 'No such stage.');
    if (stage.version !== version) throw staleStage((await stageDTOs([stage], transaction))[0]!);
    await lockProject(transaction, stage.projectId);
    await stage.destroy({ transaction });
    await renumber(transaction, stage.projectId);
    const reopened = await reopenProject(transaction, stage.projectId);
    await recordAudit(transaction, {
      actorId,
      action: 'stage.delete',
      targetType: 'stage',
      targetId: id,
      projectId: stage.projectId,
      details: { name: stage.name, version, ...(reopened ? { reopenedFrom: reopened.from } : {}) },
    });
  });
}
