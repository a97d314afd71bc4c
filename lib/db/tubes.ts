import 'server-only';
import { Op, QueryTypes, type Transaction, type WhereOptions } from 'sequelize';
import { ApiError } from '@/lib/api/errors';
import { can } from '@/lib/auth/policy';
import type { CurrentUser } from '@/lib/auth/session';
import type { Tube } from '@/lib/calc';
import {
  createTubeSchema,
  modelInputSchema,
  RATING_KEYS,
  updateModelSchema,
  updateTubeSchema,
  type CreateTubeInput,
  type ModelInput,
  type TubeListQuery,
  type UpdateModelInput,
  type UpdateTubeInput,
} from '@/lib/validation/tube';
import { Attachment, CurveFit, CurveSet, TubeModel, TubeType, User } from '@/models';
import type { TubeCapacitancesRecord, TubeHeater, TubeRatingsRecord, TypicalPoint } from '@/models/types';
import { recordAudit } from './audit';
import { sequelize } from './index';

export type Family = TubeType['family'];
export type ModelRow = {
  id: number;
  tubeTypeId: number;
  name: string;
  kind: TubeModel['kind'];
  parameters: Record<string, number>;
  source: string;
  isDefault: boolean;
  published: boolean;
  curveFitId: number | null;
  createdAt: string;
};
export type FitRow = {
  id: number;
  curveSetId: number;
  model: CurveFit['model'];
  parameters: Record<string, number>;
  rmsErrorPercent: number;
  maxErrorPercent: number;
  status: 'proposed' | 'accepted' | 'discarded';
  createdAt: string;
};
export type CurveSetRow = {
  id: number;
  tubeTypeId: number;
  name: string;
  kind: CurveSet['kind'];
  currentUnit: CurveSet['currentUnit'];
  fileName: string;
  byteSize: number;
  pointCount: number;
  demo: boolean;
  notes: string;
  uploadedBy: string | null;
  createdAt: string;
  fits: FitRow[];
};
export type AttachmentRow = { id: number; kind: string; fileName: string; contentType: string; byteSize: number; uploadedBy: string | null; createdAt: string; url: string };
export type TubeSummary = {
  id: number;
  designation: string;
  aliases: string[];
  family: Family;
  sections: number;
  heater: TubeHeater;
  ratings: TubeRatingsRecord;
  published: boolean;
  retired: boolean;
  modelCount: number;
  curveSetCount: number;
  defaultModel: { id: number; name: string; kind: ModelRow['kind'] } | null;
};
export type TubeDetail = TubeSummary & {
  capacitances: TubeCapacitancesRecord;
  typicalPoints: TypicalPoint[];
  notes: string;
  createdBy: string | null;
  createdAt: string;
  updatedAt: string;
  models: ModelRow[];
  curveSets: CurveSetRow[];
  attachments: AttachmentRow[];
};

export function toModelRow(m: TubeModel): ModelRow {
  return {
    id: m.id,
    tubeTypeId: m.tubeTypeId,
    name: m.name,
    kind: m.kind,
    parameters: m.parameters,
    source: m.source,
    isDefault: m.isDefault,
    published: m.published,
    curveFitId: m.curveFitId,
    createdAt: m.createdAt.toISOString(),
  };
}

export function toFitRow(f: CurveFit): FitRow {
  return {
    id: f.id,
    curveSetId: f.curveSetId,
    model: f.model,
    parameters: f.parameters,
    rmsErrorPercent: f.rmsErrorPercent,
    maxErrorPercent: f.maxErrorPercent,
    status: f.status,
    createdAt: f.createdAt.toISOString(),
  };
}

async function userNames(ids: (number | null)[]): Promise<Map<number, string>> {
  const wanted = [...new Set(ids.filter((x): x is number => typeof x === 'number'))];
  if (wanted.length === 0) return new Map();
  const users = await User.findAll({ where: { id: { [Op.in]: wanted } }, attributes: ['id', 'displayName'] });
  return new Map(users.map((u) => [u.id, u.displayName]));
}

type Counts = { models: number; curveSets: number; defaultModel: TubeSummary['defaultModel'] };

