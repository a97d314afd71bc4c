import 'server-only';
import { Op, QueryTypes, type Transaction } from 'sequelize';
import { ApiError } from '@/lib/api/errors';
import type { ChainStage } from '@/lib/calc/chain';
import { circuitNodes } from '@/lib/calc/supply/ladder';
import { stageBodySchema, type StageBody } from '@/lib/validation/stage';
import {
  createProjectSchema,
  updateProjectSchema,
  type CreateProjectInput,
  type ListProjectsQuery,
  type ProjectStatus,
  type UpdateProjectInput,
} from '@/lib/validation/project';
import { Project, ProjectWatcher, Stage, TubeType, User } from '@/models';
import type { ProjectSupplyCircuitRecord, ProjectSupplyRecord } from '@/models/types';
import type { Role } from '@/models/user';
import { recordAudit } from '@/lib/db/audit';
import { sequelize } from '@/lib/db';
import { engineInputFor, stageDTOs, type StageDTO } from '@/lib/stages/service';

export type { StageDTO } from '@/lib/stages/service';
import type { ChainLink } from '@/lib/calc/chain/input';

export type ProjectDetail = {
  id: number;
  name: string;
  description: string;
  status: ProjectStatus;
  archived: boolean;
  version: number;
  owner: { id: number; displayName: string } | null;
  watchers: { id: number; displayName: string }[];
  supply: ProjectSupplyRecord;
  /** the supply as a circuit (null: the resistor ladder in `supply`) */
  supplyCircuit: ProjectSupplyCircuitRecord | null;
  /** how the stages are joined (null: capacitor coupling in stage order) */
  chainLinks: ChainLink[] | null;
  benchTolerances: Record<string, number>;
  updatedAt: string;
  stages: StageDTO[];
};

export type ProjectListRow = {
  id: number;
  name: string;
  status: ProjectStatus;
  archived: boolean;
  owner: { id: number; displayName: string } | null;
  updatedAt: string;
  stageCount: number;
  /** stages with a rating over its limit or that could not be analysed */
  ratingProblems: number;
};

export async function listProjects(query: Partial<ListProjectsQuery> = {}): Promise<ProjectListRow[]> {
  const where: string[] = [];
  const replacements: Record<string, unknown> = {};
  const archived = query.archived ?? 'false';
  if (archived !== 'all') {
    where.push('p.archived = :archived');
    replacements.archived = archived === 'true';
  }
  if (query.status) {
    where.push('p.status = :status');
    replacements.status = query.status;
  }
  if (query.search) {
    where.push(`(p.name ILIKE :like ESCAPE '\\' OR p.description ILIKE :like ESCAPE '\\')`);
    replacements.like = `%${query.search.replace(/[\\%_]/g, (c) => `\\${c}`)}%`;
  }
  const rows = await sequelize.query<{
    id: number;
    name: string;
    status: ProjectStatus;
    archived: boolean;
    owner_id: number | null;
    owner_name: string | null;
    updated_at: Date;
    stage_count: number;
    problems: number;
  }>(
    `SELECT p.id, p.name, p.status, p.archived, p.owner_id, u.display_name AS owner_name, p.updated_at,
            COUNT(s.id)::int AS stage_count,
            COUNT(s.id) FILTER (WHERE s.analysis_error IS NOT NULL OR EXISTS (
              SELECT 1 FROM jsonb_array_elements(COALESCE(s.analysis->'ratings', '[]'::jsonb)) r WHERE r->>'status' = 'over'))::int AS problems
       FROM projects p
       LEFT JOIN users u ON u.id = p.owner_id
       LEFT JOIN stages s ON s.project_id = p.id
      ${where.length ? `WHERE ${where.join(' AND ')}` : ''}
      GROUP BY p.id, u.display_name
      ORDER BY p.updated_at DESC`,
    { type: QueryTypes.SELECT, replacements },
  );
  return rows.map((r) => ({
    id: r.id,
    name: r.name,
    status: r.status,
    archived: r.archived,
    owner: r.owner_id !== null ? { id: r.owner_id, displayName: r.owner_name ?? '?' } : null,
    updatedAt: new Date(r.updated_at).toISOString(),
    stageCount: r.stage_count,
    ratingProblems: r.problems,
  }));
}

export type WatcherOption = { id: number; displayName: string; role: Role };