async function countsFor(ids: number[]): Promise<Map<number, Counts>> {
  const out = new Map<number, Counts>(ids.map((id) => [id, { models: 0, curveSets: 0, defaultModel: null }]));
  if (ids.length === 0) return out;
  const models = await TubeModel.findAll({ where: { tubeTypeId: { [Op.in]: ids } }, attributes: ['id', 'tubeTypeId', 'name', 'kind', 'isDefault'] });
  for (const m of models) {
    const c = out.get(m.tubeTypeId)!;
    c.models += 1;
    if (m.isDefault) c.defaultModel = { id: m.id, name: m.name, kind: m.kind };
  }
  const sets = await sequelize.query<{ tube_type_id: number; n: number }>(
    'SELECT tube_type_id, count(*)::int AS n FROM curve_sets WHERE tube_type_id IN (:ids) GROUP BY tube_type_id',
    { type: QueryTypes.SELECT, replacements: { ids } },
  );
  for (const s of sets) out.get(s.tube_type_id)!.curveSets = s.n;
  return out;
}

function summary(t: TubeType, c: Counts | undefined): TubeSummary {
  return {
    id: t.id,
    designation: t.designation,
    aliases: t.aliases,
    family: t.family,
    sections: t.sections,
    heater: t.heater,
    ratings: t.ratings,
    published: t.published,
    retired: t.retired,
    modelCount: c?.models ?? 0,
    curveSetCount: c?.curveSets ?? 0,
    defaultModel: c?.defaultModel ?? null,
  };
}

/** Search matches the designation or any alias, case-insensitively, anywhere in the text. */
export async function listTubes(query: Partial<TubeListQuery> = {}): Promise<{ tubes: TubeSummary[]; total: number; page: number; pageSize: number }> {
  const page = query.page ?? 1;
  const pageSize = query.pageSize ?? 50;
  const and: WhereOptions<TubeType>[] = [];
  if (!query.includeRetired) and.push({ retired: false });
  if (query.family) and.push({ family: query.family });
  if (query.search) {
    const like = `%${query.search.replace(/[\\%_]/g, (c) => `\\${c}`)}%`;
    and.push({
      [Op.or]: [
        { designation: { [Op.iLike]: like } },
        sequelize.where(sequelize.literal(`array_to_string("TubeType"."aliases", ' ')`), { [Op.iLike]: like }),
      ],
    } as WhereOptions<TubeType>);
  }
  const { rows, count } = await TubeType.findAndCountAll({
    where: { [Op.and]: and },
    order: [['designation', 'ASC']],
    limit: pageSize,
    offset: (page - 1) * pageSize,
  });
  const counts = await countsFor(rows.map((r) => r.id));
  return { tubes: rows.map((t) => summary(t, counts.get(t.id))), total: count, page, pageSize };
}

export async function getTube(id: number): Promise<TubeDetail> {
  const t = await TubeType.findByPk(id);
  if (!t) throw new ApiError('not_found', 'No such tube type.');
  const [models, sets, attachments, counts] = await Promise.all([
    TubeModel.findAll({ where: { tubeTypeId: id }, order: [['isDefault', 'DESC'], ['id', 'ASC']] }),
    CurveSet.findAll({ where: { tubeTypeId: id }, order: [['id', 'DESC']] }),
    Attachment.findAll({ where: { ownerType: 'tube-type', ownerId: id }, order: [['id', 'DESC']] }),
    countsFor([id]),
  ]);
  const fits = sets.length ? await CurveFit.findAll({ where: { curveSetId: { [Op.in]: sets.map((s) => s.id) } }, order: [['id', 'DESC']] }) : [];
  const names = await userNames([t.createdById, ...sets.map((s) => s.uploadedById), ...attachments.map((a) => a.uploadedById)]);
  return {
    ...summary(t, counts.get(id)),
    capacitances: t.capacitances,
    typicalPoints: t.typicalPoints,
    notes: t.notes,
    createdBy: t.createdById ? (names.get(t.createdById) ?? null) : null,
    createdAt: t.createdAt.toISOString(),
    updatedAt: t.updatedAt.toISOString(),
    models: models.map(toModelRow),
    curveSets: sets.map((s) => toCurveSetRow(s, fits.filter((f) => f.curveSetId === s.id), names)),
    attachments: attachments.map((a) => toAttachmentRow(a, names)),
  };
}

export function toCurveSetRow(s: CurveSet, fits: CurveFit[], names: Map<number, string>): CurveSetRow {
  return {
    id: s.id,
    tubeTypeId: s.tubeTypeId,
    name: s.name,
    kind: s.kind,
    currentUnit: s.currentUnit,
    fileName: s.fileName,
    byteSize: s.byteSize,
    pointCount: s.pointCount,
    demo: s.demo,
    notes: s.notes,
    uploadedBy: s.uploadedById ? (names.get(s.uploadedById) ?? null) : null,
    createdAt: s.createdAt.toISOString(),
    fits: fits.map(toFitRow),
  };
}

export function toAttachmentRow(a: Attachment, names: Map<number, string>): AttachmentRow {
  return {
    id: a.id,
    kind: a.kind,
    fileName: a.fileName,
    contentType: a.contentType,
    byteSize: a.byteSize,
    uploadedBy: a.uploadedById ? (names.get(a.uploadedById) ?? null) : null,
    createdAt: a.createdAt.toISOString(),
    url: `/api/attachments/${a.id}`,
  };
}

/** Published (seeded) entries change only with 'tubes:edit-published'; the message says who may. */
export function assertMayEdit(user: CurrentUser, tube: { published: boolean; designation: string }, what = 'edit') {
  if (tube.published && !can(user.role, 'tubes:edit-published')) {
    throw new ApiError('forbidden', `${tube.designation} is a published library entry; only an admin may ${what} it. Add a new model or curve set instead, or ask an admin.`);
  }
}

/** Non-retired type, locked for the rest of the transaction. */
export async function lockTube(id: number, transaction: Transaction, opts: { allowRetired?: boolean } = {}) {
  const t = await TubeType.findByPk(id, { transaction, lock: transaction.LOCK.UPDATE });
  if (!t) throw new ApiError('not_found', 'No such tube type.');
  if (t.retired && !opts.allowRetired) throw new ApiError('conflict', `${t.designation} is retired; an admin can bring it back before it is changed.`);
  return t;
}

function modelMatchesFamily(kind: ModelRow['kind'], family: Family): boolean {
  return family === 'triode' ? kind === 'koren-triode' : true;
}

async function createModelRow(
  transaction: Transaction,
  actorId: number,
  tube: TubeType,
  m: { name: string; kind: ModelRow['kind']; parameters: Record<string, number>; source: string; setDefault?: boolean; curveFitId?: number | null },
) {
  if (!modelMatchesFamily(m.kind, tube.family)) {
    throw new ApiError('unprocessable_entity', `A ${tube.family} cannot take a ${m.kind} model.`, { fieldErrors: { kind: ['Use a Koren triode model for a triode.'] } });
  }
  const existingDefault = await TubeModel.findOne({ where: { tubeTypeId: tube.id, isDefault: true }, transaction });
  const makeDefault = m.setDefault === true || !existingDefault;
  if (makeDefault && existingDefault) await existingDefault.update({ isDefault: false }, { transaction });
  const row = await TubeModel.create(
    {
      tubeTypeId: tube.id,
      name: m.name,
      kind: m.kind,
      parameters: m.parameters,
      source: m.source,
      isDefault: makeDefault,
      published: false,
      curveFitId: m.curveFitId ?? null,
      createdById: actorId,
    },
    { transaction },
  );
  await recordAudit(transaction, {
    actorId,
    action: 'tube-model.create',
    targetType: 'tube-model',
    targetId: row.id,
    details: { tubeTypeId: tube.id, designation: tube.designation, name: m.name, kind: m.kind, source: m.source, isDefault: makeDefault, previousDefaultId: makeDefault ? (existingDefault?.id ?? null) : undefined },
  });
  return row;
}

export { createModelRow };

export async function createTube(actor: CurrentUser, input: CreateTubeInput) {
  const data = createTubeSchema.parse(input);
  return sequelize.transaction(async (transaction) => {
    const clash = await TubeType.findOne({ where: { designation: { [Op.iLike]: data.designation } }, transaction });
    if (clash) throw new ApiError('conflict', `${clash.designation} is already in the library.`, { fieldErrors: { designation: ['This designation is already in the library.'] } });
    const tube = await TubeType.create(
      {
        designation: data.designation,
        aliases: data.aliases,
        family: data.family,
        sections: data.sections,
        heater: data.heater,
        ratings: data.ratings as TubeRatingsRecord,
        capacitances: data.capacitances,
        typicalPoints: data.typicalPoints as TypicalPoint[],
        notes: data.notes,
        published: false,
        retired: false,
        createdById: actor.id,
      },
      { transaction },
    );
    await recordAudit(transaction, { actorId: actor.id, action: 'tube.create', targetType: 'tube-type', targetId: tube.id, details: { designation: tube.designation, family: tube.family } });
    if (data.model) await createModelRow(transaction, actor.id, tube, { ...data.model, parameters: data.model.parameters as Record<string, number>, setDefault: true });
    return { id: tube.id };
  }).then(({ id }) => getTube(id));
}