/** The active users, for the watcher picker on the project page. */
export async function listWatcherOptions(): Promise<WatcherOption[]> {
  const users = await User.findAll({ where: { active: true }, attributes: ['id', 'displayName', 'role'], order: [['displayName', 'ASC'], ['id', 'ASC']] });
  return users.map((u) => ({ id: u.id, displayName: u.displayName, role: u.role }));
}

/** Inside a transaction, pass it (one connection per request). */
export async function getProject(id: number, transaction?: Transaction): Promise<ProjectDetail> {
  const project = await Project.findByPk(id, { transaction });
  if (!project) throw new ApiError('not_found', 'No such project.');
  const loadOwner = () => (project.ownerId !== null ? User.findByPk(project.ownerId, { attributes: ['id', 'displayName'], transaction }) : Promise.resolve(null));
  const loadStages = () => Stage.findAll({ where: { projectId: id }, order: [['position', 'ASC'], ['id', 'ASC']], transaction });
  const loadWatchers = () => ProjectWatcher.findAll({ where: { projectId: id }, transaction });
  // A transaction holds one connection: its queries go one after another (pg refuses overlapping queries on a
  // client). Without one, each query takes its own pooled connection and they run side by side.
  const [owner, stages, watchers] = transaction
    ? [await loadOwner(), await loadStages(), await loadWatchers()]
    : await Promise.all([loadOwner(), loadStages(), loadWatchers()]);
  const watcherUsers = watchers.length ? await User.findAll({ where: { id: { [Op.in]: watchers.map((w) => w.userId) } }, attributes: ['id', 'displayName'], order: [['displayName', 'ASC']], transaction }) : [];
  return {
    id: project.id,
    name: project.name,
    description: project.description,
    status: project.status,
    archived: project.archived,
    version: project.version,
    owner: owner ? { id: owner.id, displayName: owner.displayName } : null,
    watchers: watcherUsers.map((u) => ({ id: u.id, displayName: u.displayName })),
    supply: project.supply ?? {},
    supplyCircuit: project.supplyCircuit ?? null,
    chainLinks: project.chainLinks ?? null,
    benchTolerances: project.benchTolerances ?? {},
    updatedAt: project.updatedAt.toISOString(),
    stages: await stageDTOs(stages, transaction),
  };
}

export async function createProject(actorId: number, raw: CreateProjectInput): Promise<ProjectDetail> {
  const data = createProjectSchema.parse(raw);
  const project = await sequelize.transaction(async (transaction) => {
    const p = await Project.create(
      { name: data.name, description: data.description ?? '', ownerId: actorId, supply: data.supply ?? { sourceResistance: 0, nodes: [], heaters: [] } },
      { transaction },
    );
    await recordAudit(transaction, { actorId, action: 'project.create', targetType: 'project', targetId: p.id, projectId: p.id, details: { name: data.name } });
    return p;
  });
  return getProject(project.id);
}

const DESIGN_FIELDS = ['name', 'description', 'supply', 'supplyCircuit', 'chainLinks', 'benchTolerances'] as const;