export async function updateTube(actor: CurrentUser, id: number, patch: UpdateTubeInput) {
  const data = updateTubeSchema.parse(patch);
  await sequelize.transaction(async (transaction) => {
    const tube = await lockTube(id, transaction, { allowRetired: true });
    const retiring = data.retired === true && !tube.retired;
    assertMayEdit(actor, tube, retiring ? 'retire' : 'edit');
    if (data.published !== undefined && !can(actor.role, 'tubes:edit-published')) {
      throw new ApiError('forbidden', 'Only an admin may publish or unpublish a library entry.');
    }
    if (tube.retired && data.retired !== false) throw new ApiError('conflict', `${tube.designation} is retired; bring it back first (retired: false).`);
    if (data.designation && data.designation.toLowerCase() !== tube.designation.toLowerCase()) {
      const clash = await TubeType.findOne({ where: { designation: { [Op.iLike]: data.designation }, id: { [Op.ne]: id } }, transaction });
      if (clash) throw new ApiError('conflict', `${clash.designation} is already in the library.`, { fieldErrors: { designation: ['This designation is already in the library.'] } });
    }
    if (data.family && data.family === 'triode' && tube.family !== 'triode') {
      const pentodeModels = await TubeModel.count({ where: { tubeTypeId: id, kind: 'koren-pentode' }, transaction });
      if (pentodeModels > 0) throw new ApiError('conflict', 'This type has pentode models; it cannot become a triode.', { fieldErrors: { family: ['Has pentode models.'] } });
    }
    const before: Record<string, unknown> = {};
    const after: Record<string, unknown> = {};
    for (const [k, v] of Object.entries(data)) {
      const key = k as keyof typeof data;
      const old = tube.get(key as never) as unknown;
      if (JSON.stringify(old) !== JSON.stringify(v)) {
        before[k] = old;
        after[k] = v;
      }
    }
    await tube.update(data as Partial<TubeType>, { transaction });
    const action = retiring ? 'tube.retire' : data.retired === false && before.retired === true ? 'tube.restore' : 'tube.update';
    await recordAudit(transaction, { actorId: actor.id, action, targetType: 'tube-type', targetId: id, details: { designation: tube.designation, before, after } });
  });
  return getTube(id);
}

export async function addModel(actor: CurrentUser, tubeTypeId: number, input: ModelInput) {
  const data = modelInputSchema.parse(input);
  const row = await sequelize.transaction(async (transaction) => {
    const tube = await lockTube(tubeTypeId, transaction);
    if (data.setDefault) assertMayEdit(actor, tube, 'change the default model of');
    return createModelRow(transaction, actor.id, tube, { ...data, parameters: data.parameters as Record<string, number> });
  });
  return toModelRow(row);
}

export async function updateModel(actor: CurrentUser, tubeTypeId: number, modelId: number, input: UpdateModelInput) {
  const data = updateModelSchema.parse(input);
  const row = await sequelize.transaction(async (transaction) => {
    const tube = await lockTube(tubeTypeId, transaction);
    const model = await TubeModel.findOne({ where: { id: modelId, tubeTypeId }, transaction, lock: transaction.LOCK.UPDATE });
    if (!model) throw new ApiError('not_found', 'No such model for this tube type.');
    if (model.published) assertMayEdit(actor, { published: true, designation: `${tube.designation} ${model.name}` });
    if (data.setDefault) assertMayEdit(actor, tube, 'change the default model of');
    const previousDefault = data.setDefault ? await TubeModel.findOne({ where: { tubeTypeId, isDefault: true }, transaction }) : null;
    if (previousDefault && previousDefault.id !== model.id) await previousDefault.update({ isDefault: false }, { transaction });
    await model.update({ ...(data.name ? { name: data.name } : {}), ...(data.source ? { source: data.source } : {}), ...(data.setDefault ? { isDefault: true } : {}) }, { transaction });
    await recordAudit(transaction, {
      actorId: actor.id,
      action: data.setDefault ? 'tube-model.set-default' : 'tube-model.update',
      targetType: 'tube-model',
      targetId: model.id,
      details: { tubeTypeId, designation: tube.designation, ...data, previousDefaultId: previousDefault?.id ?? null },
    });
    return model;
  });
  return toModelRow(row);
}

export async function getModel(tubeTypeId: number, modelId: number) {
  const model = await TubeModel.findOne({ where: { id: modelId, tubeTypeId } });
  if (!model) throw new ApiError('not_found', 'No such model for this tube type.');
  return toModelRow(model);
}

function engineRatings(r: TubeRatingsRecord): NonNullable<Tube['ratings']> {
  const out: Record<string, number> = {};
  for (const k of RATING_KEYS) {
    const v = r[k]?.value;
    if (typeof v === 'number' && Number.isFinite(v) && v > 0) out[k] = v;
  }
  return out;
}

function engineCapacitances(c: TubeCapacitancesRecord): { cgk: number; cga: number; cak: number } | undefined {
  if ([c.cgk, c.cga, c.cak].every((x) => typeof x === 'number' && Number.isFinite(x) && x >= 0)) return { cgk: c.cgk!, cga: c.cga!, cak: c.cak! };
  return undefined;
}

/** The engine's inline tube from a type and one of its models (the default one unless modelId is given). */
export function engineTubeFrom(
  tube: { designation: string; ratings: TubeRatingsRecord; capacitances: TubeCapacitancesRecord },
  model: { name: string; kind: ModelRow['kind']; parameters: Record<string, number> },
): Tube {
  const p = model.parameters;
  const common = {
    name: `${tube.designation} (${model.name})`.slice(0, 80),
    ...(p.rgi !== undefined ? { rgi: p.rgi } : {}),
    ...(engineCapacitances(tube.capacitances) ? { capacitances: engineCapacitances(tube.capacitances) } : {}),
    ratings: engineRatings(tube.ratings),
  };
  const vct = p.vct !== undefined ? { vct: p.vct } : {};
  if (model.kind === 'koren-pentode') {
    return { model: 'koren-pentode', mu: p.mu!, ex: p.ex!, kg1: p.kg1!, kg2: p.kg2!, kp: p.kp!, kvb: p.kvb!, ...vct, ...common };
  }
  return { model: 'koren-triode', mu: p.mu!, ex: p.ex!, kg1: p.kg1!, kp: p.kp!, kvb: p.kvb!, ...vct, ...common };
}

/**
 * For the stage designer and others: the inline engine tube of a type from its default (or the given) model.
 * Throws ApiError 'not_found' for an unknown type or model, 'unprocessable_entity' when the type has no model.
 */
export async function getEngineTube(tubeTypeId: number, modelId?: number): Promise<Tube> {
  const tube = await TubeType.findByPk(tubeTypeId);
  if (!tube) throw new ApiError('not_found', 'No such tube type.');
  const model = modelId
    ? await TubeModel.findOne({ where: { id: modelId, tubeTypeId } })
    : await TubeModel.findOne({ where: { tubeTypeId }, order: [['isDefault', 'DESC'], ['id', 'ASC']] });
  if (!model) {
    if (modelId) throw new ApiError('not_found', `Model ${modelId} does not belong to ${tube.designation}.`);
    throw new ApiError('unprocessable_entity', `${tube.designation} has no model yet (ratings only); upload measured curves and fit one, or enter parameters by hand.`, {
      fieldErrors: { tubeTypeId: [`${tube.designation} has no model yet.`] },
    });
  }
  return engineTubeFrom(tube, model);
}

export type TubeOption = { id: number; designation: string; family: Family; models: { id: number; name: string; kind: ModelRow['kind']; isDefault: boolean }[] };

/** For tube selects: every non-retired type with its models, the default first. */
export async function listTubeOptions(): Promise<TubeOption[]> {
  const tubes = await TubeType.findAll({ where: { retired: false }, order: [['designation', 'ASC']], attributes: ['id', 'designation', 'family'] });
  const models = await TubeModel.findAll({ where: { tubeTypeId: { [Op.in]: tubes.map((t) => t.id) } }, order: [['isDefault', 'DESC'], ['id', 'ASC']], attributes: ['id', 'tubeTypeId', 'name', 'kind', 'isDefault'] });
  return tubes.map((t) => ({
    id: t.id,
    designation: t.designation,
    family: t.family,
    models: models.filter((m) => m.tubeTypeId === t.id).map((m) => ({ id: m.id, name: m.name, kind: m.kind, isDefault: m.isDefault })),
  }));
}