export async function updateProject(actorId: number, id: number, raw: UpdateProjectInput): Promise<ProjectDetail> {
  const patch = updateProjectSchema.parse(raw);
  await sequelize.transaction(async (transaction) => {
    const project = await Project.findByPk(id, { transaction, lock: transaction.LOCK.UPDATE });
    if (!project) throw new ApiError('not_found', 'No such project.');
    if (project.version !== patch.version) {
      throw new ApiError('conflict', `Someone else changed this project since you opened it (now version ${project.version}). Reload to see their changes.`, {
        details: { current: await getProject(id, transaction) },
      });
    }
    if (project.archived && patch.archived !== false && DESIGN_FIELDS.some((f) => patch[f] !== undefined)) {
      throw new ApiError('conflict', 'This project is archived; restore it before changing it.');
    }
    const changes: Partial<Project> = {};
    const fields: string[] = [];
    for (const f of DESIGN_FIELDS) {
      if (patch[f] !== undefined) {
        (changes as Record<string, unknown>)[f] = patch[f];
        fields.push(f);
      }
    }
    if (patch.supplyCircuit) {
      // the circuit's nodes are mirrored into the ladder shape, so node pickers and older readers keep working
      const base = (patch.supply ?? project.supply ?? {}) as ProjectSupplyRecord;
      const nodes = circuitNodes(patch.supplyCircuit).map(({ key, name, droppingResistor, filterCapacitor }) => ({ key, name, droppingResistor, filterCapacitor }));
      (changes as Record<string, unknown>).supply = { ...base, rawVoltage: patch.supplyCircuit.secondary.voltage * Math.SQRT2, sourceResistance: patch.supplyCircuit.secondary.resistance, nodes };
      if (!fields.includes('supply')) fields.push('supply');
    }
    const nextSupply = (changes as { supply?: ProjectSupplyRecord }).supply;
    if (nextSupply) {
      const keys = new Set((nextSupply.nodes ?? []).map((n) => n.key));
      const orphans = await Stage.findAll({ where: { projectId: id, supplyNode: { [Op.ne]: null } }, attributes: ['name', 'supplyNode'], transaction });
      const lost = orphans.filter((s) => !keys.has(s.supplyNode!));
      if (lost.length) {
        throw new ApiError('unprocessable_entity', `Stages still draw from nodes you removed: ${lost.map((s) => `${s.name} (${s.supplyNode})`).join(', ')}. Move them to another node first.`, {
          fieldErrors: { [patch.supplyCircuit ? 'supplyCircuit' : 'supply.nodes']: ['A node that stages draw from cannot be removed.'] },
        });
      }
    }
    const reopen = fields.length > 0 && project.status !== 'draft';
    if (reopen) changes.status = 'draft';
    if (patch.archived !== undefined && patch.archived !== project.archived) {
      changes.archived = patch.archived;
      fields.push('archived');
    }
    if (patch.watchers) {
      const ids = [...new Set(patch.watchers)];
      const found = await User.count({ where: { id: { [Op.in]: ids } }, transaction });
      if (found !== ids.length) throw new ApiError('unprocessable_entity', 'Some watchers are not users of Anodyne.', { fieldErrors: { watchers: ['Unknown user.'] } });
      await ProjectWatcher.destroy({ where: { projectId: id }, transaction });
      if (ids.length) await ProjectWatcher.bulkCreate(ids.map((userId) => ({ projectId: id, userId })), { transaction });
      fields.push('watchers');
    }
    await project.update({ ...changes, version: project.version + 1 }, { transaction });
    const action = changes.archived === true ? 'project.archive' : changes.archived === false ? 'project.restore' : 'project.update';
    await recordAudit(transaction, {
      actorId,
      action,
      targetType: 'project',
      targetId: id,
      projectId: id,
      details: { fields, version: patch.version, ...(reopen ? { reopenedFrom: project.status } : {}) },
    });
  });
  return getProject(id);
}

export async function archiveProject(actorId: number, id: number): Promise<void> {
  await sequelize.transaction(async (transaction) => {
    const project = await Project.findByPk(id, { transaction, lock: transaction.LOCK.UPDATE });
    if (!project) throw new ApiError('not_found', 'No such project.');
    if (project.archived) return;
    await project.update({ archived: true, version: project.version + 1 }, { transaction });
    await recordAudit(transaction, { actorId, action: 'project.archive', targetType: 'project', targetId: id, projectId: id, details: {} });
  });
}

/** The project's stages as the chain solver wants them: engine inputs with the library tubes, and heater data. */
export async function chainStagesFor(project: ProjectDetail): Promise<ChainStage[]> {
  const tubeIds = [...new Set(project.stages.map((s) => s.tubeTypeId))];
  const tubes = tubeIds.length ? await TubeType.findAll({ where: { id: { [Op.in]: tubeIds } }, attributes: ['id', 'designation', 'heater', 'sections'] }) : [];
  const byId = new Map(tubes.map((t) => [t.id, t]));
  return Promise.all(
    project.stages.map(async (s): Promise<ChainStage> => {
      const t = byId.get(s.tubeTypeId);
      const heater = t ? { voltage: t.heater?.voltage, current: t.heater?.current, sections: t.sections, designation: t.designation } : undefined;
      const base = { id: s.id, name: s.name, position: s.position, supplyNode: s.supplyNode, topology: s.topology, assumedSupply: s.inputs.supply, heater };
      try {
        const body: StageBody = stageBodySchema.parse(s.inputs);
        return { ...base, input: await engineInputFor(body, s.tubeModelId) };
      } catch (err) {
        return { ...base, input: null, inputError: { code: 'invalid-input', message: err instanceof Error ? err.message : 'The stored inputs are not valid.' } };
      }
    }),
  );
}
